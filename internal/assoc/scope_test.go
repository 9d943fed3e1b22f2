package assoc

import (
	"cmp"
	"context"
	"fmt"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"

	"kinword/internal/access"
)

// scopedCorpus builds open documents plus restricted ones. The canary term
// "zyxcanary" and the canary phrase "merger plan" occur only in documents
// of group "hr"; "ghostterm" only in documents whose groups are blank
// (readable by nobody).
func scopedCorpus(withRestricted bool) *MemCorpus {
	r := rand.New(rand.NewPCG(21, 22))
	fill := func(n int) []string {
		w := make([]string, n)
		for i := range w {
			w[i] = fmt.Sprintf("word%02d", r.IntN(60))
		}
		return w
	}
	c := NewMemCorpus(fakeStem)
	for i := range 150 {
		p := fill(20)
		if i%3 == 0 {
			p = slices.Concat(p, []string{"salary"}, fill(2), []string{"pumps"})
		}
		c.AddDoc(nil, p, fill(10))
	}
	if !withRestricted {
		return c
	}
	join := func(parts ...[]string) []string { return slices.Concat(parts...) }
	w := func(s ...string) []string { return s }
	for range 6 {
		c.AddDoc([]string{"HR"}, join(fill(4), w("zyxcanary"), fill(3), w("merger", "plan"), fill(3), w("salary")))
	}
	c.AddDoc([]string{"hr", "ops"}, join(fill(4), w("zyxcanary"), fill(3), w("merger", "plan")))
	for range 6 {
		c.AddDoc([]string{"ops"}, join(fill(4), w("turbine"), fill(3), w("salary"), fill(2), w("pumps")))
	}
	for range 6 {
		c.AddDoc([]string{" "}, join(fill(4), w("ghostterm"), fill(3), w("salary")))
	}
	return c
}

var allMeasures = []Measure{MeasureLLR, MeasurePMI, MeasureNPMI, MeasureChi2, MeasureDice, MeasureCondProb, MeasureTScore}

func TestCanaryNeverLeaks(t *testing.T) {
	tb, err := Mine(context.Background(), scopedCorpus(true), Options{MinPhraseCount: 3})
	if err != nil {
		t.Fatal(err)
	}
	if got := scopeNames(tb); !slices.Equal(got, []string{"", "hr", "ops"}) {
		t.Fatalf("scopes %q", got)
	}
	insider := access.Viewer{Department: "people", Groups: []string{"hr"}}
	canaries := []string{"zyxcanary", "merger plan"}
	ids := map[string]uint32{}
	for _, w := range canaries {
		id, ok := tb.LookupFor(insider, w)
		if !ok {
			t.Fatalf("insider cannot see %q", w)
		}
		ids[w] = id
		if nb := tb.Neighbours(insider, id, MeasureLLR, 0); len(nb) == 0 || nb[0].Scope != "hr" {
			t.Errorf("insider neighbours of %q: %+v", w, nb)
		}
	}
	if !slices.ContainsFunc(tb.PhrasesFor(insider), func(p Phrase) bool { return p.Key == "merger plan" }) {
		t.Error("insider does not see the phrase")
	}
	outsiders := []access.Viewer{
		access.Anonymous,
		{Department: "ops", Groups: []string{"ops"}},
		{Groups: []string{"finance", "ops", "hrx"}},
	}
	everyone := access.Viewer{Groups: []string{"hr", "ops", " ", ""}}
	for _, v := range append(outsiders, everyone) {
		t.Run(v.String(), func(t *testing.T) {
			hidden := []string{"ghostterm"}
			outsider := !v.CanRead([]string{"hr"})
			if outsider {
				hidden = append(hidden, canaries...)
			}
			for _, w := range hidden {
				if _, ok := tb.LookupFor(v, w); ok {
					t.Errorf("LookupFor(%q) succeeded", w)
				}
				if id, ok := ids[w]; ok && (tb.Visible(v, id) || len(tb.Neighbours(v, id, MeasureLLR, 0)) > 0) {
					t.Errorf("%q visible by ID", w)
				}
			}
			for _, p := range tb.PhrasesFor(v) {
				if slices.Contains(hidden, p.Key) {
					t.Errorf("phrase %q listed", p.Key)
				}
			}
			allowed := []string{OpenScope}
			allowed = append(allowed, access.NormalizeGroups(v.Groups)...)
			for id := range uint32(tb.numTerms()) {
				for _, m := range allMeasures {
					for _, n := range tb.Neighbours(v, id, m, 0) {
						if slices.Contains(hidden, n.Term) || outsider && strings.Contains(n.Term, "zyxcanary") {
							t.Fatalf("%q leaked as neighbour of %q (%v)", n.Term, tb.term(id), m)
						}
						if !slices.Contains(allowed, n.Scope) {
							t.Fatalf("neighbour from scope %q", n.Scope)
						}
					}
				}
			}
		})
	}
}

// TestOpenScopeDependsOnOpenDocsOnly: what an anonymous viewer sees is
// exactly what mining the open documents alone gives.
func TestOpenScopeDependsOnOpenDocsOnly(t *testing.T) {
	full, err := Mine(context.Background(), scopedCorpus(true), Options{MinPhraseCount: 3})
	if err != nil {
		t.Fatal(err)
	}
	open, err := Mine(context.Background(), scopedCorpus(false), Options{MinPhraseCount: 3})
	if err != nil {
		t.Fatal(err)
	}
	strip := func(ns []Neighbour) []Neighbour {
		for i := range ns {
			ns[i].ID = 0
		}
		return ns
	}
	n := 0
	for id := range uint32(open.numTerms()) {
		term := open.term(id)
		fid, ok := full.Lookup(term)
		if !ok {
			t.Fatalf("%q missing for anonymous in the full table", term)
		}
		a := strip(open.Neighbours(access.Anonymous, id, MeasureLLR, 0))
		b := strip(full.Neighbours(access.Anonymous, fid, MeasureLLR, 0))
		if !reflect.DeepEqual(a, b) {
			t.Fatalf("%q: open-only %+v\nfull %+v", term, a, b)
		}
		n += len(a)
	}
	if !reflect.DeepEqual(open.Phrases()[0].Key, full.Phrases()[0].Key) || len(open.Phrases()) != len(full.Phrases()) {
		t.Error("phrase lists differ")
	}
	if n == 0 {
		t.Fatal("no neighbours compared")
	}
}

func scopeNames(t *Table) []string {
	var out []string
	for _, s := range t.Info().Scopes {
		out = append(out, s.Name)
	}
	return out
}

// TestMergeTakesBestScope: an insider sees, per neighbour, the scope with
// the higher score.
func TestMergeTakesBestScope(t *testing.T) {
	tb, err := Mine(context.Background(), scopedCorpus(true), Options{MinPhraseCount: 3})
	if err != nil {
		t.Fatal(err)
	}
	v := access.Viewer{Groups: []string{"ops"}}
	id, ok := tb.LookupFor(v, "salary")
	if !ok {
		t.Fatal("salary missing")
	}
	scores := map[string]map[string]float64{}
	for _, s := range []int{0, 2} {
		st := tb.scopes[s]
		sp := st.entries(id)
		for i := range sp.n {
			src, e := sp.at(i)
			n := tb.neighbour(st, src, id, e, MeasureLLR)
			if scores[n.Term] == nil {
				scores[n.Term] = map[string]float64{}
			}
			scores[n.Term][st.name] = n.Score
		}
	}
	both := 0
	for _, sc := range scores {
		if len(sc) == 2 {
			both++
		}
	}
	if both < 5 {
		t.Fatalf("only %d neighbours in both scopes; test is weak", both)
	}
	got := tb.Neighbours(v, id, MeasureLLR, 0)
	if len(got) != len(scores) {
		t.Fatalf("%d merged neighbours, %d distinct", len(got), len(scores))
	}
	from := map[string]int{}
	for _, n := range got {
		from[n.Scope]++
		for scope, s := range scores[n.Term] {
			if s > n.Score {
				t.Errorf("%q: kept %v from %q, scope %q has %v", n.Term, n.Score, n.Scope, scope, s)
			}
		}
	}
	if from[OpenScope] == 0 || from["ops"] == 0 {
		t.Errorf("merged neighbours by scope %v; want both scopes represented", from)
	}
}

// TestNeighbourCacheKeepsViewersApart: Neighbours memoises its lists per
// term, measure, k and visible scope set; the cached list of an insider
// must never answer an outsider, a caller's changes must not reach the
// cache, and a cached answer equals a fresh build.
func TestNeighbourCacheKeepsViewersApart(t *testing.T) {
	tb, err := Mine(context.Background(), scopedCorpus(true), Options{MinPhraseCount: 3})
	if err != nil {
		t.Fatal(err)
	}
	insider := access.Viewer{Groups: []string{"hr"}}
	id, ok := tb.LookupFor(insider, "salary")
	if !ok {
		t.Fatal("salary not in the table")
	}
	in := tb.Neighbours(insider, id, MeasureLLR, 10)
	if !slices.ContainsFunc(in, func(n Neighbour) bool { return n.Scope == "hr" }) {
		t.Fatalf("the insider's neighbours of salary draw on no hr document: %+v", in)
	}
	for round := range 2 {
		out := tb.Neighbours(access.Anonymous, id, MeasureLLR, 10)
		for _, n := range out {
			if n.Scope != "" || n.Term == "zyxcanary" {
				t.Errorf("round %d: an outsider got %+v", round, n)
			}
		}
		again := tb.Neighbours(insider, id, MeasureLLR, 10)
		if !reflect.DeepEqual(again, in) {
			t.Errorf("round %d: the cached insider list differs from the first", round)
		}
		if fresh := neighboursRef(tb, tb.viewerScopes(insider), id, MeasureLLR, 10); !reflect.DeepEqual(again, fresh) {
			t.Errorf("round %d: cached list differs from a fresh build", round)
		}
		again[0].Term = "changed by a caller"
		in = tb.Neighbours(insider, id, MeasureLLR, 10)
		if in[0].Term == "changed by a caller" {
			t.Fatal("a caller's change reached the cache")
		}
	}
}

// neighboursRef is the straightforward build of a Neighbours list (every
// entry materialised, then sorted and cut), the reference the cached,
// reference-based build must agree with.
func neighboursRef(t *Table, scopes []int, id uint32, measure Measure, k int) []Neighbour {
	var out []Neighbour
	at := map[uint32]int{}
	for _, s := range scopes {
		st := t.scopes[s]
		if st.df[id] == 0 {
			continue
		}
		sp := st.entries(id)
		for i := range sp.n {
			src, e := sp.at(i)
			nb := t.neighbour(st, src, id, e, measure)
			if i, ok := at[nb.ID]; ok {
				if nb.Score > out[i].Score {
					out[i] = nb
				}
				continue
			}
			at[nb.ID] = len(out)
			out = append(out, nb)
		}
	}
	slices.SortFunc(out, func(a, b Neighbour) int {
		if c := cmp.Compare(b.Score, a.Score); c != 0 {
			return c
		}
		return strings.Compare(a.Term, b.Term)
	})
	if k > 0 && len(out) > k {
		out = out[:k]
	}
	return out
}

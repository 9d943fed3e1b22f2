package suggest

import (
	"encoding/json"
	"errors"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"kinword/internal/access"
	"kinword/internal/prf"
	"kinword/internal/rank"
)

var insider = access.Viewer{Department: "field-operations", Groups: []string{"ops-security"}}

// restrictedDocs returns the documents of group ops-security.
func restrictedDocs(f *fakeCorpus) []Hit {
	var out []Hit
	for d, doc := range f.docs {
		if len(doc.groups) > 0 {
			out = append(out, Hit{Doc: uint32(d), Score: 100 - float64(d)/1000})
		}
	}
	return out
}

// TestCanaryNeverSuggestedToOutsider plants "zephyrine" in eight documents
// of group ops-security only, all about valves. An outsider asking about
// valves must never see it, by the feedback path (even when given the
// restricted documents as feedback, or open ones only) or by the
// association and phrase paths; an insider must (so the check can fail).
func TestCanaryNeverSuggestedToOutsider(t *testing.T) {
	f := utilityCorpus()
	tbl := f.table(t)
	for _, model := range []string{"rm3", "mixture", "rocchio"} {
		e, err := New(tbl, Options{Model: model, MinShare: -1})
		if err != nil {
			t.Fatal(err)
		}
		outside, inside := f.view(access.Anonymous), f.view(insider)
		cases := []struct {
			name     string
			view     *fakeView
			viewer   access.Viewer
			feedback []Hit
			want     bool
		}{
			{"outsider, open feedback", outside, access.Anonymous, outside.rank("valve", 10), false},
			{"outsider, restricted documents passed as feedback", outside, access.Anonymous, restrictedDocs(f), false},
			{"outsider, no feedback (association only)", outside, access.Anonymous, nil, false},
			{"outsider's department, no group", f.view(access.Viewer{Department: "field-operations"}),
				access.Viewer{Department: "field-operations"}, outside.rank("valve", 10), false},
			{"insider, restricted feedback", inside, insider, restrictedDocs(f), true},
			{"insider, no feedback (association only)", inside, insider, nil, true},
		}
		for _, c := range cases {
			t.Run(model+"/"+c.name, func(t *testing.T) {
				req := Request{Query: []QueryTerm{{key("valve"), 1}}, Viewer: c.viewer, Feedback: c.feedback, K: 1000}
				got := e.Suggest(c.view, req)
				found := slices.ContainsFunc(got, func(s Suggestion) bool { return s.Term == key(canary) || s.Display == canary })
				if found != c.want {
					t.Errorf("canary suggested = %v, want %v (got %v)", found, c.want, Keys(got))
				}
				auto := e.AutoExpand(c.view, req)
				if slices.ContainsFunc(auto, func(q QueryTerm) bool { return q.Key == key(canary) }) && !c.want {
					t.Errorf("canary in automatic expansion %v", auto)
				}
			})
		}
	}
}

// TestDeterministic repeats a request with the feedback hits shuffled
// (distinct scores, so the same documents are used) and expects
// byte-identical JSON.
func TestDeterministic(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	e, err := New(f.table(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{"valve", "leak", "pump", "invoice"} {
		hits := v.rank(q, 10)
		req := Request{Query: []QueryTerm{{key(q), 1}}, Feedback: hits}
		first, _ := json.Marshal(e.Suggest(v, req))
		r := rand.New(rand.NewPCG(5, 6))
		for range 20 {
			h := slices.Clone(hits)
			r.Shuffle(len(h), func(i, j int) { h[i], h[j] = h[j], h[i] })
			req.Feedback = h
			if got, _ := json.Marshal(e.Suggest(v, req)); string(got) != string(first) {
				t.Fatalf("%s: output changed with feedback order:\n%s\n%s", q, first, got)
			}
		}
	}
}

// TestSuggestionShape checks keys, displays, sources and evidence of a
// plain request on the test collection.
func TestSuggestionShape(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	e, err := New(f.table(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	got := e.Suggest(v, Request{Query: []QueryTerm{{key("leak"), 1}}, Feedback: v.rank("leak", 10)})
	if len(got) == 0 || len(got) > DefaultK {
		t.Fatalf("got %d suggestions, want 1..%d: %v", len(got), DefaultK, Keys(got))
	}
	byKey := map[string]Suggestion{}
	for _, s := range got {
		byKey[s.Term] = s
		if s.Display == "" || s.Score <= 0 || len(s.Evidence.Sources) == 0 || len(s.Evidence.Parts) != numParts {
			t.Errorf("incomplete suggestion %+v", s)
		}
	}
	mb, ok := byKey["main break"]
	if !ok {
		t.Fatalf("phrase \"main break\" missing from %v", Keys(got))
	}
	if !slices.Contains(mb.Evidence.Sources, "phrase") || mb.Evidence.FeedbackDocs == 0 || mb.Evidence.Parts["phrase"] != 1 {
		t.Errorf("main break evidence %+v", mb.Evidence)
	}
	// "main" and "break" occur only inside "main break": not offered beside it.
	for _, part := range []string{"main", "break"} {
		if _, ok := byKey[part]; ok {
			t.Errorf("part %q offered beside its phrase: %v", part, Keys(got))
		}
	}
	if s, ok := byKey[key("leakage")]; !ok || s.Display != "leakage" {
		t.Errorf("leakage missing or shown as a stem: %+v", s)
	}
	for _, s := range got {
		if slices.Contains(s.Evidence.Sources, "association") && (s.Evidence.LLR <= 0 || s.Evidence.BestPair != "leak") {
			t.Errorf("%s: association evidence %+v", s.Term, s.Evidence)
		}
	}
}

// TestMergedSources: a term proposed by both feedback and association is
// one suggestion carrying both sources.
func TestMergedSources(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	e, err := New(f.table(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	got := e.Suggest(v, Request{Query: []QueryTerm{{key("valve"), 1}}, Feedback: v.rank("valve", 10), K: 20})
	n := 0
	for _, s := range got {
		if s.Term == key(bursty) {
			n++
			if !slices.Equal(s.Evidence.Sources, []string{"feedback", "association"}) {
				t.Errorf("sources %v, want feedback and association", s.Evidence.Sources)
			}
		}
	}
	if n != 1 {
		t.Errorf("%q appears %d times in %v, want once", key(bursty), n, Keys(got))
	}
}

func TestNewRejectsBadOptions(t *testing.T) {
	cases := []struct {
		name string
		opt  Options
		want error
	}{
		{"unknown model", Options{Model: "bm25"}, ErrUnknownModel},
		{"lambda above 1", Options{Lambda: 1.5}, ErrBadOptions},
		{"NaN weight", Options{AssocWeight: nan()}, ErrBadOptions},
		{"prf option", Options{RM3: prf.RM3Options{OrigWeight: 2}}, prf.ErrBadOptions},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if _, err := New(nil, c.opt); !errors.Is(err, c.want) {
				t.Errorf("New error %v, want %v", err, c.want)
			}
		})
	}
	e, err := New(nil, Options{Model: " Mixture "})
	if err != nil || e.Options().Model != "mixture" || e.Options().Lambda != DefaultLambda {
		t.Errorf("defaults not filled: %+v, %v", e.Options(), err)
	}
}

func nan() float64 { z := 0.0; return z / z }

// TestOptionsBM25: the search's BM25 parameters reach Rocchio's document
// weights, in the rocchio model and the blend, unless those set their own.
func TestOptionsBM25(t *testing.T) {
	search, own := rank.BM25{K1: 0.9, B: 0.4}, rank.BM25{K1: 2, B: 0.5}
	cases := []struct {
		name                string
		opt                 Options
		wantRocchio, wantBl rank.BM25
	}{
		{"search's parameters", Options{BM25: search}, search, search},
		{"own parameters kept", Options{BM25: search, Rocchio: prf.RocchioOptions{BM25: own}, Blend: prf.BlendOptions{BM25: own}}, own, own},
		{"none: zero (k1 1.2, b 0.75 in prf)", Options{}, rank.BM25{}, rank.BM25{}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e, err := New(nil, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			if got := e.Options(); got.Rocchio.BM25 != c.wantRocchio || got.Blend.BM25 != c.wantBl {
				t.Errorf("Rocchio %+v, Blend %+v; want %+v, %+v", got.Rocchio.BM25, got.Blend.BM25, c.wantRocchio, c.wantBl)
			}
		})
	}
}

// TestEmptyRequest: no query, or no usable weight, gives no suggestions.
func TestEmptyRequest(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	e, _ := New(f.table(t), Options{})
	for _, q := range [][]QueryTerm{nil, {{"", 1}}, {{"valv", 0}}, {{"valv", -1}}} {
		if got := e.Suggest(v, Request{Query: q, Feedback: v.rank("valve", 10)}); len(got) != 0 {
			t.Errorf("query %v: got %v", q, Keys(got))
		}
	}
}

// TestConcurrent runs requests of two viewers in parallel on one engine
// (run with -race) and expects each to match its sequential result.
func TestConcurrent(t *testing.T) {
	f := utilityCorpus()
	e, err := New(f.table(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	type job struct {
		view *fakeView
		req  Request
		want string
	}
	var jobs []job
	for _, vw := range []access.Viewer{access.Anonymous, insider} {
		v := f.view(vw)
		for _, q := range []string{"valve", "leak", "pump"} {
			req := Request{Query: []QueryTerm{{key(q), 1}}, Viewer: vw, Feedback: v.rank(q, 10)}
			b, _ := json.Marshal(e.Suggest(v, req))
			jobs = append(jobs, job{v, req, string(b)})
		}
	}
	var wg sync.WaitGroup
	for g := range 4 {
		wg.Go(func() {
			for i := range 20 {
				j := jobs[(g+i)%len(jobs)]
				if b, _ := json.Marshal(e.Suggest(j.view, j.req)); string(b) != j.want {
					t.Errorf("concurrent result differs for %v", j.req.Query)
				}
			}
		})
	}
	wg.Wait()
}

// TestCanaryGuards checks each guard of the canary test on its own, so
// that one failing is seen even while the others still hold: unreadable
// feedback documents are dropped, the association and phrase paths never
// propose the canary to an outsider, and the outsider's statistics reject
// it.
func TestCanaryGuards(t *testing.T) {
	f := utilityCorpus()
	e, err := New(f.table(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name   string
		viewer access.Viewer
		want   bool
	}{{"outsider", access.Anonymous, false}, {"insider", insider, true}} {
		t.Run(c.name, func(t *testing.T) {
			v := f.view(c.viewer)
			r := e.prepare(v, Request{Query: []QueryTerm{{key("valve"), 1}}, Viewer: c.viewer, Feedback: restrictedDocs(f)})
			if got := len(r.docs) > 0; got != c.want {
				t.Errorf("restricted feedback documents kept: %v, want %v", got, c.want)
			}
			r.associationCandidates()
			r.queryPhraseCandidates()
			if _, got := r.cands[key(canary)]; got != c.want {
				t.Errorf("canary proposed by the table: %v, want %v", got, c.want)
			}
			cd := &cand{key: key(canary), words: []string{key(canary)}}
			if got := e.reject(r, cd) == ""; got != c.want {
				t.Errorf("canary passes the filters: %v, want %v", got, c.want)
			}
		})
	}
}

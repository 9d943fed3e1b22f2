package index

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/doc"
	"kinword/internal/rank"
	"kinword/internal/text"
)

var smallCorpus = []doc.Document{
	{ID: "a", Title: "Main break response", Body: "Crews isolate the valve after a main break. The main is repaired and the road reinstated."},
	{ID: "b", Title: "Valve exercising", Body: "Every valve in the district is exercised yearly. Valve records live in the asset register."},
	{ID: "c", Title: "Annual leave", Body: "Annual leave requests go to your line manager. Leave carries over up to five days."},
	{ID: "d", Title: "Burst pipe advice for customers", Body: "If you see a burst pipe in the street, call us: our crews treat it as a main break."},
	{ID: "e", Title: "Restricted: Kestrelmoor review", Body: "The Kestrelmoor valve programme is confidential to the executive.", Groups: []string{"executive"}},
	{ID: "f", Title: "Leave and main duty rota", Body: "Main duty rota during annual leave periods, main break standby."},
}

func openTest(t testing.TB, docs []doc.Document) *Index {
	t.Helper()
	p, err := text.NewPipeline("")
	if err != nil {
		t.Fatal(err)
	}
	ix, err := Open(context.Background(), t.TempDir(), Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { ix.Close() })
	if err := ix.Put(context.Background(), docs); err != nil {
		t.Fatal(err)
	}
	if err := ix.Commit(context.Background()); err != nil {
		t.Fatal(err)
	}
	return ix
}

// textbookBM25 scores every readable document independently of the index:
// it re-analyses the documents, counts tf, df, N and the mean length itself
// and applies Robertson & Zaragoza (2009), eq. 3.15 with idf
// ln(1 + (N - n + 0.5)/(n + 0.5)), written out here rather than calling the
// rank package, with no coordination factor.
func textbookBM25(p *text.Pipeline, docs []doc.Document, v access.Viewer, q map[string]float64, k1, b float64) map[string]float64 {
	tfs := map[string]map[string]float64{}
	lens := map[string]float64{}
	df := map[string]float64{}
	total := 0.0
	for _, d := range docs {
		if !v.CanRead(d.Groups) {
			continue
		}
		terms := p.Terms(d.Title+"\n\n"+d.Body, "")
		tfs[d.ID] = map[string]float64{}
		for _, t := range terms {
			tfs[d.ID][t]++
		}
		for t := range tfs[d.ID] {
			df[t]++
		}
		lens[d.ID] = float64(len(terms))
		total += float64(len(terms))
	}
	N := float64(len(tfs))
	avg := total / N
	out := map[string]float64{}
	for id, tf := range tfs {
		s := 0.0
		for t, w := range q {
			if tf[t] == 0 {
				continue
			}
			idf := math.Log(1 + (N-df[t]+0.5)/(df[t]+0.5))
			s += w * idf * tf[t] * (k1 + 1) / (tf[t] + k1*(1-b+b*lens[id]/avg))
		}
		if s > 0 {
			out[id] = s
		}
	}
	return out
}

func TestSearchEqualsTextbookBM25(t *testing.T) {
	ix := openTest(t, smallCorpus)
	cases := []struct {
		name   string
		viewer access.Viewer
		query  map[string]float64
		params rank.BM25
	}{
		{"two terms, open viewer", access.Anonymous, map[string]float64{"main": 1, "break": 1}, rank.DefaultBM25},
		{"weighted expansion term", access.Anonymous, map[string]float64{"valv": 1, "main": 0.3}, rank.DefaultBM25},
		{"executive sees restricted stats", access.Viewer{Groups: []string{"executive"}}, map[string]float64{"valv": 1}, rank.DefaultBM25},
		{"other parameters", access.Anonymous, map[string]float64{"leav": 2, "annual": 1}, rank.BM25{K1: 2.0, B: 0.3}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var q []QueryTerm
			for k, w := range c.query {
				q = append(q, QueryTerm{Key: k, Weight: w})
			}
			sort.Slice(q, func(i, j int) bool { return q[i].Key < q[j].Key })
			res, err := ix.View(c.viewer).Search(context.Background(), q, c.params, 100)
			if err != nil {
				t.Fatal(err)
			}
			want := textbookBM25(ix.Pipeline(), smallCorpus, c.viewer, c.query, c.params.K1, c.params.B)
			if len(res.Hits) != len(want) || res.Total != len(want) {
				t.Fatalf("got %d hits (total %d), want %d", len(res.Hits), res.Total, len(want))
			}
			for i, h := range res.Hits {
				if math.Abs(h.Score-want[h.ID]) > 1e-9 {
					t.Errorf("%s: score %.9f, textbook %.9f", h.ID, h.Score, want[h.ID])
				}
				if i > 0 && res.Hits[i-1].Score < h.Score {
					t.Errorf("not ranked by score at %d", i)
				}
			}
		})
	}
}

func TestAccessControlInsideQuery(t *testing.T) {
	ix := openTest(t, smallCorpus)
	q, err := ParseQuery(ix.Pipeline(), "kestrelmoor valve", QueryLimits{})
	if err != nil {
		t.Fatal(err)
	}
	out := ix.View(access.Viewer{Department: "field-operations", Groups: []string{"staff"}})
	res, _ := out.Search(context.Background(), q, rank.DefaultBM25, 10)
	for _, h := range res.Hits {
		if h.ID == "e" {
			t.Fatal("restricted document matched for an outsider")
		}
	}
	if id, ok := out.TermID("kestrelmoor"); !ok || out.DF(id) != 0 || out.CF(id) != 0 || out.KeyDF("kestrelmoor") != 0 {
		t.Errorf("outsider sees a count for the canary term")
	}
	if out.N() != 5 {
		t.Errorf("outsider N = %d, want 5", out.N())
	}
	if _, ok := out.DocNum("e"); ok {
		t.Error("outsider can resolve the restricted document")
	}
	if got := out.Display("kestrelmoor"); got != "kestrelmoor" {
		t.Errorf("display drew on restricted surfaces: %q", got)
	}
	in := ix.View(access.Viewer{Groups: []string{"executive"}})
	res, _ = in.Search(context.Background(), q, rank.DefaultBM25, 10)
	if len(res.Hits) == 0 || res.Hits[0].ID != "e" {
		t.Errorf("insider does not find the restricted document first: %+v", res.Hits)
	}
	if in.N() != 6 {
		t.Errorf("insider N = %d", in.N())
	}
}

func TestPhraseQuery(t *testing.T) {
	ix := openTest(t, smallCorpus)
	q, _ := ParseQuery(ix.Pipeline(), `"main break"`, QueryLimits{})
	if len(q) != 1 || q[0].Key != "main break" {
		t.Fatalf("parsed %+v", q)
	}
	res, _ := ix.View(access.Anonymous).Search(context.Background(), q, rank.DefaultBM25, 10)
	got := map[string]bool{}
	for _, h := range res.Hits {
		got[h.ID] = true
	}
	// a, d and f contain "main break" as consecutive words; b and c do not.
	if !got["a"] || !got["d"] || !got["f"] || got["b"] || got["c"] || len(got) != 3 {
		t.Errorf("phrase hits %v", got)
	}
}

func TestPersistenceAndRecovery(t *testing.T) {
	p, _ := text.NewPipeline("")
	dir := t.TempDir()
	ctx := context.Background()
	ix, err := Open(ctx, dir, Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	if err := ix.Put(ctx, smallCorpus[:3]); err != nil {
		t.Fatal(err)
	}
	if err := ix.Commit(ctx); err != nil {
		t.Fatal(err)
	}
	// Writes without a commit (a crash between bleve and the forward
	// store): the next Open must rebuild the forward store from bleve.
	if err := ix.Put(ctx, smallCorpus[3:]); err != nil {
		t.Fatal(err)
	}
	ix.Close()
	ix, err = Open(ctx, dir, Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	if ix.Len() != len(smallCorpus) {
		t.Fatalf("after recovery %d docs, want %d", ix.Len(), len(smallCorpus))
	}
	ents, _ := ix.Entries(ctx)
	if len(ents) != len(smallCorpus) {
		t.Errorf("entries %d", len(ents))
	}
	ix.Close()
	// A corrupt forward file is rebuilt too.
	fp := filepath.Join(dir, "forward.kwf")
	b, _ := os.ReadFile(fp)
	b[len(b)/2] ^= 0xff
	os.WriteFile(fp, b, 0o644)
	ix, err = Open(ctx, dir, Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	defer ix.Close()
	if ix.Len() != len(smallCorpus) {
		t.Fatalf("after corrupt-file recovery %d docs", ix.Len())
	}
	if err := ix.Delete(ctx, []string{"a", "zzz"}); err != nil {
		t.Fatal(err)
	}
	ix.Commit(ctx)
	if ix.Len() != len(smallCorpus)-1 {
		t.Errorf("after delete %d docs", ix.Len())
	}
}

func TestSnippet(t *testing.T) {
	p, _ := text.NewPipeline("")
	body := "Intro words here. Later on, crews isolate the valve after a main break and reinstate the road surface quickly."
	q, _ := ParseQuery(p, "main break valve", QueryLimits{})
	s := MakeSnippet(p, body, "", q, 10)
	got := s.Render("[", "]")
	for _, w := range []string{"[valve]", "[main]", "[break]"} {
		if !strings.Contains(got, w) {
			t.Errorf("snippet %q lacks %s", got, w)
		}
	}
}

func TestParseQueryErrors(t *testing.T) {
	p, _ := text.NewPipeline("")
	cases := []struct{ name, q string }{
		{"only stopwords", "the of and"},
		{"empty", ""},
		{"invalid utf8", "\xff\xfe"},
		{"too long", string(make([]byte, 600))},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if _, err := ParseQuery(p, c.q, QueryLimits{}); err == nil {
				t.Errorf("accepted %q", c.q)
			}
		})
	}
}

// TestOpenHeldFolderFailsFast: a second opener of a held index (another
// serve or ingest on the same data folder) gets ErrInUse within LockWait
// instead of waiting on the lock forever; once the holder closes, the
// folder opens again.
func TestOpenHeldFolderFailsFast(t *testing.T) {
	p, _ := text.NewPipeline("")
	dir := t.TempDir()
	ctx := context.Background()
	first, err := Open(ctx, dir, Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	first.Commit(ctx)
	done := make(chan error, 1)
	go func() {
		ix, err := Open(ctx, dir, Options{Pipeline: p, LockWait: 100 * time.Millisecond})
		if err == nil {
			ix.Close()
		}
		done <- err
	}()
	select {
	case err := <-done:
		if !errors.Is(err, ErrInUse) {
			t.Fatalf("second open: %v, want ErrInUse", err)
		}
		if !strings.Contains(err.Error(), dir) {
			t.Errorf("error %q does not name the folder", err)
		}
	case <-time.After(time.Minute): // a hang, not a timing check
		t.Fatal("second open still waiting after a minute")
	}
	first.Close()
	again, err := Open(ctx, dir, Options{Pipeline: p, LockWait: 100 * time.Millisecond})
	if err != nil {
		t.Fatalf("open after release: %v", err)
	}
	again.Close()
}

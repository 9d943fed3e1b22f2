package finder

import (
	"context"
	"slices"
	"testing"

	"kinword/internal/access"
	"kinword/internal/doc"
	"kinword/internal/text"
)

// autoDocs: the searcher's word "burst" and the house words "main break"
// travel together in the open documents; "w4" says only "main break"
// (found only once the query is expanded); "r1", readable by the
// network-security group alone, pairs "burst" with a confidential word.
var autoDocs = []doc.Document{
	{ID: "w1", Title: "Burst main", Body: "A burst main is a main break; crews isolate the valves around the main break."},
	{ID: "w2", Title: "Burst pipe in the street", Body: "Report a burst pipe: the main break team isolates valves."},
	{ID: "w3", Title: "Burst service pipe", Body: "A burst service pipe is not a main break; the customer calls a plumber."},
	{ID: "w4", Title: "Main break procedure", Body: "Main break crews close valves, flush, and sample after every main break."},
	{ID: "m1", Title: "Meter reading", Body: "Meter readers log consumption monthly."},
	{ID: "m2", Title: "Hydrant painting", Body: "Hydrants are painted by flow class."},
	{ID: "r1", Title: "Incident Quillmere", Body: "Burst of traffic during incident Quillmere; Quillmere Quillmere.", Groups: []string{"network-security"}},
}

func TestAutoExpand(t *testing.T) {
	p, _ := text.NewPipeline("")
	ctx := context.Background()
	open := func(auto bool) *Finder {
		// One folder each: an index folder is opened by one finder at a
		// time (its lock).
		f, err := Open(ctx, writeDataDir(t, autoDocs), p, Options{AutoExpand: auto, CacheTTL: -1})
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { f.Close() })
		return f
	}
	on, off := open(true), open(false)
	security := access.Viewer{Groups: []string{"network-security"}}
	cases := []struct {
		name      string
		f         *Finder
		req       Request
		expanded  bool
		wantIDs   []string // must be among the results
		forbidden string   // no expansion term may read as this
		want      string   // an expansion term that must be there
	}{
		{"off: plain search", off, Request{Query: "burst", Viewer: access.Anonymous, WithResults: true}, false, []string{"w1", "w2", "w3"}, "", ""},
		{"on: the house words join the query", on, Request{Query: "burst", Viewer: access.Anonymous, WithResults: true}, true, []string{"w1", "w2", "w3", "w4"}, "quillmere", "break"},
		{"on: accepted terms are the searcher's choice", on, Request{Query: "burst", Accepted: []string{"valv"}, Viewer: access.Anonymous, WithResults: true}, false, nil, "", ""},
		{"on: a group member's feedback may use the group's document", on, Request{Query: "burst", Viewer: security, WithResults: true}, true, []string{"w4"}, "", "quillmere"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := c.f.Search(ctx, c.req)
			if err != nil {
				t.Fatal(err)
			}
			if got := len(r.Expanded) > 0; got != c.expanded {
				t.Fatalf("expanded %v, want %v: %+v", r.Expanded, c.expanded, r.Expanded)
			}
			for _, id := range c.wantIDs {
				if !slices.Contains(ids(r), id) {
					t.Errorf("%s not among the results %v (expanded %+v)", id, ids(r), r.Expanded)
				}
			}
			found := c.want == ""
			for i, x := range r.Expanded {
				found = found || x.Term == p.Key(c.want, "")
				if x.Display == "" || x.Weight <= 0 || x.Weight > 1 {
					t.Errorf("expansion %+v: want a display form and a weight in (0, 1]", x)
				}
				if i > 0 && x.Weight > r.Expanded[i-1].Weight {
					t.Errorf("expansions not heaviest first: %+v", r.Expanded)
				}
				if c.forbidden != "" && x.Term == p.Key(c.forbidden, "") {
					t.Errorf("expansion %q comes from a document the viewer may not read", x.Display)
				}
			}
			if !found {
				t.Errorf("no expansion %q in %+v", c.want, r.Expanded)
			}
		})
	}
}

// TestRequestAcceptWeight: a request's AcceptWeight overrides the
// configured weight of its accepted terms. "w4" holds the accepted phrase
// and none of the typed words, so its BM25 score is the phrase's alone and
// scales with the weight: 1.0 against the default 0.3 multiplies it by
// 1/0.3. (A weighted query's BM25 score is the weighted sum of its terms'
// scores: Robertson & Zaragoza 2009, section 3, from memory.)
func TestRequestAcceptWeight(t *testing.T) {
	p, _ := text.NewPipeline("")
	ctx := context.Background()
	f, err := Open(ctx, writeDataDir(t, autoDocs), p, Options{CacheTTL: -1})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	score := func(w float64) float64 {
		t.Helper()
		r, err := f.Search(ctx, Request{Query: "burst", Accepted: []string{"main break"}, Viewer: access.Anonymous, WithResults: true, AcceptWeight: w})
		if err != nil {
			t.Fatal(err)
		}
		for _, x := range r.Results {
			if x.ID == "w4" {
				return x.Score
			}
		}
		t.Fatalf("weight %g: w4 not found in %v", w, r.Results)
		return 0
	}
	def, full := score(0), score(1)
	if ratio := full / def; ratio < 3.333 || ratio > 3.334 {
		t.Errorf("w4 scores %.4f at the configured weight and %.4f at 1: ratio %.4f, want 1/0.3", def, full, ratio)
	}
}

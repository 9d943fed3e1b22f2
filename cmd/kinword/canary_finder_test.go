package main

import (
	"context"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/curate"
	"kinword/internal/finder"
	"kinword/internal/prefs"
)

// TestFinderCanariesAcrossPaths is the canary suite over the search
// service itself, every path that can show a searcher text or a number:
// results, titles, snippets, hit counts, suggestions from feedback and the
// association table, the learned ranking (insiders of the canary's group
// accepted the canary and clicked its documents in the same department the
// outsider searches from, so learning and snippet evidence both favour
// it), librarian pins, relates and refinements naming the canary, and the
// visibility check the librarian's and admin's desks filter by.
// Zero leaks is the only passing figure.
func TestFinderCanariesAcrossPaths(t *testing.T) {
	ctx := context.Background()
	f, p := demoFinder(t)
	canaries := readTSV(t, filepath.Join("..", "..", "testdata", "tarnwick", "canaries.tsv"))
	topics := readTSV(t, filepath.Join("..", "..", "testdata", "tarnwick", "topics.tsv"))
	const dept = "people-culture"
	now := time.Now().UTC()
	b := prefs.NewBuilder(prefs.Options{ExploreShare: -1})
	var rules []curate.Rule
	queries := []string{}
	for _, tp := range topics {
		queries = append(queries, tp[2])
	}
	for ci, c := range canaries {
		term, group := c[0], c[1]
		insider := access.Viewer{Department: dept, Groups: []string{group}}.Normalize()
		in, err := f.Search(ctx, finder.Request{Query: term, Viewer: insider, WithResults: true})
		if err != nil || in.Total == 0 {
			t.Fatalf("insider of %s cannot find canary %q (%v): the suite would prove nothing", group, term, err)
		}
		for _, q := range []string{term, term + " project", "budget", "policy"} {
			queries = append(queries, q)
			qkey := f.CanonicalQuery(q)
			stems, err := f.SnippetStems(ctx, in.Results[0].ID, qkey, nil)
			if err != nil {
				t.Fatal(err)
			}
			key := p.Key(term, "")
			for s := range 12 {
				sess := fmt.Sprintf("c%d-%s-%d", ci, q, s)
				b.Add(prefs.Event{Kind: prefs.KindImpression, Time: now, Session: sess, Department: dept, Query: qkey, Shown: []string{key}})
				b.Add(prefs.Event{Kind: prefs.KindAccept, Time: now, Session: sess, Department: dept, Query: qkey, Term: key})
				b.AddSnippet(prefs.SnippetClick{Time: now, Session: sess, Department: dept, Query: qkey, Doc: in.Results[0].ID, Stems: stems})
			}
		}
		for i, kind := range []curate.Kind{curate.Pin, curate.Relate, curate.Narrower} {
			rules = append(rules, curate.Rule{ID: fmt.Sprintf("c%d-%d", ci, i), Kind: kind, Query: "policy", Term: term})
		}
	}
	f.SetModel(b.Snapshot(now))
	set, err := curate.Compile(rules, p)
	if err != nil {
		t.Fatal(err)
	}
	f.SetRules(set)
	checked, leaks, positive := 0, 0, 0
	for _, c := range canaries {
		term, group := strings.ToLower(c[0]), c[1]
		stem := p.Stem(term, "")
		// Positive control: an insider of the department is offered the
		// canary for "policy" (pinned) or finds it in results.
		insider := access.Viewer{Department: dept, Groups: []string{group}}.Normalize()
		if r, _ := f.Search(ctx, finder.Request{Query: "policy", Viewer: insider}); strings.Contains(strings.ToLower(fmt.Sprint(r.Suggestions)), term) {
			positive++
		}
		// The desks (review, rule preview) show a term only if the caller
		// may read a document holding it.
		if !f.Visible(insider, p.Key(term, "")) {
			t.Errorf("%s: insider cannot see canary %q on the desks", group, term)
		}
		for _, v := range []access.Viewer{{Department: dept}, access.Anonymous, {Department: "field-operations"}} {
			v = v.Normalize()
			if f.Visible(v, p.Key(term, "")) || f.Visible(v, p.Key(term+" project", "")) {
				t.Errorf("%s: viewer %s would see canary %q on the desks", group, v, term)
				leaks++
			}
			for _, q := range queries {
				res, err := f.Search(ctx, finder.Request{Query: q, Viewer: v, WithResults: true})
				if err != nil {
					continue // no searchable words
				}
				checked++
				if q == c[0] && res.Total != 0 {
					t.Errorf("%s: viewer %s gets %d hits for canary %q", group, v, res.Total, term)
					leaks++
				}
				var seen []string
				for _, r := range res.Results {
					seen = append(seen, r.Title, r.Snippet, r.URL, r.ID)
				}
				for _, s := range res.Suggestions {
					seen = append(seen, s.Term, s.Display, strings.Join(s.Evidence.Neighbours, " "), s.Evidence.BestPair)
				}
				for _, s := range seen {
					low := strings.ToLower(s)
					if strings.Contains(low, term) || (len(stem) > 5 && strings.Contains(low, stem)) {
						t.Errorf("%s: viewer %s, query %q: canary %q leaked in %q", group, v, q, term, s)
						leaks++
					}
				}
			}
		}
	}
	t.Logf("finder canary suite: %d canaries, %d query x viewer checks, %d leaks, %d positive controls", len(canaries), checked, leaks, positive)
	if positive == 0 {
		t.Fatal("no insider was offered a pinned canary: the rules path is not exercised")
	}
}

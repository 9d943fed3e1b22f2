package main

import (
	"context"
	"fmt"
	"slices"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/finder"
	"kinword/internal/prefs"
)

// TestClickedSnippetsJoinTheEvidence: result clicks teach through the
// snippet the searcher saw. After five sessions of one department clicked
// the same result for a query, the terms of that result's snippet join the
// department's suggestion pool with the source "clicks" (and only terms the
// snippet shows: none from the rest of the document).
func TestClickedSnippetsJoinTheEvidence(t *testing.T) {
	ctx := context.Background()
	f, _ := demoFinder(t)
	const q, dept = "burst pipe", "field-operations"
	v := access.Viewer{Department: dept}.Normalize()
	first, err := f.Search(ctx, finder.Request{Query: q, Viewer: v, WithResults: true})
	if err != nil || len(first.Results) < 3 {
		t.Fatalf("search: %v, %d results", err, len(first.Results))
	}
	clicked := first.Results[2] // the third result, rank 2
	qkey := f.CanonicalQuery(q)
	stems, err := f.SnippetStems(ctx, clicked.ID, qkey, nil)
	if err != nil || len(stems) == 0 {
		t.Fatalf("snippet stems: %v %v", stems, err)
	}
	now := time.Now().UTC()
	b := prefs.NewBuilder(prefs.Options{ExploreShare: -1})
	for s := range 5 {
		b.AddSnippet(prefs.SnippetClick{Time: now, Session: fmt.Sprint("s", s), Department: dept, Query: qkey,
			Doc: clicked.ID, Rank: 2, Stems: stems})
	}
	f.SetModel(b.Snapshot(now))
	res, err := f.Search(ctx, finder.Request{Query: q, Viewer: v})
	if err != nil {
		t.Fatal(err)
	}
	var fromClicks []string
	for _, s := range res.Suggestions {
		if slices.Contains(s.Evidence.Sources, "clicks") {
			fromClicks = append(fromClicks, s.Term)
			if !slices.Contains(stems, s.Term) {
				t.Errorf("%q carries click evidence but is not in the clicked snippet %v", s.Term, stems)
			}
		}
	}
	if len(fromClicks) == 0 {
		t.Errorf("no suggestion carries the clicked snippet's evidence; snippet %v, offered %v", stems, offered(res.Suggestions))
	}
	// The snippet is what the page showed: its stems are the snippet text's.
	if got := clicked.Snippet; got == "" {
		t.Fatal("empty snippet")
	}
}

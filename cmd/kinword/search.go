package main

import (
	"context"
	"fmt"
	"strings"

	"kinword/internal/access"
	"kinword/internal/index"
)

func init() {
	register(&command{name: "search", summary: "search the index as a viewer and print ranked results with snippets",
		usage: `"QUERY" [--viewer dept=DEPT,groups=G1+G2] [--results N] [--json]`, run: runSearch})
}

type searchResult struct {
	Rank       int      `json:"rank"`
	ID         string   `json:"id"`
	Title      string   `json:"title"`
	URL        string   `json:"url,omitempty"`
	Department string   `json:"department,omitempty"`
	Score      float64  `json:"score"`
	Snippet    string   `json:"snippet"`
	Marks      [][2]int `json:"marks,omitempty"`
}

func runSearch(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("search", e.stderr)
	var viewer viewerFlag
	fs.Var(&viewer, "viewer", "who is searching: dept=DEPT,groups=G1+G2 (default anonymous: open documents only)")
	results := fs.Int("results", 0, "results to show (default search.results from the config)")
	pos, err := e.parse(fs, c, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("a query is required")
	}
	k := e.cfg.Search.Results
	if *results > 0 {
		k = *results
	}
	ix, err := e.openIndex(ctx)
	if err != nil {
		return err
	}
	defer ix.Close()
	q, err := index.ParseQuery(ix.Pipeline(), strings.Join(pos, " "), e.queryLimits())
	if err != nil {
		return usagef("%v", err)
	}
	view := ix.View(viewer.v)
	res, err := view.Search(ctx, q, e.bm25(), k)
	if err != nil {
		return err
	}
	out, err := renderHits(ctx, ix, view, q, res, e.cfg.Search.SnippetTokens)
	if err != nil {
		return err
	}
	if e.json {
		return e.printJSON(map[string]any{"query": strings.Join(pos, " "), "viewer": viewer.v, "total": res.Total, "results": out})
	}
	fmt.Fprintf(e.stdout, "%d matching documents for %s", res.Total, describeViewer(viewer.v))
	if len(out) < res.Total {
		fmt.Fprintf(e.stdout, "; top %d", len(out))
	}
	fmt.Fprintln(e.stdout)
	for _, r := range out {
		fmt.Fprintf(e.stdout, "\n%2d. %s  [%s]  %.3f\n    %s\n", r.Rank, r.Title, r.Department, r.Score, r.ID)
		sn := index.Snippet{Text: r.Snippet}
		for _, m := range r.Marks {
			sn.Marks = append(sn.Marks, index.Mark{Start: m[0], End: m[1]})
		}
		fmt.Fprintf(e.stdout, "    %s\n", sn.Render("[", "]"))
	}
	return nil
}

func describeViewer(v access.Viewer) string {
	if v.Department == "" && len(v.Groups) == 0 {
		return "an anonymous viewer (open documents only)"
	}
	return "viewer " + v.String()
}

// renderHits fetches stored fields for hits and makes snippets.
func renderHits(ctx context.Context, ix *index.Index, view *index.View, q []index.QueryTerm, res index.Result, width int) ([]searchResult, error) {
	nums := make([]uint32, len(res.Hits))
	for i, h := range res.Hits {
		nums[i] = h.Doc
	}
	docs, err := view.Stored(ctx, ix, nums)
	if err != nil {
		return nil, err
	}
	byID := make(map[string]int, len(docs))
	for i, d := range docs {
		byID[d.ID] = i
	}
	out := make([]searchResult, 0, len(docs))
	for _, h := range res.Hits {
		i, ok := byID[h.ID]
		if !ok {
			continue
		}
		d := docs[i]
		sn := index.MakeSnippet(ix.Pipeline(), d.Body, d.Language, q, width)
		r := searchResult{Rank: len(out) + 1, ID: d.ID, Title: d.Title, URL: d.URL, Department: d.Department, Score: h.Score, Snippet: sn.Text}
		for _, m := range sn.Marks {
			r.Marks = append(r.Marks, [2]int{m.Start, m.End})
		}
		out = append(out, r)
	}
	return out, nil
}

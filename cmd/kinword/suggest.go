package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"strings"

	"kinword/internal/assoc"
	"kinword/internal/index"
	"kinword/internal/suggest"
)

func init() {
	register(&command{name: "suggest", summary: "offer related terms for a query, from feedback over the viewer's own top results and the association table, with evidence",
		usage: `"QUERY" [--viewer dept=DEPT,groups=G1+G2] [--k N] [--model rm3|mixture|rocchio] [--json]`, run: runSuggest})
}

// loadTable loads the association table from the data folder; a missing
// table is not an error (suggestions then come from feedback alone).
func (e *env) loadTable() (*assoc.Table, error) {
	tbl, err := assoc.Load(e.tableFile())
	if errors.Is(err, os.ErrNotExist) {
		e.log.Warn("no association table; run kinword mine for association suggestions", "path", e.tableFile())
		return nil, nil
	}
	return tbl, err
}

func toSuggestQuery(q []index.QueryTerm) []suggest.QueryTerm {
	out := make([]suggest.QueryTerm, len(q))
	for i, t := range q {
		out[i] = suggest.QueryTerm{Key: t.Key, Weight: t.Weight}
	}
	return out
}

func toHits(res index.Result, n int) []suggest.Hit {
	var out []suggest.Hit
	for i, h := range res.Hits {
		if i == n {
			break
		}
		out = append(out, suggest.Hit{Doc: h.Doc, Score: h.Score})
	}
	return out
}

func runSuggest(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("suggest", e.stderr)
	var viewer viewerFlag
	fs.Var(&viewer, "viewer", "who is searching: dept=DEPT,groups=G1+G2 (default anonymous: open documents only)")
	k := fs.Int("k", 5, "suggestions to offer")
	model := fs.String("model", "rm3", "feedback model: rm3, mixture, blend or rocchio")
	pos, err := e.parse(fs, c, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("a query is required")
	}
	raw := strings.Join(pos, " ")
	ix, err := e.openIndex(ctx)
	if err != nil {
		return err
	}
	defer ix.Close()
	tbl, err := e.loadTable()
	if err != nil {
		return err
	}
	eng, err := suggest.New(tbl, suggest.Options{Model: *model, K: *k})
	if err != nil {
		return usagef("%v", err)
	}
	q, err := index.ParseQuery(ix.Pipeline(), raw, e.queryLimits())
	if err != nil {
		return usagef("%v", err)
	}
	view := ix.View(viewer.v)
	res, err := view.Search(ctx, q, e.bm25(), 10)
	if err != nil {
		return err
	}
	sugs := eng.Suggest(view, suggest.Request{Query: toSuggestQuery(q), Viewer: viewer.v, Feedback: toHits(res, 10), K: *k})
	if e.json {
		if sugs == nil {
			sugs = []suggest.Suggestion{}
		}
		return e.printJSON(map[string]any{"query": raw, "viewer": viewer.v, "suggestions": sugs})
	}
	if len(sugs) == 0 {
		fmt.Fprintf(e.stdout, "no suggestions for %q (%d matching documents for %s)\n", raw, res.Total, describeViewer(viewer.v))
		return nil
	}
	fmt.Fprintf(e.stdout, "suggestions for %q as %s:\n", raw, describeViewer(viewer.v))
	for i, s := range sugs {
		ev := s.Evidence
		fmt.Fprintf(e.stdout, "%d. %-28s %.3f  from %s; in %d of the top %d results", i+1, s.Display, s.Score, strings.Join(ev.Sources, "+"), ev.FeedbackDocs, len(res.Hits))
		if len(ev.Neighbours) > 0 {
			fmt.Fprintf(e.stdout, "; related to %s (LLR %.1f)", strings.Join(ev.Neighbours, ", "), ev.LLR)
		}
		fmt.Fprintln(e.stdout)
	}
	fmt.Fprintln(e.stdout, "Suggestions are aids to search; safety procedures must be checked in the controlled copy.")
	return nil
}

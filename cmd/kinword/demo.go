package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"kinword/internal/access"
	"kinword/internal/index"
	"kinword/internal/suggest"
)

func init() {
	register(&command{name: "demo", summary: "ingest the demo intranet of the invented utility Tarnwick Water & Power and show searches by different viewers",
		usage: "[--corpus DIR] [--data DIR]", run: runDemo})
}

// demoSearches show vocabulary mismatch and access control side by side.
var demoSearches = []struct {
	query  string
	viewer string
}{
	{"burst pipe", "dept=field-operations"},
	{"expenses", "dept=finance-procurement"},
	{"restructuring consultation", "dept=people-culture"},
	{"restructuring consultation", "dept=people-culture,groups=people-confidential"},
}

func runDemo(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("demo", e.stderr)
	corpus := fs.String("corpus", filepath.Join("testdata", "tarnwick"), "demo corpus folder (with docs/ inside)")
	serve := fs.Bool("serve", false, "after ingesting and mining, serve the search page in demo mode")
	addr := fs.String("addr", "", "listen address with --serve (default server.addr, 127.0.0.1:7410)")
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	docs := filepath.Join(*corpus, "docs")
	if _, err := os.Stat(docs); err != nil {
		return usagef("demo corpus not found at %s (run from the repository root, or pass --corpus)", docs)
	}
	if c.data == "" {
		e.dataDir = filepath.Join(e.cfg.DataDir, "demo")
	}
	ix, err := e.openIndex(ctx)
	if err != nil {
		return err
	}
	defer ix.Close()
	sum, err := syncPaths(ctx, e, ix, []string{docs})
	if err != nil {
		return err
	}
	tbl, err := mineIndex(ctx, ix, e.dataDir)
	if err != nil {
		return err
	}
	if err := tbl.Write(e.tableFile()); err != nil {
		return err
	}
	eng, err := suggest.New(tbl, suggest.Options{})
	if err != nil {
		return err
	}
	fmt.Fprintf(e.stdout, "Tarnwick Water & Power demo intranet (invented organisation, demo data only)\n")
	fmt.Fprintf(e.stdout, "ingest: %s; %d documents in %s\n", sum.Line(), ix.Len(), e.dataDir)
	for _, s := range demoSearches {
		v, _ := access.ParseViewer(s.viewer)
		q, err := index.ParseQuery(ix.Pipeline(), s.query, e.queryLimits())
		if err != nil {
			return err
		}
		view := ix.View(v)
		res, err := view.Search(ctx, q, e.bm25(), 3)
		if err != nil {
			return err
		}
		out, err := renderHits(ctx, ix, view, q, res, 20)
		if err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "\nsearch %q as %s: %d matching\n", s.query, v, res.Total)
		for _, r := range out {
			fmt.Fprintf(e.stdout, "  %d. %s [%s] %.2f\n", r.Rank, r.Title, r.Department, r.Score)
		}
		full, err := view.Search(ctx, q, e.bm25(), 10)
		if err != nil {
			return err
		}
		var names []string
		for _, sg := range eng.Suggest(view, suggest.Request{Query: toSuggestQuery(q), Viewer: v, Feedback: toHits(full, 10)}) {
			names = append(names, sg.Display)
		}
		fmt.Fprintf(e.stdout, "  related terms: %s\n", strings.Join(names, " · "))
	}
	fmt.Fprintf(e.stdout, "\nnext: kinword search --data %s \"annual leave\" --viewer dept=people-culture\n", e.dataDir)
	fmt.Fprintf(e.stdout, "      kinword eval --collection %s\n", *corpus)
	fmt.Fprintln(e.stdout, "Suggestions are aids to search; safety procedures must be checked in the controlled copy.")
	if !*serve {
		fmt.Fprintln(e.stdout, "      kinword demo --serve   (the search page, with department personas)")
		return nil
	}
	ix.Close()
	if e.cfg.Review.JudgedDir == "" {
		e.cfg.Review.JudgedDir = *corpus // the admin's trials run on the demo's own topics
	}
	return e.serve(ctx, *addr, true)
}

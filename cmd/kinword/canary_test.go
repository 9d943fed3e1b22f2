package main

import (
	"bufio"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kinword/internal/access"
	"kinword/internal/assoc"
	"kinword/internal/index"
	"kinword/internal/rank"
	"kinword/internal/suggest"
	"kinword/internal/text"
)

// TestDemoCanariesNeverReachOutsiders is the canary suite over the demo
// intranet (testdata/tarnwick/canaries.tsv lists invented terms that occur
// only in one restricted group's documents). For viewers outside each group
// it runs every judged topic and every canary's own name as queries and
// checks results, snippets, hit counts, feedback and association
// suggestions, and the association table's neighbour lists. Zero leaks is
// the only passing figure.
func TestDemoCanariesNeverReachOutsiders(t *testing.T) {
	ctx := context.Background()
	corpus := filepath.Join("..", "..", "testdata", "tarnwick")
	canaries := readTSV(t, filepath.Join(corpus, "canaries.tsv"))
	topics := readTSV(t, filepath.Join(corpus, "topics.tsv"))
	p, _ := text.NewPipeline("")
	data := t.TempDir()
	code, _, errs := runCLI(t, "ingest", "--data", data, filepath.Join(corpus, "docs"))
	if code != 0 {
		t.Fatalf("ingest: %s", errs)
	}
	ix, err := index.Open(ctx, filepath.Join(data, "index"), index.Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	defer ix.Close()
	tbl, err := mineIndex(ctx, ix, data)
	if err != nil {
		t.Fatal(err)
	}
	eng, err := suggest.New(tbl, suggest.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var queries []string
	for _, tp := range topics {
		queries = append(queries, tp[2])
	}
	for _, c := range canaries {
		queries = append(queries, c[0], c[0]+" project")
	}
	checked, leaks := 0, 0
	for _, c := range canaries {
		term, group := strings.ToLower(c[0]), c[1]
		stem := p.Stem(term, "")
		// Positive control: an insider finds the canary, so the checks below
		// are not vacuous.
		in := ix.View(access.Viewer{Groups: []string{group}})
		if in.KeyDF(stem) == 0 {
			t.Fatalf("insider of %s cannot find canary %q: the suite would prove nothing", group, term)
		}
		for _, v := range outsiders(ix.Groups(), group) {
			view := ix.View(v)
			if id, ok := view.TermID(stem); ok && (view.DF(id) != 0 || view.CF(id) != 0) {
				t.Errorf("%s: viewer %s sees a count for canary %q", group, v, term)
				leaks++
			}
			for _, qs := range queries {
				q, err := index.ParseQuery(p, qs, index.QueryLimits{MaxBytes: 4096, MaxTerms: 256})
				if err != nil {
					continue
				}
				res, err := view.Search(ctx, q, rank.DefaultBM25, 10)
				if err != nil {
					t.Fatal(err)
				}
				out, err := renderHits(ctx, ix, view, q, res, 30)
				if err != nil {
					t.Fatal(err)
				}
				var seen []string
				for _, r := range out {
					seen = append(seen, r.Title, r.Snippet, r.URL, r.ID)
				}
				for _, s := range eng.Suggest(view, suggest.Request{Query: toSuggestQuery(q), Viewer: v, Feedback: toHits(res, 10)}) {
					seen = append(seen, s.Term, s.Display, strings.Join(s.Evidence.Neighbours, " "))
				}
				for _, qt := range q {
					for _, n := range tbl.Related(v, qt.Key, assoc.MeasureLLR, 50) {
						seen = append(seen, n.Term, n.Display)
					}
					for _, ph := range tbl.PhrasesWith(v, qt.Key) {
						seen = append(seen, ph.Key, ph.Display)
					}
				}
				checked++
				for _, s := range seen {
					low := strings.ToLower(s)
					if strings.Contains(low, term) || strings.Contains(low, stem) && len(stem) > 5 {
						t.Errorf("%s: viewer %s, query %q: canary %q leaked in %q", group, v, qs, term, s)
						leaks++
					}
				}
			}
		}
	}
	t.Logf("canary suite: %d canaries, %d query x viewer checks, %d leaks", len(canaries), checked, leaks)
	if checked == 0 {
		t.Fatal("nothing checked")
	}
}

// outsiders are viewers who lack group: anonymous, and one in each other
// group.
func outsiders(groups []string, group string) []access.Viewer {
	out := []access.Viewer{access.Anonymous, {Department: "field-operations"}}
	for _, g := range groups {
		if g != group {
			out = append(out, access.Viewer{Groups: []string{g}})
		}
	}
	return out
}

func readTSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows [][]string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if line := strings.TrimSpace(sc.Text()); line != "" && !strings.HasPrefix(line, "#") {
			rows = append(rows, strings.Split(line, "\t"))
		}
	}
	return rows
}

package main

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"kinword/internal/access"
	"kinword/internal/doc"
	"kinword/internal/eval"
	"kinword/internal/index"
	"kinword/internal/progress"
	"kinword/internal/suggest"
	"kinword/internal/text"
)

func init() {
	register(&command{name: "eval", summary: "index a judged collection in a temporary folder, run its topics and report MAP, P@10, nDCG@10, R-precision and Recall@100",
		usage: "--collection DIR [--run FILE] [--per-topic] [--markdown] [--json]", run: runEval})
}

func runEval(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("eval", e.stderr)
	dir := fs.String("collection", "", "collection folder with docs.jsonl, topics.tsv and qrels.txt (required)")
	runFile := fs.String("run", "", "also write a TREC run file (qid Q0 docid rank score tag) here")
	perTopic := fs.Bool("per-topic", false, "print the per-topic table too")
	markdown := fs.Bool("markdown", false, "print Markdown tables instead of plain text")
	methods := fs.String("methods", "bm25,rm3,mixture,rocchio,kinword", "comma-separated methods: bm25, rm3, mixture, rocchio, kinword (Kinword's default: suggestion engine's automatic expansion; feedback methods get 2-fold cross-validated parameters; kinword also scores suggestions)")
	seed := fs.Uint64("seed", 1, "seed for the cross-validation split and the randomization test")
	reportDir := fs.String("report", "", "also write the report here as NAME.md and NAME.json, with a TREC run file NAME.METHOD.run per method (NAME: the collection's folder name)")
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	if *dir == "" {
		return usagef("--collection DIR is required")
	}
	col, err := eval.LoadCollection(*dir)
	if err != nil {
		return err
	}
	for _, w := range col.Warnings {
		e.log.Warn("collection", "warning", w)
	}
	tmp, err := os.MkdirTemp("", "kinword-eval-*")
	if err != nil {
		return fmt.Errorf("eval: temp folder: %w", err)
	}
	defer os.RemoveAll(tmp)
	p, err := text.NewPipeline(e.cfg.Language)
	if err != nil {
		return err
	}
	ix, err := index.Open(ctx, tmp, index.Options{Pipeline: p, BatchSize: e.cfg.Index.BatchSize})
	if err != nil {
		return err
	}
	defer ix.Close()
	n, err := ingestCollection(ctx, e, ix, *dir)
	if errors.Is(err, errNoCollectionDocs) {
		return usagef("%v", err)
	}
	if err != nil {
		return err
	}
	want, err := parseMethods(*methods)
	if err != nil {
		return err
	}
	// Judged topics are run by a viewer who may read every group, so that
	// restricted relevant documents count as they do for their askers.
	view := ix.View(access.Viewer{Groups: ix.Groups()})
	lim := index.QueryLimits{MaxBytes: 1 << 16, MaxTerms: 4096}
	set, err := newEvalSet(ctx, view, e.bm25(), col.Topics, col.Qrels, func(s string) ([]index.QueryTerm, error) { return index.ParseQuery(p, s, lim) })
	if err != nil {
		return err
	}
	set.accept = e.cfg.Search.AcceptedWeight // suggestions are scored as the server expands
	per, runs, err := set.run(ctx, nil)
	if err != nil {
		return err
	}
	if *runFile != "" { // the BM25 run
		f, err := os.Create(*runFile)
		if err != nil {
			return fmt.Errorf("eval: run file: %w", err)
		}
		if err := eval.WriteRun(f, "kinword-bm25", runs); err != nil {
			f.Close()
			return err
		}
		if err := f.Close(); err != nil {
			return fmt.Errorf("eval: run file: %w", err)
		}
	}
	rep := &eval.Report{Collection: col.Name}
	if err := rep.Add(eval.NewRun("bm25", per)); err != nil {
		return err
	}
	chosen := map[string][]string{}
	methodRuns := map[string]map[string][]eval.Scored{"bm25": runs}
	var quality *suggestionQuality
	var simulated *simulatedSearcher
	for _, m := range want {
		if m == "bm25" {
			continue
		}
		var o cvOutcome
		if m == "kinword" {
			tbl, err := mineIndex(ctx, ix, tmp)
			if err != nil {
				return err
			}
			if o, err = set.crossValidateKinword(ctx, tbl, *seed); err != nil {
				return err
			}
			eng, err := suggest.New(tbl, suggest.Options{})
			if err != nil {
				return err
			}
			qq, ss, err := set.evalSuggestions(ctx, eng, per)
			if err != nil {
				return err
			}
			quality, simulated = &qq, &ss
		} else if o, err = set.crossValidate(ctx, m, feedbackGrid(m), *seed); err != nil {
			return err
		}
		chosen[m] = o.Chosen
		methodRuns[m] = o.Runs
		if err := rep.Add(eval.NewRun(m, o.PerTopic)); err != nil {
			return err
		}
	}
	if len(rep.Runs) > 1 {
		if err := rep.CompareAgainst("bm25", eval.CompareOptions{Seed: *seed}); err != nil {
			return err
		}
	}
	kinds, err := readKinds(filepath.Join(*dir, "topic-kinds.tsv"))
	if err != nil {
		return err
	}
	var misses []kindMiss
	for _, kind := range sortedKinds(kinds) {
		sub := map[string]eval.Measures{}
		for qid, m := range per {
			if kinds[qid] == kind {
				sub[qid] = m
			}
		}
		if err := rep.Add(eval.NewRun("bm25["+kind+"]", sub)); err != nil {
			return err
		}
		misses = append(misses, countMisses(kind, sub, runs, col.Qrels))
	}
	var obj map[string]any
	if e.json || *reportDir != "" {
		var buf strings.Builder
		if err := rep.WriteJSON(&buf); err != nil {
			return err
		}
		if err := json.Unmarshal([]byte(buf.String()), &obj); err != nil {
			return err
		}
		obj["no_relevant_in_top_10"] = misses
		obj["parameters"] = chosen
		if quality != nil {
			obj["suggestions"] = quality
			obj["simulated"] = simulated
		}
	}
	text := func(w io.Writer, markdown bool) error {
		fmt.Fprintf(w, "collection %s: %d documents, %d judged topics, BM25 k1 %.2f b %.2f\n\n", col.Name, n, len(col.Topics), e.cfg.Index.BM25K1, e.cfg.Index.BM25B)
		var err error
		if markdown {
			err = rep.WriteMarkdown(w)
		} else {
			err = rep.WriteTable(w)
		}
		if err != nil {
			return err
		}
		for _, m := range want {
			if c := chosen[m]; len(c) > 0 {
				fmt.Fprintf(w, "%s parameters (2-fold cross-validation): %s\n", m, strings.Join(c, "; "))
			}
		}
		if quality != nil {
			fmt.Fprintf(w, "suggestions (top 5, %d offered over %d topics): good %.2f, neutral %.2f, bad %.2f (AP change of +/-%.3f on adding one at weight %.2f)\n",
				quality.Suggestions, quality.Topics, quality.Good, quality.Neutral, quality.Bad, qualityDelta, quality.AcceptedWeight)
			fmt.Fprintf(w, "simulated searcher MAP: best of 5 %.4f, best pair %.4f, first %.4f, random one %.4f (BM25 %.4f)\n",
				simulated.BestOf5, simulated.BestPairOf5, simulated.FirstOf5, simulated.RandomOf5, rep.Runs[0].MAP)
		}
		for _, m := range misses {
			fmt.Fprintf(w, "%s topics: %d of %d have no relevant document in the top 10, %d none of their best-graded ones\n", m.Kind, m.Missed, m.Topics, m.MissedBest)
		}
		return nil
	}
	if *reportDir != "" {
		if err := writeEvalReport(*reportDir, filepath.Base(filepath.Clean(*dir)), obj, methodRuns, func(w io.Writer) error { return text(w, true) }); err != nil {
			return err
		}
	}
	if e.json {
		return e.printJSON(obj)
	}
	if err := text(e.stdout, *markdown); err != nil {
		return err
	}
	if *perTopic {
		fmt.Fprintln(e.stdout)
		return rep.WriteTopicTable(e.stdout, "bm25")
	}
	return nil
}

// errNoCollectionDocs reports a collection folder with no documents to read.
var errNoCollectionDocs = errors.New("collection has neither docs.jsonl nor a docs/ folder")

// ingestCollection indexes a collection folder: its docs.jsonl, or else its
// docs/ folder as `kinword ingest` would (like the demo intranet). It
// returns the number of documents in the index.
func ingestCollection(ctx context.Context, e *env, ix *index.Index, dir string) (int, error) {
	if _, err := os.Stat(filepath.Join(dir, "docs.jsonl")); err == nil {
		return loadCollectionDocs(ctx, e, ix, filepath.Join(dir, "docs.jsonl"))
	}
	if _, err := os.Stat(filepath.Join(dir, "docs")); err != nil {
		return 0, fmt.Errorf("%s: %w", dir, errNoCollectionDocs)
	}
	if _, err := syncPaths(ctx, e, ix, []string{filepath.Join(dir, "docs")}); err != nil {
		return 0, err
	}
	return ix.Len(), nil
}

// loadCollectionDocs indexes a collection's docs.jsonl ({"id","title","text"}
// per line) and returns the number of documents.
func loadCollectionDocs(ctx context.Context, e *env, ix *index.Index, path string) (int, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, fmt.Errorf("eval: %w", err)
	}
	defer f.Close()
	bar := progress.New(e.stderr, "indexing "+filepath.Base(filepath.Dir(path)), 0, progress.Options{Unit: "docs", Quiet: e.json})
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<20), 64<<20)
	var batch []doc.Document
	n, line := 0, 0
	flush := func() error {
		if err := ix.Put(ctx, batch); err != nil {
			return err
		}
		n += len(batch)
		bar.Set(n)
		batch = batch[:0]
		return nil
	}
	for sc.Scan() {
		line++
		var d doc.Document
		if err := json.Unmarshal(sc.Bytes(), &d); err != nil {
			return 0, fmt.Errorf("eval: %s line %d: %w", path, line, err)
		}
		if d.ID == "" {
			return 0, fmt.Errorf("eval: %s line %d: document without id", path, line)
		}
		batch = append(batch, d)
		if len(batch) == 1000 {
			if err := flush(); err != nil {
				return 0, err
			}
		}
	}
	if err := sc.Err(); err != nil {
		return 0, fmt.Errorf("eval: read %s: %w", path, err)
	}
	if err := flush(); err != nil {
		return 0, err
	}
	bar.Finish()
	return n, ix.Commit(ctx)
}

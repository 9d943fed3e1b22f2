package main

import (
	"bufio"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"kinword/internal/gen"
	"kinword/internal/progress"
)

func init() {
	register(&command{name: "gen", summary: "write a deterministic synthetic corpus (JSON lines) for performance work",
		usage: "--docs N [--seed S] [--words W] OUT(.jsonl file or folder)", run: runGen})
}

func runGen(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("gen", e.stderr)
	docs := fs.Int("docs", gen.DefaultDocs, "number of documents")
	seed := fs.Uint64("seed", gen.DefaultSeed, "random seed; the same seed gives the same bytes")
	words := fs.Int("words", gen.DefaultMeanWords, "mean words per document")
	pos, err := e.parse(fs, c, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("exactly one OUT path is required")
	}
	if *docs < 1 {
		return usagef("--docs must be at least 1")
	}
	out := pos[0]
	if !strings.HasSuffix(out, ".jsonl") {
		if err := os.MkdirAll(out, 0o755); err != nil {
			return fmt.Errorf("gen: %w", err)
		}
		out = filepath.Join(out, "corpus.jsonl")
	}
	g, err := gen.New(gen.Options{Docs: *docs, Seed: *seed, MeanWords: *words})
	if err != nil {
		return usagef("%v", err)
	}
	tmp := out + ".tmp"
	f, err := os.Create(tmp)
	if err != nil {
		return fmt.Errorf("gen: %w", err)
	}
	defer os.Remove(tmp)
	bar := progress.New(e.stderr, "generating", *docs, progress.Options{Unit: "docs", Quiet: e.json})
	start := time.Now()
	w := bufio.NewWriterSize(f, 1<<20)
	if err := g.WriteJSONL(ctx, w, bar.Set); err != nil {
		f.Close()
		return err
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return fmt.Errorf("gen: %w", err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("gen: %w", err)
	}
	if err := os.Rename(tmp, out); err != nil {
		return fmt.Errorf("gen: %w", err)
	}
	bar.Finish()
	el := time.Since(start).Seconds()
	if e.json {
		return e.printJSON(map[string]any{"path": out, "docs": *docs, "seed": *seed, "seconds": el})
	}
	fmt.Fprintf(e.stdout, "wrote %d documents to %s in %.1f s\n", *docs, out, el)
	return nil
}

package main

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"

	"kinword/internal/doc"
	"kinword/internal/index"
	"kinword/internal/ingest"
	"kinword/internal/progress"
)

func init() {
	register(&command{name: "ingest", summary: "index folders of intranet documents (.txt .md .html .jsonl .docx .pdf); re-runs are incremental",
		usage: "PATH... [--data DIR] [--json]", run: runIngest})
}

// indexSink adapts the index to ingest.Sink.
type indexSink struct{ ix *index.Index }

func (s indexSink) Known(ctx context.Context) (map[string]ingest.Known, error) {
	ents, err := s.ix.Entries(ctx)
	if err != nil {
		return nil, err
	}
	out := make(map[string]ingest.Known, len(ents))
	for id, e := range ents {
		out[id] = ingest.Known{Hash: e.Hash, Source: e.Source}
	}
	return out, nil
}
func (s indexSink) Put(ctx context.Context, d []doc.Document) error { return s.ix.Put(ctx, d) }
func (s indexSink) Delete(ctx context.Context, ids []string) error  { return s.ix.Delete(ctx, ids) }

type ingestReport struct {
	Indexed   int               `json:"indexed"`
	Unchanged int               `json:"unchanged"`
	Removed   int               `json:"removed"`
	Skipped   []ingestSkip      `json:"skipped"`
	Warnings  []string          `json:"warnings"`
	Documents int               `json:"documents"`
	Seconds   float64           `json:"seconds"`
	PerSecond float64           `json:"docs_per_second"`
	Summary   string            `json:"summary"`
	Reasons   map[string]string `json:"-"`
}

type ingestSkip struct {
	Path   string `json:"path"`
	Kind   string `json:"kind"`
	Reason string `json:"reason"`
}

func runIngest(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("ingest", e.stderr)
	paths, err := e.parse(fs, c, args)
	if err != nil {
		return err
	}
	if len(paths) == 0 {
		return usagef("at least one PATH to ingest is required")
	}
	for i, p := range paths {
		paths[i] = filepath.Clean(p)
	}
	ix, err := e.openIndex(ctx)
	if err != nil {
		return err
	}
	defer ix.Close()
	sum, err := syncPaths(ctx, e, ix, paths)
	if err != nil && !errors.Is(err, context.Canceled) {
		return err
	}
	rep := ingestReport{Indexed: sum.Indexed, Unchanged: sum.Unchanged, Removed: sum.Removed, Warnings: sum.Warnings,
		Documents: ix.Len(), Seconds: sum.Elapsed.Seconds(), Summary: sum.Line(), Skipped: []ingestSkip{}}
	if rep.Seconds > 0 {
		rep.PerSecond = float64(sum.Indexed) / rep.Seconds
	}
	for _, s := range sum.Skipped {
		rep.Skipped = append(rep.Skipped, ingestSkip{Path: s.Path, Kind: ingest.Label(s.Kind()), Reason: s.Reason.Error()})
	}
	if e.json {
		if perr := e.printJSON(rep); perr != nil {
			return perr
		}
	} else {
		for _, w := range sum.Warnings {
			fmt.Fprintln(e.stderr, "warning:", w)
		}
		for _, s := range rep.Skipped {
			fmt.Fprintf(e.stdout, "skipped %s: %s\n", s.Path, s.Reason)
		}
		fmt.Fprintf(e.stdout, "%s; %d documents in the index (%.1f s, %.0f docs/s)\n", rep.Summary, rep.Documents, rep.Seconds, rep.PerSecond)
	}
	return err
}

// syncPaths runs an incremental ingest and commits whatever was written,
// even when interrupted, so the index stays consistent and the next run
// resumes.
func syncPaths(ctx context.Context, e *env, ix *index.Index, paths []string) (ingest.Summary, error) {
	var bar *progress.Bar
	byDocs := false
	opts := ingest.SyncOptions{
		Options: ingest.Options{
			MaxBytes:        e.cfg.Ingest.MaxFileBytes,
			DefaultLanguage: e.cfg.Language,
			PDFToText:       e.cfg.Ingest.PDFToText,
		},
		BatchSize: e.cfg.Ingest.BatchSize,
		Progress: func(done, total int, phase string) {
			if bar == nil {
				// Few files (large JSON Lines): count documents; many
				// files: count files, which gives an ETA.
				byDocs = total <= 3
				unit, t := "files", total
				if byDocs {
					unit, t = "docs", 0
				}
				bar = progress.New(e.stderr, "ingest", t, progress.Options{Unit: unit, Quiet: e.json})
			}
			if (phase == "docs") != byDocs && phase != "delete" {
				return
			}
			if phase == "delete" {
				if total == 0 {
					return
				}
				if done == 0 {
					bar.Phase("removing vanished documents", total)
				}
			}
			bar.Set(done)
		},
	}
	sum, err := ingest.Sync(ctx, paths, opts, indexSink{ix})
	bar.Finish()
	if cerr := ix.Commit(context.WithoutCancel(ctx)); cerr != nil {
		return sum, cerr
	}
	return sum, err
}

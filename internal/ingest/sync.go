package ingest

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"time"

	"kinword/internal/doc"
)

// DefaultBatchSize is the default SyncOptions.BatchSize.
const DefaultBatchSize = 500

// Known is what a Sink remembers of a stored document.
type Known struct {
	// Hash is doc.Document.Hash as last stored.
	Hash string
	// Source is doc.Document.Source as last stored (absolute path, or
	// path#L<n> for a JSON line).
	Source string
}

// Sink is the store Sync keeps in step with the files; the index
// satisfies it. Calls come from one goroutine at a time.
type Sink interface {
	// Known returns every stored document ID with its hash and source.
	Known(ctx context.Context) (map[string]Known, error)
	// Put adds or replaces documents by ID.
	Put(ctx context.Context, docs []doc.Document) error
	// Delete removes documents by ID; unknown IDs are not an error.
	Delete(ctx context.Context, ids []string) error
}

// SyncOptions steer Sync. The zero value is ready to use.
type SyncOptions struct {
	// Options are the walk options (limits, languages, PDF tool, workers).
	Options
	// BatchSize is the number of documents per Sink.Put (and IDs per
	// Sink.Delete). 0 means 500.
	BatchSize int
	// Progress, when set, is called with phase "docs" after each batch is
	// written (done = documents handled so far, total 0 = unknown), so a
	// few large JSON Lines files still show movement; and with phase
	// "index" once before the
	// first file (done 0) and after each file, total being the number of
	// files found; then with phase "delete" before and after deletions,
	// total being the number of IDs removed. Calls come from one goroutine.
	Progress func(done, total int, phase string)
}

// Summary reports what Sync did.
type Summary struct {
	// Indexed counts documents Put (new or changed).
	Indexed int
	// Unchanged counts documents whose source and hash the sink already had.
	Unchanged int
	// Removed counts IDs deleted because their source is gone.
	Removed int
	// Skipped lists files and lines that produced no document, in walk order.
	Skipped []Skip
	// Warnings lists non-fatal problems, in walk order.
	Warnings []string
	// Elapsed is the wall time of the run.
	Elapsed time.Duration
}

// Sync walks roots and brings sink up to date: new and changed documents
// are Put in batches; sources the sink already holds with the same hash are
// not parsed; IDs whose source lies under one of roots but was not seen are
// deleted at the end (documents from other roots are left alone). When ctx
// ends, Sync writes the batch it holds, skips deletions and returns the
// context error wrapped; running again resumes where it stopped.
func Sync(ctx context.Context, roots []string, opts SyncOptions, sink Sink) (sum Summary, err error) {
	start := time.Now()
	defer func() { sum.Elapsed = time.Since(start) }()
	userWarn := opts.Warn
	opts.Warn = func(m string) {
		sum.Warnings = append(sum.Warnings, m)
		if userWarn != nil {
			userWarn(m)
		}
	}
	if opts.BatchSize <= 0 {
		opts.BatchSize = DefaultBatchSize
	}
	progress := opts.Progress
	if progress == nil {
		progress = func(int, int, string) {}
	}
	w, err := newWalker(opts.Options)
	if err != nil {
		return sum, err
	}
	known, err := sink.Known(ctx)
	if err != nil {
		return sum, fmt.Errorf("ingest: sink known: %w", err)
	}
	bySource := map[string][]string{}
	for id, k := range known {
		bySource[k.Source] = append(bySource[k.Source], id)
	}
	for _, ids := range bySource {
		sort.Strings(ids)
	}
	w.unchanged = func(source, hash string) (string, bool) {
		for _, id := range bySource[source] {
			if known[id].Hash == hash {
				return id, true
			}
		}
		return "", false
	}
	files, err := w.list(ctx, roots)
	if err != nil {
		return sum, err
	}
	seen := map[string]bool{}
	var batch []doc.Document
	var putErr error
	// Puts run without cancellation so a batch is never cut short; ctx is
	// checked between files.
	flush := func() error {
		if len(batch) == 0 {
			return nil
		}
		if err := sink.Put(context.WithoutCancel(ctx), batch); err != nil {
			putErr = fmt.Errorf("ingest: sink put: %w", err)
			return putErr
		}
		sum.Indexed += len(batch)
		batch = nil // the sink may keep the slice
		progress(sum.Indexed+sum.Unchanged+len(sum.Skipped), 0, "docs")
		return nil
	}
	emit := func(r result) error {
		sum.Warnings = append(sum.Warnings, r.Warnings...)
		switch {
		case r.unchangedID != "":
			seen[r.unchangedID] = true
			sum.Unchanged++
		case r.Skip != nil:
			sum.Skipped = append(sum.Skipped, *r.Skip)
			if errors.Is(r.Skip.Reason, ErrUnreadable) { // keep what we had, lines included
				for id, k := range known {
					if k.Source == r.source || lineSuffix.ReplaceAllString(k.Source, "") == r.source {
						seen[id] = true
					}
				}
			}
		case r.Doc != nil:
			seen[r.Doc.ID] = true
			if batch = append(batch, *r.Doc); len(batch) >= opts.BatchSize {
				return flush()
			}
		}
		return nil
	}
	done := 0
	progress(0, len(files), "index")
	err = w.run(ctx, files, emit, func() { done++; progress(done, len(files), "index") })
	if putErr != nil {
		return sum, putErr
	}
	if err == nil {
		err = ctx.Err()
	}
	if ferr := flush(); ferr != nil {
		return sum, ferr
	}
	if err != nil {
		return sum, fmt.Errorf("ingest: sync stopped before deletions: %w", err)
	}
	return sum, deleteUnseen(ctx, roots, known, seen, sink, opts.BatchSize, progress, &sum)
}

// deleteUnseen removes known IDs under roots that the walk did not see.
func deleteUnseen(ctx context.Context, roots []string, known map[string]Known, seen map[string]bool,
	sink Sink, batchSize int, progress func(int, int, string), sum *Summary) error {
	var abs []string
	for _, r := range roots {
		if a, err := filepath.Abs(r); err == nil {
			abs = append(abs, a)
		}
	}
	var gone []string
	for id, k := range known {
		if !seen[id] && underRoots(k.Source, abs) {
			gone = append(gone, id)
		}
	}
	sort.Strings(gone)
	progress(0, len(gone), "delete")
	for i := 0; i < len(gone); i += batchSize {
		part := gone[i:min(i+batchSize, len(gone))]
		if err := sink.Delete(ctx, part); err != nil {
			return fmt.Errorf("ingest: sink delete: %w", err)
		}
		sum.Removed += len(part)
		progress(sum.Removed, len(gone), "delete")
	}
	return nil
}

var lineSuffix = regexp.MustCompile(`#L[0-9]+$`)

// underRoots reports whether source (an absolute path, maybe with a
// "#L<n>" line suffix) is one of roots or lies below one.
func underRoots(source string, roots []string) bool {
	p := lineSuffix.ReplaceAllString(source, "")
	if !filepath.IsAbs(p) {
		return false
	}
	for _, r := range roots {
		rel, err := filepath.Rel(r, p)
		if err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
			return true
		}
	}
	return false
}

// maxLinePaths is how many paths per reason Summary.Line names before
// "+N more".
const maxLinePaths = 5

// Line renders the summary on one line, e.g.
//
//	indexed 212, unchanged 30, removed 2, skipped 6 (binary: a.bin; corrupt: d.docx, e.pdf)
//
// Reasons appear in a fixed order, paths in walk order; more than five
// paths for one reason end in "+N more". Warnings, if any, are counted last.
func (s Summary) Line() string {
	var b strings.Builder
	fmt.Fprintf(&b, "indexed %d, unchanged %d, removed %d, skipped %d", s.Indexed, s.Unchanged, s.Removed, len(s.Skipped))
	groups := map[error][]string{}
	for _, sk := range s.Skipped {
		groups[sk.Kind()] = append(groups[sk.Kind()], sk.Path)
	}
	var parts []string
	order := make([]error, 0, len(reasons)+1)
	for _, r := range reasons {
		order = append(order, r.err)
	}
	order = append(order, nil) // foreign reasons last
	for _, k := range order {
		paths := groups[k]
		if len(paths) == 0 {
			continue
		}
		shown := paths[:min(len(paths), maxLinePaths)]
		part := Label(k) + ": " + strings.Join(shown, ", ")
		if more := len(paths) - len(shown); more > 0 {
			part += fmt.Sprintf(" +%d more", more)
		}
		parts = append(parts, part)
	}
	if len(parts) > 0 {
		b.WriteString(" (" + strings.Join(parts, "; ") + ")")
	}
	if len(s.Warnings) > 0 {
		fmt.Fprintf(&b, ", warnings %d", len(s.Warnings))
	}
	return b.String()
}

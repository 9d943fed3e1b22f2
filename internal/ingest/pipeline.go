package ingest

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"

	"kinword/internal/doc"
)

// walker holds validated options for one Walk or Sync.
type walker struct {
	opts Options
	pdf  pdfExtractor
	// unchanged, when set, reports the ID the sink already holds for source
	// with exactly this hash; such files are not parsed.
	unchanged func(source, hash string) (id string, ok bool)
}

// result is an Item plus what Sync needs to know beyond it.
type result struct {
	Item
	unchangedID string // the sink's ID for an unchanged source
	source      string // absolute source of a skipped file or line
	jsonl       bool   // marker: stream this file's lines in order
}

// parsers maps extensions to in-memory parsers (PDF and JSON Lines are
// handled apart: one needs a context, the other is streamed).
var parsers = map[string]func([]byte) (string, string, Meta, error){
	".txt": ParseText, ".md": ParseMarkdown, ".markdown": ParseMarkdown,
	".html": ParseHTML, ".htm": ParseHTML, ".docx": ParseDOCX,
}

func supported(ext string) bool {
	_, ok := parsers[ext]
	return ok || ext == ".pdf" || ext == ".jsonl"
}

// run processes files with opts.Workers goroutines and calls emit in file
// order, then fileDone (when set) after each file. At most 2*Workers parsed
// files wait in memory.
func (w *walker) run(ctx context.Context, files []*file, emit func(result) error, fileDone func()) error {
	ctx, cancel := context.WithCancel(ctx)
	var wg sync.WaitGroup
	defer wg.Wait()
	defer cancel()
	outs := make([]chan []result, len(files))
	for i := range outs {
		outs[i] = make(chan []result, 1)
	}
	emit = uniqueIDs(emit)
	jobs := make(chan int)
	window := make(chan struct{}, 2*w.opts.Workers)
	wg.Add(1)
	go func() {
		defer wg.Done()
		defer close(jobs)
		for i := range files {
			select {
			case window <- struct{}{}:
			case <-ctx.Done():
				return
			}
			select {
			case jobs <- i:
			case <-ctx.Done():
				return
			}
		}
	}()
	for range w.opts.Workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				outs[i] <- w.process(ctx, files[i])
			}
		}()
	}
	for i, f := range files {
		var rs []result
		select {
		case rs = <-outs[i]:
		case <-ctx.Done():
			return fmt.Errorf("ingest: walk: %w", ctx.Err())
		}
		<-window
		if ctx.Err() != nil {
			return fmt.Errorf("ingest: walk: %w", ctx.Err())
		}
		if len(rs) == 1 && rs[0].jsonl {
			if err := w.streamJSONL(ctx, f, emit); err != nil {
				return err
			}
		} else {
			for _, r := range rs {
				if err := emit(r); err != nil {
					return err
				}
			}
		}
		if fileDone != nil {
			fileDone()
		}
	}
	return nil
}

// uniqueIDs wraps emit so that a document (or unchanged source) whose ID an
// earlier result already claimed becomes an ErrDuplicateID skip: the first
// in walk order wins, which keeps repeated Syncs stable.
func uniqueIDs(emit func(result) error) func(result) error {
	claimed := map[string]string{}
	return func(r result) error {
		id := r.unchangedID
		if r.Doc != nil {
			id = r.Doc.ID
		}
		if id != "" {
			if prev, dup := claimed[id]; dup {
				r = result{Item: Item{Path: r.Path, Warnings: r.Warnings, Skip: &Skip{Path: r.Path,
					Reason: reason(ErrDuplicateID, "id %q is already used by %s", id, prev)}}, source: r.source}
			} else {
				claimed[id] = r.Path
			}
		}
		return emit(r)
	}
}

// skipOf builds the single result for a skipped file.
func skipOf(f *file, err error) []result {
	return []result{{Item: Item{Path: f.path, Skip: &Skip{Path: f.path, Reason: err}}, source: f.abs}}
}

// process reads, hashes and parses one file.
func (w *walker) process(ctx context.Context, f *file) []result {
	switch {
	case ctx.Err() != nil:
		return nil
	case f.err != nil:
		return skipOf(f, f.err)
	case !supported(f.ext):
		return skipOf(f, reason(ErrUnsupported, "extension %q", f.ext))
	case f.folder.err != nil:
		return skipOf(f, reason(ErrBadMeta, "%v", f.folder.err))
	case f.ext == ".jsonl":
		return []result{{jsonl: true}}
	case f.size > w.opts.MaxBytes:
		return skipOf(f, reason(ErrTooLarge, "%d bytes, limit %d", f.size, w.opts.MaxBytes))
	}
	side, sideBytes, err := readSidecar(f)
	if err != nil {
		return skipOf(f, err)
	}
	data, err := os.ReadFile(f.abs)
	if err != nil {
		return skipOf(f, reason(ErrUnreadable, "%v", err))
	}
	if int64(len(data)) > w.opts.MaxBytes {
		return skipOf(f, reason(ErrTooLarge, "%d bytes, limit %d", len(data), w.opts.MaxBytes))
	}
	hash := contentHash(data, sideBytes, f.folder.fingerprint)
	if w.unchanged != nil {
		if id, ok := w.unchanged(f.abs, hash); ok {
			return []result{{Item: Item{Path: f.path}, unchangedID: id, source: f.abs}}
		}
	}
	var title, body string
	var meta Meta
	if f.ext == ".pdf" {
		title, body, meta, err = w.pdf.parse(ctx, data)
	} else {
		title, body, meta, err = parsers[f.ext](data)
	}
	if err != nil {
		return skipOf(f, err)
	}
	if body == "" {
		return skipOf(f, ErrEmpty)
	}
	d, warns := w.build(f, f.rel, title, body, meta, side, hash, f.abs)
	return []result{{Item: Item{Path: f.path, Doc: &d, Warnings: prefix(f.path, warns)}, source: f.abs}}
}

// readSidecar reads and parses f's sidecar, if any.
func readSidecar(f *file) (Meta, []byte, error) {
	if f.sidecar == "" {
		return Meta{}, nil, nil
	}
	data, err := os.ReadFile(f.sidecar)
	if err != nil {
		return Meta{}, nil, reason(ErrUnreadable, "sidecar: %v", err)
	}
	m, err := ParseSidecar(data)
	if err != nil {
		return Meta{}, nil, fmt.Errorf("%s: %w", filepath.Base(f.sidecar), err)
	}
	return m, data, nil
}

// contentHash is doc.HashBytes(data) when no sidecar or folder defaults
// apply; otherwise the SHA-256 of data followed by the metadata, so that a
// change in groups or department re-indexes the file.
func contentHash(data, sidecar []byte, folder string) string {
	if len(sidecar) == 0 && folder == "" {
		return doc.HashBytes(data)
	}
	h := sha256.New()
	h.Write(data)
	h.Write([]byte("\x00kinword-meta\x00"))
	h.Write(sidecar)
	h.Write([]byte{0})
	h.Write([]byte(folder))
	return hex.EncodeToString(h.Sum(nil))
}

// build merges metadata (in-document over sidecar over folder defaults)
// and fills in derived fields.
func (w *walker) build(f *file, rel, title, body string, in, side Meta, hash, source string) (doc.Document, []string) {
	eff := in.over(side).over(f.folder.meta)
	d := doc.Document{ID: eff.ID, Title: eff.Title, Body: body, URL: eff.URL,
		Department: eff.Department, Modified: eff.Modified, Source: source, Hash: hash}
	if d.ID == "" {
		d.ID = rel
	}
	if d.Title == "" {
		d.Title = title
	}
	if d.Title == "" {
		d.Title = strings.TrimSuffix(filepath.Base(f.abs), filepath.Ext(f.abs))
	}
	if d.URL == "" && f.ext != ".jsonl" {
		d.URL = f.folder.deriveURL(rel)
	}
	if len(eff.Groups) > 0 {
		d.Groups = eff.Groups
	}
	if d.Modified.IsZero() {
		d.Modified = f.mod
	}
	warns := eff.Warnings
	d.Language = w.opts.DefaultLanguage
	if eff.Language != "" {
		if l, ok := NormalizeLanguage(eff.Language); ok {
			d.Language = l
		} else {
			warns = append(warns, fmt.Sprintf("unknown language %q, using %q", eff.Language, d.Language))
		}
	}
	return d, warns
}

func prefix(path string, msgs []string) []string {
	var out []string
	for _, m := range msgs {
		out = append(out, path+": "+m)
	}
	return out
}

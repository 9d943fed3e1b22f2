package ingest

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"time"

	"kinword/internal/doc"
)

// DefaultMaxBytes is the default Options.MaxBytes: 20 MiB.
const DefaultMaxBytes = 20 << 20

// Options steer Walk and Sync. The zero value is ready to use.
type Options struct {
	// MaxBytes is the largest file read, in bytes; for JSON Lines it is the
	// largest single line (the file itself is streamed). 0 means 20 MiB.
	MaxBytes int64
	// DefaultLanguage is the Snowball language of documents that name none
	// or an unknown one. "" means "english".
	DefaultLanguage string
	// PDFToText is the pdftotext executable. "" looks it up on PATH and uses
	// the built-in reader when absent; "none" always uses the built-in reader.
	PDFToText string
	// PDFTimeout bounds one pdftotext run. 0 means one minute.
	PDFTimeout time.Duration
	// Workers is the number of files parsed in parallel. 0 means
	// GOMAXPROCS. The order of Items never depends on it.
	Workers int
	// Warn receives walk-level warnings (problems in folder-defaults
	// files), once each, in walk order. nil drops them.
	Warn func(msg string)
}

// Item is one outcome of the walk: a parsed document or a skip.
type Item struct {
	// Path is the file as walked (root joined with the relative path); for
	// a JSON line "path#L<n>".
	Path string
	// Doc is the document; nil when Skip is set.
	Doc *doc.Document
	// Skip says why no document came out; nil when Doc is set.
	Skip *Skip
	// Warnings are non-fatal problems (unknown language, unreadable date,
	// unknown sidecar key), each prefixed with Path.
	Warnings []string
}

// Walk parses every supported file under roots (folders or single files)
// and calls fn with one Item per file (per line for JSON Lines), in a
// deterministic order: roots as given, entries sorted by name. Hidden files
// and folders (name starting with "."), sidecar files and folder-defaults
// files yield no Item. A bad file yields a Skip and never stops the walk;
// Walk stops when fn returns an error (returned as is) or ctx ends.
//
// Each Document has ID = explicit id, else the slash path relative to its
// root (a single-file root: its name); Source = the absolute path ("#L<n>"
// appended for a JSON line); Hash = doc.HashBytes of the file (or line)
// bytes, mixed with the sidecar and folder-defaults bytes when those apply.
// A later file reusing an ID is skipped with ErrDuplicateID.
func Walk(ctx context.Context, roots []string, opts Options, fn func(Item) error) error {
	w, err := newWalker(opts)
	if err != nil {
		return err
	}
	files, err := w.list(ctx, roots)
	if err != nil {
		return err
	}
	return w.run(ctx, files, func(r result) error { return fn(r.Item) }, nil)
}

// file is one entry found by list.
type file struct {
	path, abs string // as walked, and absolute
	rel       string // slash path from the walk root (a single file: its name)
	ext       string // lower-cased extension with the dot
	size      int64
	mod       time.Time
	sidecar   string // absolute sidecar path, "" when none
	folder    *folderDefaults
	err       error // set when the entry could not be listed
}

// list finds the files under roots in walk order.
func (w *walker) list(ctx context.Context, roots []string) ([]*file, error) {
	var files []*file
	seen := map[string]bool{}
	for _, root := range roots {
		abs, err := filepath.Abs(root)
		if err != nil {
			return nil, fmt.Errorf("ingest: root %q: %w", root, err)
		}
		if seen[abs] {
			continue
		}
		seen[abs] = true
		fi, err := os.Stat(abs)
		if err != nil {
			return nil, fmt.Errorf("ingest: root: %w", err)
		}
		if !fi.IsDir() {
			top := w.folderAt(filepath.Dir(abs), "", folderDefaults{})
			f := newFile(root, abs, filepath.Base(abs), fi, &top)
			if s := abs + SidecarSuffix; isRegular(s) {
				f.sidecar = s
			}
			if !isMetaFile(fi.Name()) {
				files = append(files, f)
			}
			continue
		}
		found, err := w.listDir(ctx, root, abs)
		if err != nil {
			return nil, err
		}
		files = append(files, found...)
	}
	return files, nil
}

func (w *walker) listDir(ctx context.Context, root, absRoot string) ([]*file, error) {
	var files []*file
	dirs := map[string]*folderDefaults{}
	sidecars := map[string]bool{}
	err := filepath.WalkDir(absRoot, func(p string, d fs.DirEntry, err error) error {
		if ctx.Err() != nil {
			return ctx.Err()
		}
		rel, _ := filepath.Rel(absRoot, p)
		if rel = filepath.ToSlash(rel); rel == "." {
			rel = ""
		}
		walked := filepath.Join(root, filepath.FromSlash(rel))
		if err != nil && d == nil {
			files = append(files, &file{path: walked, abs: p, rel: rel, err: reason(ErrUnreadable, "%v", err)})
			return nil
		}
		if p != absRoot && strings.HasPrefix(d.Name(), ".") {
			if d.IsDir() {
				return filepath.SkipDir
			}
			return nil
		}
		if err != nil {
			files = append(files, &file{path: walked, abs: p, rel: rel, err: reason(ErrUnreadable, "%v", err)})
			return nil
		}
		if d.IsDir() {
			parent := dirs[filepath.Dir(p)]
			if p == absRoot || parent == nil {
				parent = &folderDefaults{}
			}
			fd := w.folderAt(p, rel, *parent)
			dirs[p] = &fd
			return nil
		}
		if strings.HasSuffix(d.Name(), SidecarSuffix) {
			sidecars[p] = true
			return nil
		}
		fi, err := os.Stat(p) // follows symbolic links to files
		if err != nil || !fi.Mode().IsRegular() {
			return nil
		}
		files = append(files, newFile(walked, p, rel, fi, dirs[filepath.Dir(p)]))
		return nil
	})
	if err != nil {
		if ctx.Err() != nil {
			return nil, fmt.Errorf("ingest: walk: %w", ctx.Err())
		}
		return nil, fmt.Errorf("ingest: walk %s: %w", root, err)
	}
	for _, f := range files {
		if sidecars[f.abs+SidecarSuffix] {
			f.sidecar = f.abs + SidecarSuffix
		}
	}
	return files, nil
}

// folderAt resolves the defaults of folder dir from its parent's.
func (w *walker) folderAt(dir, rel string, parent folderDefaults) folderDefaults {
	name := filepath.Join(dir, FolderFile)
	data, err := os.ReadFile(name)
	if errors.Is(err, fs.ErrNotExist) {
		return parent
	}
	if err != nil {
		parent.err = fmt.Errorf("%s: %w", name, reason(ErrUnreadable, "%v", err))
		return parent
	}
	fd, warns := parent.child(rel, data, name)
	for _, m := range warns {
		if w.opts.Warn != nil {
			w.opts.Warn(m)
		}
	}
	return fd
}

func newFile(walked, abs, rel string, fi fs.FileInfo, fd *folderDefaults) *file {
	if fd == nil {
		fd = &folderDefaults{}
	}
	return &file{path: walked, abs: abs, rel: rel, ext: strings.ToLower(filepath.Ext(abs)),
		size: fi.Size(), mod: fi.ModTime().UTC(), folder: fd}
}

func isMetaFile(name string) bool {
	return name == FolderFile || strings.HasSuffix(name, SidecarSuffix)
}

func isRegular(p string) bool {
	fi, err := os.Stat(p)
	return err == nil && fi.Mode().IsRegular()
}

// newWalker validates opts and fills in defaults.
func newWalker(opts Options) (*walker, error) {
	if opts.MaxBytes <= 0 {
		opts.MaxBytes = DefaultMaxBytes
	}
	if opts.DefaultLanguage == "" {
		opts.DefaultLanguage = "english"
	}
	lang, ok := NormalizeLanguage(opts.DefaultLanguage)
	if !ok {
		return nil, fmt.Errorf("ingest: default language %q: want one of %s", opts.DefaultLanguage, strings.Join(languages, ", "))
	}
	opts.DefaultLanguage = lang
	if opts.Workers <= 0 {
		opts.Workers = runtime.GOMAXPROCS(0)
	}
	if opts.PDFTimeout <= 0 {
		opts.PDFTimeout = time.Minute
	}
	pdf, err := newPDFExtractor(opts.PDFToText, opts.PDFTimeout)
	if err != nil {
		return nil, err
	}
	return &walker{opts: opts, pdf: pdf}, nil
}

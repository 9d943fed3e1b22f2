// Package index is Kinword's document index: bleve v2 on disk for documents,
// stored text and metadata, and beside it a forward store of per-document
// term sequences with per-access-class statistics, over which Kinword scores
// the textbook BM25 itself.
//
// Why scoring of our own: bleve v2.6.3's BM25 takes the average field length
// as ceil(dictionary cardinality / document count) rather than the mean
// length, and multiplies disjunction scores by a coordination factor (both
// verified by TestBleveScoringDiffersFromTextbook), and it cannot weight
// expansion terms per query or restrict collection statistics to what one
// viewer may read. Kinword therefore uses bleve for analysis, storage,
// highlight-free stored text, metadata and its own comparison search, and
// ranks with exact BM25 over in-memory postings built from the forward store
// with statistics from the viewer's access scope only.
//
// This is the only package that imports bleve. It must not import gin or
// database drivers.
package index

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"
	"time"

	"github.com/blevesearch/bleve/v2"
	bolt "go.etcd.io/bbolt"

	"kinword/internal/access"
	"kinword/internal/text"
)

// ErrClosed is returned by operations on a closed index.
var ErrClosed = errors.New("index: closed")

// ErrInUse is returned by Open when another process holds the index (a
// running serve, ingest or mine on the same data folder): bleve's root
// file is locked for one writer, and Open gives up after LockWait instead
// of waiting without a word.
var ErrInUse = errors.New("index: data folder in use by another kinword process")

// Internal bleve keys that tie the forward store to the bleve index.
var (
	keyGen   = []byte("kinword.gen")
	keyDirty = []byte("kinword.dirty")
)

// Options configure Open.
type Options struct {
	// Pipeline is the shared text pipeline; required.
	Pipeline *text.Pipeline
	// BatchSize is the number of documents per bleve batch; default 1000.
	BatchSize int
	// Workers is the number of goroutines analysing documents for the
	// forward store; default GOMAXPROCS.
	Workers int
	// LockWait is how long Open waits for another process to release the
	// index before it fails with ErrInUse; default 2 s.
	LockWait time.Duration
}

// Index is an open index folder. It is safe for concurrent readers; writes
// (Put, Delete, Commit) are serialised.
type Index struct {
	dir   string
	opts  Options
	b     bleve.Index
	p     *text.Pipeline
	wmu   sync.Mutex // serialises writers
	fwd   *forward   // guarded by wmu
	dirty bool       // guarded by wmu: uncommitted writes
	snap  atomic.Pointer[snapshot]

	closeOnce sync.Once
}

// Open opens or creates the index in dir (dir/bleve and dir/forward.kwf).
// If a previous writer stopped between writing bleve and the forward store,
// the forward store is rebuilt from bleve's stored text.
func Open(ctx context.Context, dir string, opts Options) (*Index, error) {
	if opts.Pipeline == nil {
		return nil, errors.New("index: open: Options.Pipeline is required")
	}
	if opts.BatchSize <= 0 {
		opts.BatchSize = 1000
	}
	if opts.Workers <= 0 {
		opts.Workers = runtime.GOMAXPROCS(0)
	}
	if err := registerAnalyzers(opts.Pipeline); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("index: open: %w", err)
	}
	ix := &Index{dir: dir, opts: opts, p: opts.Pipeline}
	bpath := filepath.Join(dir, "bleve")
	var err error
	wait := opts.LockWait
	if wait <= 0 {
		wait = 2 * time.Second
	}
	if _, statErr := os.Stat(bpath); statErr == nil {
		ix.b, err = bleve.OpenUsing(bpath, map[string]interface{}{"bolt_timeout": wait.String()})
	} else {
		ix.b, err = bleve.New(bpath, buildMapping())
	}
	if errors.Is(err, bolt.ErrTimeout) {
		return nil, fmt.Errorf("%w: %s (stop the other process, or give this one another data folder)", ErrInUse, dir)
	}
	if err != nil {
		return nil, fmt.Errorf("index: open bleve %s: %w", bpath, err)
	}
	if err := ix.loadForward(ctx); err != nil {
		ix.b.Close()
		return nil, err
	}
	ix.snap.Store(buildSnapshot(ix.fwd))
	return ix, nil
}

func (ix *Index) forwardPath() string { return filepath.Join(ix.dir, "forward.kwf") }

func (ix *Index) loadForward(ctx context.Context) error {
	dirty, err := ix.b.GetInternal(keyDirty)
	if err != nil {
		return fmt.Errorf("index: read state: %w", err)
	}
	genB, err := ix.b.GetInternal(keyGen)
	if err != nil {
		return fmt.Errorf("index: read state: %w", err)
	}
	f, err := loadForward(ix.forwardPath())
	switch {
	case errors.Is(err, os.ErrNotExist):
		f = newForward()
	case err != nil && !errors.Is(err, ErrCorrupt):
		return err
	}
	consistent := err == nil && len(dirty) == 0 && string(genB) == fmt.Sprint(f.gen)
	if errors.Is(err, os.ErrNotExist) && len(dirty) == 0 && len(genB) == 0 {
		consistent = true // a brand-new index
	}
	if !consistent {
		f, err = ix.rebuildForward(ctx)
		if err != nil {
			return err
		}
		ix.fwd = f
		ix.dirty = true
		return ix.Commit(ctx)
	}
	ix.fwd = f
	return nil
}

// Dir returns the index folder.
func (ix *Index) Dir() string { return ix.dir }

// Pipeline returns the text pipeline the index analyses with.
func (ix *Index) Pipeline() *text.Pipeline { return ix.p }

// Len returns the number of documents in the current snapshot.
func (ix *Index) Len() int { return len(ix.snap.Load().docs) }

// Close commits nothing: uncommitted writes are left for the next Open to
// reconcile. Call Commit first. Closing twice is harmless.
func (ix *Index) Close() error {
	var err error
	ix.closeOnce.Do(func() {
		if e := ix.b.Close(); e != nil {
			err = fmt.Errorf("index: close: %w", e)
		}
	})
	return err
}

// Groups returns every access group that restricts a document, sorted.
func (ix *Index) Groups() []string {
	s := ix.snap.Load()
	set := map[string]bool{}
	for _, c := range s.classes {
		for _, g := range c.groups {
			set[g] = true
		}
	}
	out := make([]string, 0, len(set))
	for g := range set {
		out = append(out, g)
	}
	sort.Strings(out)
	return out
}

// Warm builds the current snapshot's postings now rather than on the first
// search (a server calls it before reporting ready).
func (ix *Index) Warm() { ix.snap.Load().postings() }

// WarmPhrases computes and caches, on the current snapshot, the document
// counts per access class of the given phrase keys (single words are
// skipped: their counts are always at hand), so that the first searches
// asking a phrase's document frequency do not pay for finding its
// occurrences. It stops early when ctx is done.
func (ix *Index) WarmPhrases(ctx context.Context, keys []string) {
	w := ix.View(access.Viewer{Groups: ix.Groups()})
	for i, k := range keys {
		if i%64 == 63 && ctx.Err() != nil {
			return
		}
		if parts := splitKey(k); len(parts) > 1 {
			w.phraseClassDF(parts)
		}
	}
}

package finder

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sync/atomic"
	"time"

	"kinword/internal/access"
	"kinword/internal/assoc"
	"kinword/internal/index"
	"kinword/internal/suggest"
)

// handle is one open index with a reference count: one reference while a
// published state names it, one per request using it. The index is closed
// when the count reaches zero, so a swap never closes an index under a
// request that started on it.
type handle struct {
	ix   *index.Index
	refs atomic.Int64
	err  error         // the Close error, set before done is closed
	done chan struct{} // closed once the index is closed
}

func newHandle(ix *index.Index) *handle {
	h := &handle{ix: ix, done: make(chan struct{})}
	h.refs.Store(1) // the reference of the state that publishes it
	return h
}

// tryRef takes a reference unless the index is already closing.
func (h *handle) tryRef() bool {
	for {
		n := h.refs.Load()
		if n <= 0 {
			return false
		}
		if h.refs.CompareAndSwap(n, n+1) {
			return true
		}
	}
}

// unref drops a reference and closes the index after the last one.
func (h *handle) unref() {
	if h.refs.Add(-1) == 0 {
		h.err = h.ix.Close()
		close(h.done)
	}
}

// acquire pins the published state and its index for one request; the
// caller must release it. It fails with ErrNotReady before the first
// state and with index.ErrClosed after Close.
func (f *Finder) acquire() (*state, error) {
	for {
		s := f.st.Load()
		if s == nil {
			return nil, ErrNotReady
		}
		if s.h.tryRef() {
			return s, nil
		}
		if f.st.Load() == s { // not swapped meanwhile: the finder was closed
			return nil, fmt.Errorf("finder: %w", index.ErrClosed)
		}
	}
}

func (s *state) release() { s.h.unref() }

// warmChunk is how many phrases the background warm-up counts under one
// index reference.
const warmChunk = 256

// warm counts, in the background, the documents of every phrase of the
// state's table in the index (index.WarmPhrases), so that the first
// suggestion lists offering a phrase do not pay for finding it: on the
// 100,000-document synthetic corpus a cold phrase took about 70 µs, and
// the first request for a query tens of them. Each chunk holds its own
// index reference, so a swap or Close waits for one chunk at most; the
// warm-up stops once the index is closing.
func (s *state) warm() {
	if s.tbl == nil {
		close(s.warmed)
		return
	}
	var keys []string
	for _, p := range s.tbl.PhrasesFor(access.Viewer{Groups: s.h.ix.Groups()}) {
		keys = append(keys, p.Key)
	}
	go func() {
		defer close(s.warmed)
		for i := 0; i < len(keys); i += warmChunk {
			if !s.h.tryRef() {
				return
			}
			s.h.ix.WarmPhrases(context.Background(), keys[i:min(i+warmChunk, len(keys))])
			s.h.unref()
		}
	}()
}

// buildState reads the association table at table ("" or a missing file:
// suggestions from feedback alone), builds the engine and warms the
// index's postings. It publishes nothing.
func (f *Finder) buildState(ctx context.Context, h *handle, table, version string) (*state, error) {
	var tbl *assoc.Table
	if table != "" {
		t, err := assoc.Load(table)
		switch {
		case errors.Is(err, os.ErrNotExist):
		case err != nil:
			return nil, fmt.Errorf("finder: reload table: %w", err)
		default:
			tbl = t
		}
	}
	eng, err := suggest.New(tbl, suggest.Options{K: f.opts.Suggestions, BM25: f.opts.BM25})
	if err != nil {
		return nil, fmt.Errorf("finder: reload: %w", err)
	}
	h.ix.Warm()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("finder: reload: %w", err)
	}
	return &state{h: h, table: table, version: version, tbl: tbl, eng: eng, loaded: time.Now(), seq: stateSeq.Add(1), warmed: make(chan struct{})}, nil
}

// Swap replaces the index and the association table the finder serves
// with those of another folder laid out as a data folder (dir/index and
// dir/assoc.kwa, the table optional), labelled version (shown in Status).
// The new index is opened and warmed and its table read before anything
// is published; then one atomic store swaps them in, so searches never
// pause: each runs whole on the snapshot it started with. The previous
// index is closed once the last request using it has finished
// (reference counting, no grace period); the returned channel is closed
// then, after which its folder may be removed.
//
// On any error nothing changes and the previous snapshot keeps serving.
// The folder is opened as the index's owner (bleve's lock is taken), so it
// must be this process's own copy. Documents pushed through the finder go
// to the index being served and do not survive the next swap.
func (f *Finder) Swap(ctx context.Context, dir, version string) (<-chan struct{}, error) {
	ix, err := index.Open(ctx, filepath.Join(dir, "index"), index.Options{Pipeline: f.p})
	if err != nil {
		return nil, fmt.Errorf("finder: swap to %s: %w", dir, err)
	}
	h := newHandle(ix)
	ns, err := f.buildState(ctx, h, filepath.Join(dir, "assoc.kwa"), version)
	if err != nil {
		ix.Close()
		return nil, fmt.Errorf("finder: swap to %s: %w", dir, err)
	}
	f.smu.Lock()
	defer f.smu.Unlock()
	old := f.st.Load()
	if f.closed || old == nil {
		ix.Close()
		return nil, fmt.Errorf("finder: swap: %w", index.ErrClosed)
	}
	f.st.Store(ns)
	ns.warm()
	f.cache.Flush()
	old.release() // the published reference; requests still on it hold theirs
	return old.h.done, nil
}

// Version returns the label of the snapshot now served ("" for the data
// folder the finder was opened on).
func (f *Finder) Version() string {
	if s := f.st.Load(); s != nil {
		return s.version
	}
	return ""
}

// liveIndex reaches the index published now, without pinning it: for
// tests and benchmarks that hold the finder still. Request paths pin a
// state with acquire instead.
type liveIndex struct{ f *Finder }

// View is the published index's view for v.
func (l liveIndex) View(v access.Viewer) *index.View { return l.f.st.Load().h.ix.View(v) }

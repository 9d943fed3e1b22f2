// Package finder is Kinword's search service: it answers a viewer's query
// with ranked results, snippets and suggested terms, over an immutable
// snapshot of the index and the association table that Reload and Swap
// replace atomically. It must not import gin or database drivers; bleve is reached
// only through internal/index.
package finder

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	gocache "github.com/patrickmn/go-cache"

	"kinword/internal/assoc"
	"kinword/internal/curate"
	"kinword/internal/index"
	"kinword/internal/prefs"
	"kinword/internal/rank"
	"kinword/internal/suggest"
	"kinword/internal/text"
)

// ErrNotReady is returned while no index is loaded.
var ErrNotReady = errors.New("finder: not ready")

// Options configure a Finder. Zero values mean the defaults given.
type Options struct {
	// BM25 holds k1 and b; default 1.2 and 0.75.
	BM25 rank.BM25
	// Results is the number of results returned; default 10.
	Results int
	// SnippetTokens is the snippet length in tokens; default 30.
	SnippetTokens int
	// Limits bound queries; defaults 512 bytes and 32 terms.
	Limits index.QueryLimits
	// FeedbackDocs is how many of the viewer's top results feed the
	// suggestions; default 10.
	FeedbackDocs int
	// FeedbackPool is how many top results the feedback documents are
	// chosen from; default 50 (at least FeedbackDocs).
	FeedbackPool int
	// DepartmentDocs: when learning is on and at least this many of the
	// FeedbackPool top results come from the searcher's own department,
	// the candidate pool learning ranks also holds suggestions drawn from
	// those documents alone, so an ambiguous query ("leak", "outage") can
	// learn its department's sense even when another department's
	// documents rank first. Default 2; negative: off.
	DepartmentDocs int
	// Suggestions is the number of suggested terms; default 5.
	Suggestions int
	// AcceptWeight is the weight of an accepted term relative to the
	// query's strongest term; default 0 means suggest's default (0.3).
	AcceptWeight float64
	// CacheTTL is how long a suggestion list is reused for the same viewer
	// scope and query; default 30 s (the refresh interval); negative: never
	// reused (every request computes its suggestions).
	CacheTTL time.Duration
	// CacheEntries bounds the suggestion lists kept for reuse: when that
	// many are held, new lists are computed but not stored until expired
	// ones are dropped, so a flood of distinct queries cannot grow the heap
	// without limit. Default 10,000 (about 20 MB of lists with evidence);
	// negative: no bound.
	CacheEntries int
	// AutoExpand turns on the automatic mode: a search with no accepted
	// terms and no documents marked useful is expanded without clicks.
	// The first pass's top results the viewer may read feed the engine's
	// AutoExpand (its AutoModel, the blended feedback model by default),
	// the expanded query is run, and Response.Expanded lists what was
	// added; suggestions still come from the first pass. Default false
	// (the searcher chooses). Costs a second search per query.
	AutoExpand bool
	// Concurrent bounds the searches computed at once; the others wait
	// their turn in arrival order (or until their context ends). Searches
	// are CPU-bound, so running more at once than there are cores only
	// shares the cores out, and a heavy query then takes as long as all
	// the others together: waiting in line keeps the tail short. Default
	// twice GOMAXPROCS; negative: no bound.
	Concurrent int
	// Version labels the folder Open opens in Status (a replica's
	// snapshot version, see Swap); default empty.
	Version string
}

func (o Options) resolve() Options {
	if o.Concurrent == 0 {
		o.Concurrent = 2 * runtime.GOMAXPROCS(0)
	}
	if o.Results <= 0 {
		o.Results = 10
	}
	if o.SnippetTokens <= 0 {
		o.SnippetTokens = 30
	}
	if o.FeedbackDocs <= 0 {
		o.FeedbackDocs = 10
	}
	if o.FeedbackPool <= 0 {
		o.FeedbackPool = 50
	}
	o.FeedbackPool = max(o.FeedbackPool, o.FeedbackDocs)
	if o.DepartmentDocs == 0 {
		o.DepartmentDocs = 2
	}
	if o.Suggestions <= 0 {
		o.Suggestions = 5
	}
	if o.CacheTTL == 0 {
		o.CacheTTL = 30 * time.Second
	}
	if o.CacheEntries == 0 {
		o.CacheEntries = 10000
	}
	o.BM25 = o.BM25.Resolve()
	return o
}

// state is one loaded snapshot: immutable once published. Reload makes a
// new state on the same index handle; Swap makes one on a new handle.
type state struct {
	h       *handle
	table   string // association table path ("" = none)
	version string // snapshot label ("" = the data folder opened)
	tbl     *assoc.Table
	eng     *suggest.Engine
	loaded  time.Time
	// seq numbers states in the order they were built; suggestion lists
	// are cached under it, so a request still finishing on a replaced
	// snapshot can never leave its list for requests on the new one.
	seq uint64
	// warmed is closed when the background phrase warm-up has ended
	// (finished, or stopped by a closing index); see warm.
	warmed chan struct{}
}

// stateSeq hands out state sequence numbers.
var stateSeq atomic.Uint64

// Finder serves searches. It is safe for concurrent use.
type Finder struct {
	ix     liveIndex // the published index, unpinned (tests, benchmarks)
	p      *text.Pipeline
	opts   Options
	st     atomic.Pointer[state]
	smu    sync.Mutex // serialises Reload, Swap and Close
	closed bool       // guarded by smu
	model  atomic.Pointer[prefs.Model]
	rules  atomic.Pointer[curate.Set]
	// noCache: CacheTTL was negative, suggestion lists are never reused.
	noCache bool
	cache   *gocache.Cache
	wmu     sync.Mutex // serialises document pushes: each is written and committed whole
	// slots holds a token per search being computed (Options.Concurrent);
	// nil: no bound.
	slots chan struct{}
}

// SetModel publishes a new learned model (nil switches learning off) and
// drops cached suggestion lists, so learning shows within the refresh
// interval.
func (f *Finder) SetModel(m *prefs.Model) {
	f.model.Store(m)
	f.cache.Flush()
}

// CanonicalQuery is the key under which learning files a query: its
// analysed terms and phrases, sorted, joined by single spaces ("" when the
// text has no searchable words).
func (f *Finder) CanonicalQuery(raw string) string {
	q, err := index.ParseQuery(f.p, raw, f.opts.Limits)
	if err != nil {
		return ""
	}
	return canonical(q)
}

func canonical(q []index.QueryTerm) string {
	keys := make([]string, len(q))
	for i, t := range q {
		keys[i] = t.Key
	}
	return strings.Join(keys, " ")
}

// Open opens the index in dataDir/index and the association table at
// dataDir/assoc.kwa (optional: without it suggestions come from feedback
// alone).
func Open(ctx context.Context, dataDir string, p *text.Pipeline, opts Options) (*Finder, error) {
	ix, err := index.Open(ctx, filepath.Join(dataDir, "index"), index.Options{Pipeline: p})
	if err != nil {
		return nil, err
	}
	f := &Finder{p: p, opts: opts.resolve()}
	if f.opts.Concurrent > 0 {
		f.slots = make(chan struct{}, f.opts.Concurrent)
	}
	f.ix = liveIndex{f}
	ttl := f.opts.CacheTTL
	if ttl < 0 { // no reuse: the cache stays empty (benchmarks)
		f.noCache, ttl = true, time.Minute
	}
	f.cache = gocache.New(ttl, ttl) // expired lists are swept every TTL
	s, err := f.buildState(ctx, newHandle(ix), filepath.Join(dataDir, "assoc.kwa"), f.opts.Version)
	if err != nil {
		ix.Close()
		return nil, err
	}
	f.st.Store(s)
	s.warm()
	return f, nil
}

// Close releases the index once the requests using it have finished, and
// returns its close error. Later searches fail with index.ErrClosed.
// Closing twice is harmless.
func (f *Finder) Close() error {
	f.smu.Lock()
	s := f.st.Load()
	if f.closed || s == nil {
		f.smu.Unlock()
		return nil
	}
	f.closed = true
	f.smu.Unlock()
	s.release()
	<-s.h.done
	return s.h.err
}

// Ready reports whether the finder can answer searches.
func (f *Finder) Ready() error {
	if f.st.Load() == nil {
		return ErrNotReady
	}
	return nil
}

// Status describes what is loaded, for /readyz.
type Status struct {
	Documents int       `json:"documents"`
	Table     bool      `json:"association_table"`
	Loaded    time.Time `json:"loaded"`
	// Version is the published snapshot's label (Swap); empty for the
	// data folder the finder was opened on.
	Version string `json:"version,omitempty"`
}

// Status reports the loaded snapshot.
func (f *Finder) Status() Status {
	s, err := f.acquire()
	if err != nil {
		return Status{}
	}
	defer s.release()
	return Status{Documents: s.h.ix.Len(), Table: s.tbl != nil, Loaded: s.loaded, Version: s.version}
}

// Pipeline returns the text pipeline.
func (f *Finder) Pipeline() *text.Pipeline { return f.p }

func newImpressionID() string {
	var b [12]byte
	_, _ = rand.Read(b[:])
	return hex.EncodeToString(b[:])
}

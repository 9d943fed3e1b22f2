// Package store keeps the search page's interaction events (impressions,
// accepts, dismissals, clicks, "useful" marks) durably in SQLite or
// PostgreSQL, with no user identifier.
//
// It is the only Kinword package that imports database drivers
// (modernc.org/sqlite, github.com/jackc/pgx/v5); it must not import bleve,
// gin or any other Kinword package. Consumers declare their own small
// interfaces over *Store.
//
// Writes go through one writer goroutine that coalesces concurrent Append
// calls into a single transaction (group commit, see group.go); every caller
// is answered only after that transaction has committed.
package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"math"
	"strings"
	"sync"
	"sync/atomic"
	"time"
)

// Event kinds.
const (
	KindImpression = "impression"  // suggestion terms shown for a query
	KindAccept     = "accept"      // a shown term was added to the query
	KindDismiss    = "dismiss"     // a shown term was dismissed
	KindClick      = "click"       // a result was opened
	KindMarkUseful = "mark_useful" // a result was marked useful
)

// Sentinel errors callers branch on. Append wraps them with detail naming
// the offending event's index in its batch.
var (
	ErrInvalid           = errors.New("store: invalid event")
	ErrUnknownImpression = errors.New("store: unknown impression")
	ErrReplay            = errors.New("store: replayed event")
	ErrUnavailable       = errors.New("store: database unavailable")
)

// Event is one interaction on the search page. Which fields matter depends
// on Kind; the others are stored as zero values.
type Event struct {
	ID         string    // client-made, unique across all events
	Impression string    // the impression this event belongs to (for an impression: its own id)
	Kind       string    // one of the Kind constants
	Time       time.Time // when it happened (stored with nanosecond precision, returned in UTC)
	Session    string    // short-lived session token, not a user identifier
	Department string    // department of the searcher's view
	GroupsHash string    // hash of the searcher's access groups
	Query      string    // normalised query key
	Term       string    // accept, dismiss: the term key
	Position   int       // accept, dismiss: 0-based position of the term in the impression
	Doc        string    // click, mark_useful: result document id
	Rank       int       // click: 0-based rank of the result
	Terms      []string  // impression: shown term keys in order; click: accepted term keys
	Sources    []string  // impression, optional: per shown term, its sources (e.g. "rm3,assoc"); empty or len(Terms)
}

// Options tunes a Store. The zero value is ready to use.
type Options struct {
	// MaxBatches bounds how many Append batches one transaction takes.
	// Default 64.
	MaxBatches int
	// MaxWait is how long the writer lingers for more batches after the
	// first one arrives. Default 0: it takes whatever is already queued,
	// so an idle store adds no latency and a busy one batches naturally
	// while the previous commit is being synced.
	MaxWait time.Duration
	// WriteTimeout bounds one group transaction, in wall time. Default 15s.
	WriteTimeout time.Duration
	// RetryAfter is how long clients are told to wait after
	// ErrUnavailable before retrying (see RetryAfter). Default 5s.
	RetryAfter time.Duration
	// SQLiteMaxPages caps the SQLite database at this many pages
	// (PRAGMA max_page_count, set on every connection; pages are 4096
	// bytes by default). A write past the cap fails with SQLITE_FULL,
	// reported as ErrUnavailable of kind FailDiskFull, until pages are
	// freed (Prune). It also lets tests make a real "disk full". Default
	// 0: no cap beyond SQLite's own. Ignored for PostgreSQL.
	SQLiteMaxPages int
}

// Store is an open event store. It is safe for concurrent use.
type Store struct {
	db   *sql.DB
	d    dialect
	opts Options

	mu      sync.RWMutex // guards closed and sends on reqs
	closed  bool
	reqs    chan *request
	stopped chan struct{}

	groups  atomic.Int64 // group transactions attempted (tests, diagnostics)
	batches atomic.Int64 // batches taken by the writer
	queued  atomic.Int64 // batches handed to Append and not yet taken by the writer (QueueDepth)
}

// Open opens (and migrates) the store named by dsn: "sqlite:PATH" or
// "postgres://..." / "postgresql://...". It uses default Options.
func Open(ctx context.Context, dsn string) (*Store, error) {
	return OpenWith(ctx, dsn, Options{})
}

// OpenWith is Open with explicit Options.
func OpenWith(ctx context.Context, dsn string, opts Options) (*Store, error) {
	if opts.MaxBatches <= 0 {
		opts.MaxBatches = 64
	}
	if opts.WriteTimeout <= 0 {
		opts.WriteTimeout = 15 * time.Second
	}
	if opts.RetryAfter <= 0 {
		opts.RetryAfter = 5 * time.Second
	}
	var (
		db  *sql.DB
		d   dialect
		err error
	)
	switch {
	case strings.HasPrefix(dsn, "sqlite:"):
		db, d, err = openSQLite(ctx, strings.TrimPrefix(dsn, "sqlite:"), opts.SQLiteMaxPages)
	case strings.HasPrefix(dsn, "postgres://"), strings.HasPrefix(dsn, "postgresql://"):
		db, d, err = openPostgres(ctx, dsn)
	default:
		scheme, _, _ := strings.Cut(dsn, ":") // never echo the rest: it may hold a password
		return nil, fmt.Errorf("store: open: unsupported dsn scheme %q (want sqlite: or postgres://)", scheme)
	}
	if err != nil {
		return nil, err
	}
	if err := migrate(ctx, db, d); err != nil {
		db.Close()
		return nil, err
	}
	s := &Store{db: db, d: d, opts: opts, reqs: make(chan *request, opts.MaxBatches), stopped: make(chan struct{})}
	go s.run()
	return s, nil
}

// Close waits for queued batches to be committed, then closes the database.
// Append after Close returns ErrUnavailable.
func (s *Store) Close() error {
	s.mu.Lock()
	if s.closed {
		s.mu.Unlock()
		return nil
	}
	s.closed = true
	close(s.reqs)
	s.mu.Unlock()
	<-s.stopped
	if err := s.db.Close(); err != nil {
		return fmt.Errorf("store: close: %w", err)
	}
	return nil
}

// Count returns the number of stored events.
func (s *Store) Count(ctx context.Context) (int, error) {
	var n int
	if err := s.db.QueryRowContext(ctx, "SELECT COUNT(*) FROM events").Scan(&n); err != nil {
		return 0, fmt.Errorf("store: count: %w: %w", ErrUnavailable, err)
	}
	return n, nil
}

// Prune deletes events (and impressions) older than before and returns how
// many events it deleted. Aggregates derived from them are the callers'.
func (s *Store) Prune(ctx context.Context, before time.Time) (int, error) {
	cut := before.UnixNano()
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return 0, fmt.Errorf("store: prune: %w: %w", ErrUnavailable, err)
	}
	defer tx.Rollback() //nolint:errcheck // no-op after Commit
	res, err := tx.ExecContext(ctx, s.d.q("DELETE FROM events WHERE at_ns < ?"), cut)
	if err != nil {
		return 0, fmt.Errorf("store: prune: %w: %w", ErrUnavailable, err)
	}
	n, _ := res.RowsAffected()
	for _, q := range []string{
		"DELETE FROM impression_terms WHERE impression IN (SELECT id FROM impressions WHERE at_ns < ?)",
		"DELETE FROM impressions WHERE at_ns < ?",
	} {
		if _, err := tx.ExecContext(ctx, s.d.q(q), cut); err != nil {
			return 0, fmt.Errorf("store: prune: %w: %w", ErrUnavailable, err)
		}
	}
	if err := tx.Commit(); err != nil {
		return 0, fmt.Errorf("store: prune: %w: %w", ErrUnavailable, err)
	}
	return int(n), nil
}

// Events calls fn for every event with Time >= since (all events for the
// zero time), in commit order, and stops at fn's first error, which it
// returns wrapped. Commit order is the order of the events' sequence
// numbers; the single writer goroutine makes it the commit order for all
// writes made through one Store (see group.go). fn runs while the query's
// rows are open: it should not block for long.
func (s *Store) Events(ctx context.Context, since time.Time, fn func(Event) error) error {
	var cut int64 = math.MinInt64
	if !since.IsZero() {
		cut = since.UnixNano()
	}
	rows, err := s.db.QueryContext(ctx, s.d.q(`SELECT id, impression, kind, at_ns, session_id, department,
 groups_hash, query_key, term, pos, doc, doc_rank, terms, sources
 FROM events WHERE at_ns >= ? ORDER BY seq`), cut)
	if err != nil {
		return fmt.Errorf("store: events: %w: %w", ErrUnavailable, err)
	}
	defer rows.Close()
	for rows.Next() {
		var (
			e              Event
			ns             int64
			terms, sources string
		)
		if err := rows.Scan(&e.ID, &e.Impression, &e.Kind, &ns, &e.Session, &e.Department,
			&e.GroupsHash, &e.Query, &e.Term, &e.Position, &e.Doc, &e.Rank, &terms, &sources); err != nil {
			return fmt.Errorf("store: events: %w", err)
		}
		e.Time = time.Unix(0, ns).UTC()
		if e.Terms, err = decodeList(terms); err != nil {
			return err
		}
		if e.Sources, err = decodeList(sources); err != nil {
			return err
		}
		if err := fn(e); err != nil {
			return fmt.Errorf("store: events: %w", err)
		}
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("store: events: %w: %w", ErrUnavailable, err)
	}
	return nil
}

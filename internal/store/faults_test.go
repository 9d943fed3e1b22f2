package store

import (
	"context"
	"errors"
	"fmt"
	"net"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"
)

// appendUntilFull appends batches of one impression plus three accepts
// until one fails, and returns the acknowledged event ids and that error
// (nil if all n batches were acknowledged).
func appendUntilFull(t *testing.T, s *Store, prefix string, n int) ([]string, []string, error) {
	t.Helper()
	var acked []string
	for i := 0; i < n; i++ {
		imp := fmt.Sprintf("%s-%d", prefix, i)
		batch := []Event{impression(imp, t0, "seal", "impeller", "gasket")}
		for j, term := range []string{"seal", "impeller", "gasket"} {
			batch = append(batch, accept(fmt.Sprintf("%s-a%d", imp, j), imp, term, j, t0))
		}
		batch[0].Query = strings.Repeat("pump maintenance ", 20) // ~350 bytes: pages fill in a few dozen batches
		if err := s.Append(context.Background(), batch); err != nil {
			var ids []string
			for _, e := range batch {
				ids = append(ids, e.ID)
			}
			return acked, ids, err
		}
		for _, e := range batch {
			acked = append(acked, e.ID)
		}
	}
	return acked, nil, nil
}

// TestStoreDiskFullSQLite makes a real SQLITE_FULL: the database is capped
// at its current size with PRAGMA max_page_count (SQLite documentation,
// "PRAGMA max_page_count": a write needing a page past the cap fails with
// SQLITE_FULL, "database or disk is full", the same code as ENOSPC on the
// file system). The failed batch must report ErrUnavailable of kind
// FailDiskFull and leave nothing behind; after Prune frees the pages of
// old "ballast" events, writes succeed again and every acknowledged event
// is stored.
func TestStoreDiskFullSQLite(t *testing.T) {
	ctx := context.Background()
	dsn := sqliteDSN(t)
	s, err := Open(ctx, dsn)
	if err != nil {
		t.Fatal(err)
	}
	old := t0.Add(-365 * 24 * time.Hour)
	for i := 0; i < 40; i++ {
		imp := fmt.Sprintf("ballast-%d", i)
		e := impression(imp, old, "seal")
		e.Query = strings.Repeat("ballast ", 60)
		if err := s.Append(ctx, []Event{e}); err != nil {
			t.Fatal(err)
		}
	}
	var pages int
	if err := s.db.QueryRowContext(ctx, "PRAGMA page_count").Scan(&pages); err != nil {
		t.Fatal(err)
	}
	s.Close()

	s, err = OpenWith(ctx, dsn, Options{SQLiteMaxPages: pages})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	acked, failed, err := appendUntilFull(t, s, "full", 500)
	if err == nil {
		t.Fatalf("500 batches fit in a database capped at %d pages", pages)
	}
	if !errors.Is(err, ErrUnavailable) || FailureKind(err) != FailDiskFull {
		t.Fatalf("append on a full database: %v (kind %q), want ErrUnavailable of kind %q", err, FailureKind(err), FailDiskFull)
	}
	t.Logf("capped at %d pages: %d events acknowledged, then %v", pages, len(acked), err)
	stored := map[string]bool{}
	for _, e := range allEvents(t, s) {
		stored[e.ID] = true
	}
	for _, id := range failed {
		if stored[id] {
			t.Errorf("event %s of the failed batch was stored", id)
		}
	}
	// Still full: a retry fails the same way (nothing was half-written).
	if _, _, err := appendUntilFull(t, s, "again", 1); FailureKind(err) != FailDiskFull {
		t.Fatalf("retry while full: %v, want kind %q", err, FailDiskFull)
	}
	n, err := s.Prune(ctx, t0.Add(-time.Hour))
	if err != nil || n != 40 {
		t.Fatalf("prune the ballast: %d, %v; want 40 deleted", n, err)
	}
	more, _, err := appendUntilFull(t, s, "after", 5)
	if err != nil {
		t.Fatalf("append after freeing space: %v", err)
	}
	stored = map[string]bool{}
	for _, e := range allEvents(t, s) {
		stored[e.ID] = true
	}
	for _, id := range append(acked, more...) {
		if !stored[id] {
			t.Errorf("acknowledged event %s missing after recovery", id)
		}
	}
}

// TestStoreReadOnlySQLite makes the writer's connection refuse writes with
// PRAGMA query_only (SQLite documentation, "PRAGMA query_only": writes
// fail with SQLITE_READONLY), the code a read-only file or mount gives.
// The pool is narrowed to one connection so the writer gets that one.
func TestStoreReadOnlySQLite(t *testing.T) {
	ctx := context.Background()
	s := openTest(t, backend{name: "sqlite", dsn: sqliteDSN})
	s.db.SetMaxOpenConns(1)
	if _, err := s.db.ExecContext(ctx, "PRAGMA query_only = 1"); err != nil {
		t.Fatal(err)
	}
	_, _, err := appendUntilFull(t, s, "ro", 1)
	if !errors.Is(err, ErrUnavailable) || FailureKind(err) != FailReadOnly {
		t.Fatalf("append on a read-only database: %v (kind %q), want ErrUnavailable of kind %q", err, FailureKind(err), FailReadOnly)
	}
	if _, err := s.db.ExecContext(ctx, "PRAGMA query_only = 0"); err != nil {
		t.Fatal(err)
	}
	acked, _, err := appendUntilFull(t, s, "rw", 2)
	if err != nil {
		t.Fatalf("append once writable again: %v", err)
	}
	if got := len(allEvents(t, s)); got != len(acked) {
		t.Errorf("%d events stored, want the %d acknowledged", got, len(acked))
	}
}

// TestStorePostgresReadOnly makes the writer's session read-only with
// SET default_transaction_read_only (PostgreSQL documentation, "Client
// Connection Defaults"), on a pool narrowed to that one session: inserts
// fail with SQLSTATE 25006 read_only_sql_transaction, which must map to
// FailReadOnly; after SET ... off the store writes again.
func TestStorePostgresReadOnly(t *testing.T) {
	ctx := context.Background()
	s := openTest(t, backend{name: "postgres", dsn: postgresDSN})
	s.db.SetMaxOpenConns(1)
	if _, err := s.db.ExecContext(ctx, "SET default_transaction_read_only = on"); err != nil {
		t.Fatal(err)
	}
	_, _, err := appendUntilFull(t, s, "ro", 1)
	if !errors.Is(err, ErrUnavailable) || FailureKind(err) != FailReadOnly {
		t.Fatalf("append in a read-only session: %v (kind %q), want ErrUnavailable of kind %q", err, FailureKind(err), FailReadOnly)
	}
	if _, err := s.db.ExecContext(ctx, "SET default_transaction_read_only = off"); err != nil {
		t.Fatal(err)
	}
	if _, _, err := appendUntilFull(t, s, "rw", 1); err != nil {
		t.Fatalf("append once writable again: %v", err)
	}
}

// TestStoreFailureKinds checks the kinds of failures that need no
// database: a refused connection, a closed store, deadlines, plain
// file-system errnos, and nil.
func TestStoreFailureKinds(t *testing.T) {
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	addr := ln.Addr().String()
	ln.Close() // nothing listens there now: connection refused
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	_, refused := Open(ctx, "postgres://postgres@"+addr+"/test?sslmode=disable&connect_timeout=2")
	closed, err := Open(ctx, sqliteDSN(t))
	if err != nil {
		t.Fatal(err)
	}
	closed.Close()
	afterClose := closed.Append(ctx, []Event{impression("i", t0, "a")})
	for _, c := range []struct {
		name        string
		err         error
		want        string
		unavailable bool // the store itself must have wrapped ErrUnavailable
	}{
		{"connection refused", refused, FailConnection, true},
		{"closed store", afterClose, FailClosed, true},
		{"deadline", context.DeadlineExceeded, FailTimeout, false},
		{"no space errno", fmt.Errorf("write: %w", syscall.ENOSPC), FailDiskFull, false},
		{"read-only file system errno", fmt.Errorf("write: %w", syscall.EROFS), FailReadOnly, false},
		{"nil", nil, "", false},
		{"unknown", errors.New("something else"), FailOther, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			if c.unavailable && !errors.Is(c.err, ErrUnavailable) {
				t.Errorf("%v is not ErrUnavailable", c.err)
			}
			if got := FailureKind(c.err); got != c.want {
				t.Errorf("FailureKind(%v) = %q, want %q", c.err, got, c.want)
			}
		})
	}
}

// TestQueueDepth holds SQLite's write lock from a second transaction so
// the writer blocks in BEGIN IMMEDIATE (busy_timeout): the first batch is
// taken by the writer, the other four wait, and QueueDepth must say 4; once
// the lock goes, all five commit and the depth falls back to 0.
func TestQueueDepth(t *testing.T) {
	ctx := context.Background()
	s := openTest(t, backend{name: "sqlite", dsn: sqliteDSN})
	if got := s.QueueDepth(); got != 0 {
		t.Fatalf("idle depth %d, want 0", got)
	}
	lock, err := s.db.BeginTx(ctx, nil) // _txlock=immediate: takes the write lock now
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	errs := make(chan error, 5)
	start := func(i int) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			errs <- s.Append(ctx, []Event{impression(fmt.Sprintf("q%d", i), t0, "seal")})
		}()
	}
	start(0)
	waitFor(t, func() bool { return s.groups.Load() == 1 }, "the writer to take the first batch")
	for i := 1; i < 5; i++ {
		start(i)
	}
	waitFor(t, func() bool { return s.QueueDepth() == 4 }, "four batches to queue")
	if err := lock.Rollback(); err != nil {
		t.Fatal(err)
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		if err != nil {
			t.Errorf("append: %v", err)
		}
	}
	if got := s.QueueDepth(); got != 0 {
		t.Errorf("depth after the commits %d, want 0", got)
	}
	if got := len(allEvents(t, s)); got != 5 {
		t.Errorf("%d events stored, want 5", got)
	}
}

func waitFor(t *testing.T, cond func() bool, what string) {
	t.Helper()
	deadline := time.Now().Add(5 * time.Second)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatalf("timed out waiting for %s", what)
		}
		time.Sleep(5 * time.Millisecond)
	}
}

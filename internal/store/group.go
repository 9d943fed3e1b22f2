package store

// Group commit.
//
// Append validates its batch on the caller's goroutine (no database work),
// then queues it on s.reqs and waits. One writer goroutine (run) takes the
// first queued batch, then everything else already queued (or arriving
// within Options.MaxWait) up to Options.MaxBatches, and writes the whole
// group in ONE transaction:
//
//	BEGIN
//	  for each batch: SAVEPOINT; insert its events (replay and
//	  unknown-impression checks happen here, in order, so a batch may
//	  refer to an impression from an earlier batch of the same group);
//	  on a rejection ROLLBACK TO SAVEPOINT (that batch alone is dropped),
//	  else RELEASE
//	COMMIT
//
// Each caller is woken with its own result only after COMMIT returns, so
// "nil" always means "durable". While one group's commit is syncing, new
// batches queue up and form the next group: with synchronous commits the
// sync dominates, and one sync is shared by every batch in the group.
//
// If BEGIN, a statement or COMMIT fails for a reason other than a
// rejection, every batch of the group gets ErrUnavailable and none is
// committed. A caller whose ctx ends while waiting gets ctx's error; its
// batch may still commit, which is safe to retry: the event ids make a
// retry answer ErrReplay instead of writing twice.

import (
	"context"
	"errors"
	"fmt"
	"time"
)

type request struct {
	ctx   context.Context
	batch []Event
	done  chan error // buffered, receives exactly one result
}

// Append validates batch and commits it in one transaction, returning only
// after the commit. An empty batch is a no-op. Errors wrap ErrInvalid,
// ErrUnknownImpression, ErrReplay or ErrUnavailable (or are ctx's error).
func (s *Store) Append(ctx context.Context, batch []Event) error {
	if len(batch) == 0 {
		return nil
	}
	if err := validateBatch(batch); err != nil {
		return fmt.Errorf("store: append: %w", err)
	}
	r := &request{ctx: ctx, batch: batch, done: make(chan error, 1)}
	s.mu.RLock()
	if s.closed {
		s.mu.RUnlock()
		return fmt.Errorf("store: append: %w: %w", ErrUnavailable, errClosed)
	}
	s.queued.Add(1)
	select {
	case s.reqs <- r:
	case <-ctx.Done():
		s.queued.Add(-1)
		s.mu.RUnlock()
		return fmt.Errorf("store: append: %w", ctx.Err())
	}
	s.mu.RUnlock()
	select {
	case err := <-r.done:
		return err
	case <-ctx.Done():
		return fmt.Errorf("store: append: %w (the batch may still commit; retry with the same ids)", ctx.Err())
	}
}

// run is the single writer goroutine; it ends when Close closes s.reqs and
// the queue is drained.
func (s *Store) run() {
	defer close(s.stopped)
	for first := range s.reqs {
		s.queued.Add(-1)
		s.commitGroup(s.gather(first))
	}
}

// gather collects the group that starts with first.
func (s *Store) gather(first *request) []*request {
	group := []*request{first}
	var timeout <-chan time.Time
	if s.opts.MaxWait > 0 {
		t := time.NewTimer(s.opts.MaxWait)
		defer t.Stop()
		timeout = t.C
	}
	for len(group) < s.opts.MaxBatches {
		if timeout == nil {
			select {
			case r, ok := <-s.reqs:
				if !ok {
					return group
				}
				s.queued.Add(-1)
				group = append(group, r)
				continue
			default:
				return group
			}
		}
		select {
		case r, ok := <-s.reqs:
			if !ok {
				return group
			}
			s.queued.Add(-1)
			group = append(group, r)
		case <-timeout:
			return group
		}
	}
	return group
}

// rejection reports whether err rejects one batch (rather than the group).
func rejection(err error) bool {
	return errors.Is(err, ErrReplay) || errors.Is(err, ErrUnknownImpression) || errors.Is(err, ErrInvalid)
}

func (s *Store) commitGroup(group []*request) {
	s.groups.Add(1)
	s.batches.Add(int64(len(group)))
	results := make([]error, len(group))
	live := 0
	for i, r := range group {
		if err := r.ctx.Err(); err != nil {
			results[i] = fmt.Errorf("store: append: %w", err) // caller gave up before the write began
			continue
		}
		live++
	}
	if live > 0 {
		if err := s.writeGroup(group, results, live == 1); err != nil {
			for i := range results {
				if results[i] == nil || !rejection(results[i]) {
					results[i] = err
				}
			}
		}
	}
	for i, r := range group {
		r.done <- results[i]
	}
}

// writeGroup runs the group transaction; it fills results with per-batch
// rejections and returns a group-wide ErrUnavailable error, if any. A group
// of one batch needs no savepoint: its rejection rolls back the whole
// transaction (two round trips fewer on the common idle path).
func (s *Store) writeGroup(group []*request, results []error, single bool) error {
	ctx, cancel := context.WithTimeout(context.Background(), s.opts.WriteTimeout)
	defer cancel()
	unavailable := func(err error) error { return fmt.Errorf("store: append: %w: %w", ErrUnavailable, err) }
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return unavailable(err)
	}
	defer tx.Rollback() //nolint:errcheck // no-op after Commit
	w := &txWriter{s: s, ctx: ctx, tx: tx}
	for i, r := range group {
		if results[i] != nil {
			continue
		}
		if single {
			err := w.writeBatch(r.batch)
			if rejection(err) {
				results[i] = fmt.Errorf("store: append: %w", err)
				return nil // deferred Rollback discards the batch
			}
			if err != nil {
				return unavailable(err)
			}
			break
		}
		if _, err := tx.ExecContext(ctx, "SAVEPOINT kw_batch"); err != nil {
			return unavailable(err)
		}
		err := w.writeBatch(r.batch)
		switch {
		case err == nil:
			if _, err := tx.ExecContext(ctx, "RELEASE SAVEPOINT kw_batch"); err != nil {
				return unavailable(err)
			}
		case rejection(err):
			results[i] = fmt.Errorf("store: append: %w", err)
			if _, err := tx.ExecContext(ctx, "ROLLBACK TO SAVEPOINT kw_batch"); err != nil {
				return unavailable(err)
			}
			if _, err := tx.ExecContext(ctx, "RELEASE SAVEPOINT kw_batch"); err != nil {
				return unavailable(err)
			}
		default:
			return unavailable(err)
		}
	}
	if err := tx.Commit(); err != nil {
		return unavailable(err)
	}
	return nil
}

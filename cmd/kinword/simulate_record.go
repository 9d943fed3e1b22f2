package main

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	mrand "math/rand/v2"
	"time"

	"kinword/internal/access"
	"kinword/internal/demo"
	"kinword/internal/finder"
	"kinword/internal/store"
)

// Shape of the recorded traffic (simulate --record).
const (
	// recordSpan is how far back the recorded sessions reach: they are
	// spread evenly over the span ending at the time of the run.
	recordSpan = 30 * 24 * time.Hour
	// recordClickProb is the chance that a searcher who accepted a term
	// then opens the first relevant result of the refined search.
	recordClickProb = 0.7
	// recordAcceptAfter and recordClickAfter place a session's accept and
	// click after its impression.
	recordAcceptAfter = 4 * time.Second
	recordClickAfter  = 15 * time.Second
)

// simRecorder turns simulated sessions into store events as the search
// page would send them, and writes them to the event store.
type simRecorder struct {
	st     *store.Store
	qrels  map[string]map[string]int // topic id -> document id -> grade
	rng    *mrand.Rand               // click coins: its own stream, so the simulation's draws (and report) stay as without --record
	start  time.Time                 // first session's time
	step   time.Duration             // between consecutive sessions
	now    time.Time                 // no event is later
	n      int                       // sessions seen
	events []store.Event
	counts map[string]int // recorded events per kind
}

// newSimRecorder prepares to record total sessions ending at now.
func newSimRecorder(st *store.Store, j *demo.Judged, seed uint64, now time.Time, total int) *simRecorder {
	return &simRecorder{st: st, qrels: j.Qrels, rng: mrand.New(mrand.NewPCG(seed^0x5eed, seed+2)),
		start: now.Add(-recordSpan), step: recordSpan / time.Duration(max(1, total)), now: now, counts: map[string]int{}}
}

// simEventID is 16 random bytes in hex, as the search page makes its ids.
func simEventID() (string, error) {
	var b [16]byte
	if _, err := rand.Read(b[:]); err != nil {
		return "", fmt.Errorf("simulate: random id: %w", err)
	}
	return hex.EncodeToString(b[:]), nil
}

// session records one simulated session of topic t in dept: the
// impression of shown (term keys in order, query as its canonical key),
// the accept at pos (pos < 0: none), and after an accept, with
// recordClickProb, a click on the first judged-relevant result of the
// search refined with the accepted term (rank 0-based, Terms the accepted
// keys). The cascade model sets nothing aside, so no dismissal is made.
func (r *simRecorder) session(ctx context.Context, f *finder.Finder, dept string, t demo.Topic, shown []string, pos int) error {
	at := r.start.Add(time.Duration(r.n) * r.step)
	r.n++
	imp, err := simEventID()
	if err != nil {
		return err
	}
	tok, err := simEventID()
	if err != nil {
		return err
	}
	// The page's session token: its UTC day, a dot, 32 hex digits.
	base := store.Event{Impression: imp, Session: at.Format("20060102") + "." + tok, Department: dept,
		Query: f.CanonicalQuery(t.Text)}
	add := func(e store.Event, after time.Duration) error {
		id, err := simEventID()
		if err != nil {
			return err
		}
		e.ID, e.Time = id, at.Add(after)
		if e.Time.After(r.now) {
			e.Time = r.now
		}
		r.events = append(r.events, e)
		r.counts[e.Kind]++
		return nil
	}
	ev := base
	ev.Kind, ev.Terms = store.KindImpression, append([]string(nil), shown...)
	if err := add(ev, 0); err != nil {
		return err
	}
	if pos < 0 || pos >= len(shown) {
		return nil
	}
	ev = base
	ev.Kind, ev.Term, ev.Position = store.KindAccept, shown[pos], pos
	if err := add(ev, recordAcceptAfter); err != nil {
		return err
	}
	if r.rng.Float64() >= recordClickProb {
		return nil
	}
	accepted := []string{shown[pos]}
	resp, err := f.Search(ctx, finder.Request{Query: t.Text, Accepted: accepted, Viewer: access.Viewer{Department: dept}, WithResults: true})
	if err != nil {
		return fmt.Errorf("simulate: refined search for %s: %w", t.ID, err)
	}
	for _, res := range resp.Results {
		if r.qrels[t.ID][res.ID] > 0 {
			ev = base
			ev.Kind, ev.Doc, ev.Rank, ev.Terms = store.KindClick, res.ID, res.Rank-1, accepted
			return add(ev, recordClickAfter)
		}
	}
	return nil
}

// flush appends the recorded events in commit-sized batches, oldest
// first, and returns how many were stored. Batches already committed stay
// when a later one fails; the error says how many.
func (r *simRecorder) flush(ctx context.Context) (int, error) {
	done := 0
	for done < len(r.events) {
		end := min(done+store.MaxBatch, len(r.events))
		if err := r.st.Append(ctx, r.events[done:end]); err != nil {
			return done, fmt.Errorf("simulate: record events: %d of %d stored before: %w", done, len(r.events), err)
		}
		done = end
	}
	return done, nil
}

// summary is the line telling what was recorded.
func (r *simRecorder) summary(stored int) string {
	return fmt.Sprintf("recorded %d events in the event store (%d impressions, %d accepts, %d clicks) from %s to %s",
		stored, r.counts[store.KindImpression], r.counts[store.KindAccept], r.counts[store.KindClick],
		r.start.Format(time.RFC3339), r.now.Format(time.RFC3339))
}

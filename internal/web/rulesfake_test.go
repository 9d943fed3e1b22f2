package web

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"sort"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"kinword/internal/curate"
	"kinword/internal/review"
)

// fakeBook is an in-memory RuleBook with the store's contract: versions
// from 1, +1 per change, stale versions and taken IDs refused, one audit
// entry per change, reverts only over an unchanged rule.
type fakeBook struct {
	mu    sync.Mutex
	rules map[string]RuleRecord
	log   []AuditEntry
	next  int
	imps  []Impression
}

func newFakeBook() *fakeBook { return &fakeBook{rules: map[string]RuleRecord{}} }

func (b *fakeBook) Rules(context.Context) ([]RuleRecord, int64, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	out := make([]RuleRecord, 0, len(b.rules))
	for _, r := range b.rules {
		out = append(out, r)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].ID < out[j].ID })
	return out, int64(len(b.log)), nil
}

// record logs one change; the caller holds mu.
func (b *fakeBook) record(action, id, actor, why string, before, after *RuleRecord) AuditEntry {
	e := AuditEntry{Seq: int64(len(b.log) + 1), RuleID: id, Actor: actor, Action: action, Reason: why, At: time.Now().UTC(), Before: before, After: after}
	b.log = append(b.log, e)
	return e
}

// put stores r at version v; the caller holds mu.
func (b *fakeBook) put(r curate.Rule, v int64) *RuleRecord {
	rec := RuleRecord{Rule: r, Version: v, Updated: time.Now().UTC()}
	b.rules[r.ID] = rec
	return &rec
}

func (b *fakeBook) add(r curate.Rule, action, actor, why string) (RuleRecord, error) {
	if r.ID == "" {
		b.next++
		r.ID = fmt.Sprintf("f%03d", b.next)
	}
	if _, ok := b.rules[r.ID]; ok {
		return RuleRecord{}, fmt.Errorf("fake: id %q: %w", r.ID, ErrRuleConflict)
	}
	rec := b.put(r, 1)
	b.record(action, r.ID, actor, why, nil, rec)
	return *rec, nil
}

func (b *fakeBook) Create(_ context.Context, r curate.Rule, actor, why string) (RuleRecord, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.add(r, "create", actor, why)
}

func (b *fakeBook) current(id string, v int64) (RuleRecord, error) {
	cur, ok := b.rules[id]
	switch {
	case !ok:
		return cur, fmt.Errorf("fake: %q: %w", id, ErrRuleNotFound)
	case cur.Version != v:
		return cur, fmt.Errorf("fake: %q at version %d, not %d: %w", id, cur.Version, v, ErrRuleConflict)
	}
	return cur, nil
}

func (b *fakeBook) Update(_ context.Context, r RuleRecord, actor, why string) (RuleRecord, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	cur, err := b.current(r.ID, r.Version)
	if err != nil {
		return RuleRecord{}, err
	}
	rec := b.put(r.Rule, cur.Version+1)
	b.record("update", r.ID, actor, why, &cur, rec)
	return *rec, nil
}

func (b *fakeBook) Delete(_ context.Context, id string, v int64, actor, why string) error {
	b.mu.Lock()
	defer b.mu.Unlock()
	cur, err := b.current(id, v)
	if err != nil {
		return err
	}
	delete(b.rules, id)
	b.record("delete", id, actor, why, &cur, nil)
	return nil
}

func (b *fakeBook) Audit(_ context.Context, ruleID string, limit int) ([]AuditEntry, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	var out []AuditEntry
	for i := len(b.log) - 1; i >= 0 && len(out) < limit; i-- {
		if ruleID == "" || b.log[i].RuleID == ruleID {
			out = append(out, b.log[i])
		}
	}
	return out, nil
}

func (b *fakeBook) Revert(_ context.Context, seq int64, actor, why string) (AuditEntry, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	if seq < 1 || seq > int64(len(b.log)) {
		return AuditEntry{}, fmt.Errorf("fake: entry %d: %w", seq, ErrRuleNotFound)
	}
	e := b.log[seq-1]
	cur, has := b.rules[e.RuleID]
	if (e.After == nil) == has || (has && cur.Version != e.After.Version) {
		return AuditEntry{}, fmt.Errorf("fake: rule %q changed after entry %d: %w", e.RuleID, seq, ErrRuleConflict)
	}
	var before, after *RuleRecord
	if has {
		before = &cur
		delete(b.rules, e.RuleID)
	}
	if e.Before != nil {
		after = b.put(e.Before.Rule, max(e.Before.Version, cur.Version)+1)
	}
	return b.record("revert", e.RuleID, actor, why, before, after), nil
}

func (b *fakeBook) Import(_ context.Context, rules []curate.Rule, replace bool, actor, why string) error {
	b.mu.Lock()
	defer b.mu.Unlock()
	if replace {
		ids := make([]string, 0, len(b.rules))
		for id := range b.rules {
			ids = append(ids, id)
		}
		sort.Strings(ids)
		for _, id := range ids {
			r := b.rules[id]
			b.record("import", id, actor, why, &r, nil)
		}
		b.rules = map[string]RuleRecord{}
	}
	for _, r := range rules {
		if _, ok := b.rules[r.ID]; ok {
			return fmt.Errorf("fake: id %q: %w", r.ID, ErrRuleConflict) // checked before any write: all or nothing
		}
	}
	for _, r := range rules {
		if _, err := b.add(r, "import", actor, why); err != nil {
			return err
		}
	}
	return nil
}

func (b *fakeBook) Impressions(_ context.Context, since time.Time, fn func(Impression) error) error {
	b.mu.Lock()
	imps := append([]Impression(nil), b.imps...)
	b.mu.Unlock()
	for _, im := range imps {
		if !im.Time.Before(since) {
			if err := fn(im); err != nil {
				return err
			}
		}
	}
	return nil
}

// fakeReviewer reviews a fixed slice of events and keeps the options it
// was last called with.
type fakeReviewer struct {
	events []review.Event
	mu     sync.Mutex
	last   review.Options
}

func (r *fakeReviewer) Review(_ context.Context, o review.Options) (*review.Report, error) {
	r.mu.Lock()
	r.last = o
	r.mu.Unlock()
	return review.Build(r.events, o), nil
}

// curationServer is a server over a fake rule book and reviewer, with a
// librarian token "cataloguer" and an admin token "ops"; departments are
// the three of the test corpus.
type curationServer struct {
	s        *Server
	book     *fakeBook
	rev      *fakeReviewer
	lib, adm map[string]string
	changes  *atomic.Int64
}

func newCurationServer(t testing.TB) curationServer {
	t.Helper()
	lib, libSum, err := NewToken()
	if err != nil {
		t.Fatal(err)
	}
	adm, admSum, err := NewToken()
	if err != nil {
		t.Fatal(err)
	}
	cs := curationServer{book: newFakeBook(), rev: &fakeReviewer{}, lib: bearerHdr(lib), adm: bearerHdr(adm), changes: &atomic.Int64{}}
	cs.s, err = New(nil, Options{
		Tokens:       []Token{{Name: "cataloguer", Role: RoleLibrarian, SHA256: libSum}, {Name: "ops", Role: RoleAdmin, SHA256: admSum}},
		Rules:        cs.book,
		Reviewer:     cs.rev,
		Departments:  []string{"field-operations", "customer-care", "asset-engineering"},
		RulesChanged: func() { cs.changes.Add(1) },
		Log:          slog.New(slog.NewTextHandler(io.Discard, nil)),
	})
	if err != nil {
		t.Fatal(err)
	}
	return cs
}

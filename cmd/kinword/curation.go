package main

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"sync"
	"time"

	"kinword/internal/curate"
	"kinword/internal/finder"
	"kinword/internal/review"
	"kinword/internal/store"
	"kinword/internal/text"
	"kinword/internal/web"
)

// curation is the librarian rule book and the admin reviewer of the web
// layer, over the store: it converts store rules, audit entries and events
// into the web's and review's types and store errors into the web's
// sentinels.
type curation struct {
	st *store.Store
}

var (
	_ web.RuleBook = curation{}
	_ web.Reviewer = curation{}
)

// fromStore converts a stored rule.
func fromStore(r store.Rule) web.RuleRecord {
	return web.RuleRecord{Rule: curate.Rule{ID: r.ID, Kind: curate.Kind(r.Kind), Query: r.Query, Term: r.Term,
		Department: r.Department, Start: r.Start, Expiry: r.Expiry, Reason: r.Reason, Lang: r.Lang},
		Version: r.Version, Updated: r.Updated}
}

// toStore converts a curation rule (Version and Updated are the store's).
func toStore(r curate.Rule) store.Rule {
	return store.Rule{ID: r.ID, Kind: string(r.Kind), Query: r.Query, Term: r.Term, Department: r.Department,
		Start: r.Start, Expiry: r.Expiry, Reason: r.Reason, Lang: r.Lang}
}

// fromEntry converts an audit entry.
func fromEntry(e store.AuditEntry) web.AuditEntry {
	out := web.AuditEntry{Seq: e.Seq, RuleID: e.RuleID, Actor: e.Actor, Action: e.Action, Reason: e.Reason, At: e.At}
	if e.Before != nil {
		r := fromStore(*e.Before)
		out.Before = &r
	}
	if e.After != nil {
		r := fromStore(*e.After)
		out.After = &r
	}
	return out
}

// webErr wraps a store error with the web sentinel the route answers by.
func webErr(err error) error {
	switch {
	case err == nil:
		return nil
	case errors.Is(err, store.ErrRuleNotFound):
		return fmt.Errorf("%w: %w", web.ErrRuleNotFound, err)
	case errors.Is(err, store.ErrConflict):
		return fmt.Errorf("%w: %w", web.ErrRuleConflict, err)
	case errors.Is(err, store.ErrInvalid):
		return fmt.Errorf("%w: %w", web.ErrRuleInvalid, err)
	}
	return err
}

func (c curation) Rules(ctx context.Context) ([]web.RuleRecord, int64, error) {
	// The version is read first: a change between the two reads makes the
	// version older than the rules, never newer, so a client polling it
	// reloads once more rather than missing a change.
	v, err := c.st.RulesVersion(ctx)
	if err != nil {
		return nil, 0, err
	}
	rs, err := c.st.Rules(ctx)
	if err != nil {
		return nil, 0, err
	}
	out := make([]web.RuleRecord, len(rs))
	for i, r := range rs {
		out[i] = fromStore(r)
	}
	return out, v, nil
}

func (c curation) Create(ctx context.Context, r curate.Rule, actor, why string) (web.RuleRecord, error) {
	got, err := c.st.CreateRule(ctx, toStore(r), actor, why)
	return fromStore(got), webErr(err)
}

func (c curation) Update(ctx context.Context, r web.RuleRecord, actor, why string) (web.RuleRecord, error) {
	s := toStore(r.Rule)
	s.Version = r.Version
	got, err := c.st.UpdateRule(ctx, s, actor, why)
	return fromStore(got), webErr(err)
}

func (c curation) Delete(ctx context.Context, id string, version int64, actor, why string) error {
	return webErr(c.st.DeleteRule(ctx, id, version, actor, why))
}

func (c curation) Audit(ctx context.Context, ruleID string, limit int) ([]web.AuditEntry, error) {
	es, err := c.st.Audit(ctx, store.AuditFilter{RuleID: ruleID, Limit: limit})
	if err != nil {
		return nil, webErr(err)
	}
	out := make([]web.AuditEntry, len(es))
	for i, e := range es {
		out[i] = fromEntry(e)
	}
	return out, nil
}

func (c curation) Revert(ctx context.Context, seq int64, actor, why string) (web.AuditEntry, error) {
	e, err := c.st.Revert(ctx, seq, actor, why)
	if err != nil {
		return web.AuditEntry{}, webErr(err)
	}
	return fromEntry(e), nil
}

func (c curation) Import(ctx context.Context, rules []curate.Rule, replace bool, actor, why string) error {
	rs := make([]store.Rule, len(rules))
	for i, r := range rules {
		rs[i] = toStore(r)
	}
	if replace {
		return webErr(c.st.ReplaceRules(ctx, rs, actor, why))
	}
	return webErr(c.st.ImportRules(ctx, rs, actor, why))
}

func (c curation) Impressions(ctx context.Context, since time.Time, fn func(web.Impression) error) error {
	return c.st.Events(ctx, since, func(e store.Event) error {
		if e.Kind != store.KindImpression {
			return nil
		}
		return fn(web.Impression{Time: e.Time, Department: e.Department, Query: e.Query, Shown: e.Terms})
	})
}

// toReview converts a stored event; stored impressions do not keep their
// result count, so Hits is -1 (unknown) and the no-results list stays
// empty.
func toReview(e store.Event) review.Event {
	return review.Event{Kind: e.Kind, Impression: e.Impression, Time: e.Time, Session: e.Session,
		Department: e.Department, Query: e.Query, Term: e.Term, Position: e.Position, Terms: e.Terms,
		Hits: -1, Doc: e.Doc, Rank: e.Rank}
}

// Review reviews the stored events from opts.From on (reactions come after
// their impression, so none of the window's is missed).
func (c curation) Review(ctx context.Context, opts review.Options) (*review.Report, error) {
	var events []review.Event
	err := c.st.Events(ctx, opts.From, func(e store.Event) error {
		events = append(events, toReview(e))
		return nil
	})
	if err != nil {
		return nil, err
	}
	return review.Build(events, opts), nil
}

// rulesNow returns the web's RulesChanged hook: it brings the finder's rules
// up to date with the store before the changing request is answered, so
// the librarian's next search sees the change. It has its own refresher
// (the learning loop's keeps its own version), one refresh at a time; a
// failure is logged and the loop's next tick retries.
func rulesNow(ctx context.Context, log *slog.Logger, st *store.Store, f *finder.Finder, p *text.Pipeline) func() {
	var mu sync.Mutex
	r := &rulesRefresher{st: st, f: f, p: p}
	return func() {
		mu.Lock()
		defer mu.Unlock()
		if err := r.refresh(ctx); err != nil && ctx.Err() == nil {
			log.Error("rules refresh after a change failed; the next tick retries", "err", err)
		}
	}
}

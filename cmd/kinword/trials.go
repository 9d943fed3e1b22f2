package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"kinword/internal/eval"
	"kinword/internal/store"
	"kinword/internal/text"
	"kinword/internal/trial"
	"kinword/internal/web"
)

// trialKeeper is the web layer's TrialKeeper: it runs a proposal against
// the configured judged set through the live finder, with the store's rules
// in force, and keeps the report in the store (so every replica on one
// PostgreSQL lists it).
type trialKeeper struct {
	st  *store.Store
	s   trial.Searcher
	p   *text.Pipeline
	col *eval.Collection
	// now is the clock; nil means time.Now.
	now func() time.Time
}

var _ web.TrialKeeper = (*trialKeeper)(nil)

// loadJudged reads the judged set of review.judged_dir ("" = none), so a
// bad folder fails at start-up rather than at the first trial.
func loadJudged(dir string) (*eval.Collection, error) {
	if dir == "" {
		return nil, nil
	}
	col, err := eval.LoadCollection(dir)
	if err != nil {
		return nil, fmt.Errorf("review.judged_dir: %w", err)
	}
	return col, nil
}

// Run implements web.TrialKeeper.
func (k *trialKeeper) Run(ctx context.Context, p trial.Proposal, groups []string, actor string) (*trial.Report, error) {
	if k.col == nil {
		return nil, web.ErrNoJudgedSet
	}
	rs, err := k.st.Rules(ctx)
	if err != nil {
		return nil, err
	}
	cur, prop, err := trial.Sets(toCurate(rs), p, k.p)
	if err != nil {
		return nil, err
	}
	now := time.Now
	if k.now != nil {
		now = k.now
	}
	at := now().UTC()
	rep, err := trial.Run(ctx, k.s, k.col, cur, prop, p, trial.Options{Groups: groups})
	if err != nil {
		return nil, err
	}
	rep.Created, rep.Actor = at, actor
	body, err := json.Marshal(rep)
	if err != nil {
		return nil, fmt.Errorf("trial: encode report: %w", err)
	}
	id, err := k.st.SaveTrial(ctx, store.Trial{Created: at, Actor: actor, Title: p.Title, Report: body})
	if err != nil {
		return nil, err
	}
	rep.ID = id
	return rep, nil
}

// List implements web.TrialKeeper.
func (k *trialKeeper) List(ctx context.Context) ([]web.TrialSummary, error) {
	ts, err := k.st.Trials(ctx, 0)
	if err != nil {
		return nil, err
	}
	out := make([]web.TrialSummary, len(ts))
	for i, t := range ts {
		out[i] = web.TrialSummary{ID: t.ID, Created: t.Created, Actor: t.Actor, Title: t.Title}
	}
	return out, nil
}

// Get implements web.TrialKeeper.
func (k *trialKeeper) Get(ctx context.Context, id string) (*trial.Report, error) {
	t, err := k.st.Trial(ctx, id)
	if errors.Is(err, store.ErrTrialNotFound) {
		return nil, fmt.Errorf("%w: %s", web.ErrTrialNotFound, id)
	}
	if err != nil {
		return nil, err
	}
	var rep trial.Report
	if err := json.Unmarshal(t.Report, &rep); err != nil {
		return nil, fmt.Errorf("trial %s: decode stored report: %w", id, err)
	}
	rep.ID = t.ID
	return &rep, nil
}

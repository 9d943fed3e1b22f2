package main

import (
	"context"
	"fmt"

	"kinword/internal/curate"
	"kinword/internal/finder"
	"kinword/internal/store"
	"kinword/internal/text"
)

// toCurate converts stored rules into the rule type the query-time set
// compiles.
func toCurate(rs []store.Rule) []curate.Rule {
	out := make([]curate.Rule, len(rs))
	for i, r := range rs {
		out[i] = curate.Rule{ID: r.ID, Kind: curate.Kind(r.Kind), Query: r.Query, Term: r.Term, Department: r.Department,
			Start: r.Start, Expiry: r.Expiry, Reason: r.Reason, Lang: r.Lang}
	}
	return out
}

// rulesRefresher publishes the store's librarian rules to the finder
// whenever the store's rules version (its newest audit entry) changes, so
// every replica on one PostgreSQL applies a change within its refresh
// interval, without re-mining.
type rulesRefresher struct {
	st      *store.Store
	f       *finder.Finder
	p       *text.Pipeline
	version int64
	loaded  bool
}

// refresh reloads the rules if they changed; on error the previous set
// keeps serving.
func (r *rulesRefresher) refresh(ctx context.Context) error {
	v, err := r.st.RulesVersion(ctx)
	if err != nil {
		return err
	}
	if r.loaded && v == r.version {
		return nil
	}
	rs, err := r.st.Rules(ctx)
	if err != nil {
		return err
	}
	set, err := curate.Compile(toCurate(rs), r.p)
	if err != nil {
		return fmt.Errorf("rules: compile %d stored rules: %w", len(rs), err)
	}
	r.f.SetRules(set)
	r.version, r.loaded = v, true
	return nil
}

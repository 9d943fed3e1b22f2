package main

import (
	"context"

	"kinword/internal/eval"
)

// cvOutcome is a method evaluated with cross-validated parameters.
type cvOutcome struct {
	PerTopic map[string]eval.Measures
	Chosen   []string // the configuration chosen per fold, described
	// Runs are the rankings of the cross-validated run: each fold's topics
	// ranked with the configuration chosen on the other fold (for TREC run
	// files).
	Runs map[string][]eval.Scored

	folds  [][]string // the topics of each fold
	chosen []int      // the grid index chosen for each fold
}

// crossValidate evaluates every configuration of a method once, then lets
// 2-fold cross-validation over the topics pick per fold the configuration
// with the best MAP on the other fold.
func (s *evalSet) crossValidate(ctx context.Context, method string, grid []feedbackConfig, seed uint64) (cvOutcome, error) {
	return s.crossValidateWith(ctx, grid, method, seed, func(c feedbackConfig) (expander, error) {
		m, err := newModel(method, c, s.bm25)
		if err != nil {
			return nil, err
		}
		return prfExpander(s.view, m, c.Docs), nil
	})
}

// crossValidateWith evaluates the expander built for every configuration
// of grid once, then picks per fold with pick.
func (s *evalSet) crossValidateWith(ctx context.Context, grid []feedbackConfig, method string, seed uint64,
	build func(feedbackConfig) (expander, error)) (cvOutcome, error) {
	all := make([]map[string]eval.Measures, len(grid))
	for i, c := range grid {
		ex, err := build(c)
		if err != nil {
			return cvOutcome{}, err
		}
		if all[i], _, err = s.run(ctx, ex); err != nil {
			return cvOutcome{}, err
		}
	}
	o, err := s.pick(all, grid, method, seed)
	if err != nil {
		return o, err
	}
	o.Runs = map[string][]eval.Scored{}
	for f, topics := range o.folds {
		ex, err := build(grid[o.chosen[f]])
		if err != nil {
			return cvOutcome{}, err
		}
		_, runs, err := s.runOn(ctx, ex, topics)
		if err != nil {
			return cvOutcome{}, err
		}
		for q, r := range runs {
			o.Runs[q] = r
		}
	}
	return o, nil
}

// judgedTopics lists the topics with at least one relevant document.
func judgedTopics(s *evalSet) []string {
	var out []string
	for _, q := range s.qids {
		if s.qrels.NumRelevant(q) > 0 {
			out = append(out, q)
		}
	}
	return out
}

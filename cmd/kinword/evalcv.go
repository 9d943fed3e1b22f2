package main

import (
	"context"

	"kinword/internal/eval"
)

// cvOutcome is a method evaluated with cross-validated parameters.
type cvOutcome struct {
	PerTopic map[string]eval.Measures
	Chosen   []string // the configuration chosen per fold, described
}

// crossValidate evaluates every configuration of a method once, then lets
// 2-fold cross-validation over the topics pick per fold the configuration
// with the best MAP on the other fold.
func (s *evalSet) crossValidate(ctx context.Context, method string, grid []feedbackConfig, seed uint64) (cvOutcome, error) {
	all := make([]map[string]eval.Measures, len(grid))
	for i, c := range grid {
		m, err := newModel(method, c, s.bm25)
		if err != nil {
			return cvOutcome{}, err
		}
		per, _, err := s.run(ctx, prfExpander(s.view, m, c.Docs))
		if err != nil {
			return cvOutcome{}, err
		}
		all[i] = per
	}
	return s.pick(all, grid, method, seed)
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

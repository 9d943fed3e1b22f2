package main

import (
	"context"
	"fmt"

	"kinword/internal/access"
	"kinword/internal/assoc"
	"kinword/internal/eval"
	"kinword/internal/index"
	"kinword/internal/prf"
	"kinword/internal/rank"
	"kinword/internal/suggest"
)

// qualityDelta is the AP change that makes a suggestion good or bad: the
// definition of Cao, Nie, Gao & Robertson (SIGIR 2008), +/-0.005.
const qualityDelta = 0.005

// suggestionQuality holds the shares of good, neutral and bad suggestions
// among the top five, over all judged topics.
type suggestionQuality struct {
	Good        float64 `json:"good"`
	Neutral     float64 `json:"neutral"`
	Bad         float64 `json:"bad"`
	Suggestions int     `json:"suggestions"`
	Topics      int     `json:"topics"`
	// AcceptedWeight is the weight each suggestion was added at
	// (search.accepted_weight).
	AcceptedWeight float64 `json:"accepted_weight"`
}

// simulatedSearcher is MAP for a searcher shown the top five who accepts
// the single best one, the best pair, the first one, or one at random
// (the expected value over the five).
type simulatedSearcher struct {
	BestOf5     float64 `json:"best_of_5"`
	BestPairOf5 float64 `json:"best_pair_of_5"`
	FirstOf5    float64 `json:"first_of_5"`
	RandomOf5   float64 `json:"random_of_5"`
}

// engineExpander is Kinword's automatic mode: the suggestion engine's
// AutoExpand over the first-pass top results.
func engineExpander(v *index.View, eng *suggest.Engine) expander {
	return func(q []index.QueryTerm, first index.Result) []index.QueryTerm {
		x := eng.AutoExpand(v, suggest.Request{Query: toSuggestQuery(q), Viewer: v.Viewer(), Feedback: toHits(first, 50)})
		if len(x) == 0 {
			return nil
		}
		out := make([]index.QueryTerm, len(x))
		for i, t := range x {
			out[i] = index.QueryTerm{Key: t.Key, Weight: t.Weight}
		}
		return out
	}
}

// mineIndex mines an association table from an open index (one table per
// access scope; display forms from open documents only).
func mineIndex(ctx context.Context, ix *index.Index, tmp string) (*assoc.Table, error) {
	corpus := indexCorpus{all: ix.View(access.Viewer{Groups: ix.Groups()}), open: ix.View(access.Anonymous)}
	return assoc.Mine(ctx, corpus, assoc.Options{TempDir: tmp})
}

// engineFor builds an engine for one grid configuration (RM3 or Rocchio).
func engineFor(tbl *assoc.Table, c feedbackConfig, p rank.BM25) (*suggest.Engine, error) {
	if c.Model == "rocchio" {
		return suggest.New(tbl, suggest.Options{Model: "rocchio", AutoModel: "rocchio", AutoTerms: c.Terms, BM25: p,
			Rocchio: prf.RocchioOptions{FeedbackDocs: c.Docs, FeedbackTerms: max(c.Terms, 50), Beta: rocchioBeta(c)}})
	}
	if c.Model == "blend" {
		return suggest.New(tbl, suggest.Options{AutoModel: "blend", AutoTerms: c.Terms, BM25: p,
			Blend: prf.BlendOptions{FeedbackDocs: c.Docs, FeedbackTerms: max(c.Terms, 50), OrigWeight: c.Orig, Background: c.Alt, Mu: blendMu}})
	}
	return suggest.New(tbl, suggest.Options{Model: "rm3", AutoModel: "rm3", AutoTerms: c.Terms,
		RM3: prf.RM3Options{FeedbackDocs: c.Docs, FeedbackTerms: max(c.Terms, 50), OrigWeight: c.Orig, Mu: c.Alt}})
}

// blendMu is the Dirichlet μ of the blend's relevance model in Kinword's
// grid, in tokens: near the mean abstract length of the judged collections
// (Cranfield and CISI abstracts run to about 90 and 115 tokens after
// stopwords), which weights feedback documents more sharply than 1000
// (in the blend grid with μ 1000 the cross-validated MAP fell from 0.3579
// to 0.3503 on Cranfield and from 0.2491 to 0.2472 on CISI).
const blendMu = suggest.DefaultBlendMu

// crossValidateKinword is crossValidate for Kinword's own automatic mode
// through the suggestion engine: the pooled feedback model (prf.Blend:
// RM1, θ_F and Rocchio's vector in equal shares) over the mixture model's
// grid (feedback documents, terms, original-query weight, background
// weight), μ fixed at blendMu. Cross-validated MAP for seeds 1-3:
//
//	                     Cranfield                CISI
//	RM3 alone            0.3610 0.3604 0.3538     0.2404 0.2430 0.2347
//	RM1 + θ_F            0.3579 0.3574 0.3597     0.2491 0.2507 0.2555
//	RM1 + θ_F + Rocchio  0.3614 0.3616 0.3617     0.2511 0.2523 0.2525
//
// (the last with the original-query weights down to 0.2; RM1 + θ_F had a
// grid from 0.3). Rocchio's third raised the robustness index on
// Cranfield from 0.44 to 0.46 and on CISI from 0.29 to 0.32 (seed 1); a
// half share for Rocchio raised CISI's to 0.39 but lowered Cranfield's
// MAP to 0.3565. (A grid holding Rocchio's configurations too, so that
// cross-validation also picks the model, raised CISI's MAP from 0.2404 to
// 0.2457 but lowered Cranfield's from 0.3610 to 0.3532: the larger grid
// overfits one fold.)
func (s *evalSet) crossValidateKinword(ctx context.Context, tbl *assoc.Table, seed uint64) (cvOutcome, error) {
	grid := feedbackGrid("blend") // each configuration's Model is "blend"
	return s.crossValidateWith(ctx, grid, "blend", seed, func(c feedbackConfig) (expander, error) {
		eng, err := engineFor(tbl, c, s.bm25)
		if err != nil {
			return nil, err
		}
		return engineExpander(s.view, eng), nil
	})
}

// pick runs 2-fold cross-validation over precomputed per-configuration
// results.
func (s *evalSet) pick(all []map[string]eval.Measures, grid []feedbackConfig, method string, seed uint64) (cvOutcome, error) {
	res, err := eval.CrossValidate(judgedTopics(s), 2, seed, len(grid), func(c int, topics []string) (map[string]float64, error) {
		out := map[string]float64{}
		for _, t := range topics {
			out[t] = all[c][t].MAP
		}
		return out, nil
	})
	if err != nil {
		return cvOutcome{}, err
	}
	o := cvOutcome{PerTopic: map[string]eval.Measures{}, folds: res.Folds, chosen: res.Chosen}
	for f, topics := range res.Folds {
		for _, t := range topics {
			o.PerTopic[t] = all[res.Chosen[f]][t]
		}
		o.Chosen = append(o.Chosen, fmt.Sprintf("fold %d: %s", f+1, grid[res.Chosen[f]].String(method)))
	}
	return o, nil
}

// evalSuggestions offers the top five suggestions per topic and measures
// each by adding it to the query at the accepted-term weight.
func (s *evalSet) evalSuggestions(ctx context.Context, eng *suggest.Engine, base map[string]eval.Measures) (suggestionQuality, simulatedSearcher, error) {
	q := suggestionQuality{AcceptedWeight: s.accept}
	var sim simulatedSearcher
	good, bad, n := 0, 0, 0
	for _, qid := range judgedTopics(s) {
		q0, ok := s.queries[qid]
		baseAP := base[qid].MAP
		q.Topics++
		if !ok {
			sim.BestOf5, sim.BestPairOf5, sim.FirstOf5, sim.RandomOf5 = sim.BestOf5+baseAP, sim.BestPairOf5+baseAP, sim.FirstOf5+baseAP, sim.RandomOf5+baseAP
			continue
		}
		sq := toSuggestQuery(q0)
		sugs := eng.Suggest(s.view, suggest.Request{Query: sq, Viewer: s.view.Viewer(), Feedback: toHits(s.first[qid], 10), K: 5})
		ap := func(keys ...string) (float64, error) {
			x := suggest.Expand(sq, keys, s.accept)
			iq := make([]index.QueryTerm, len(x))
			for i, t := range x {
				iq[i] = index.QueryTerm{Key: t.Key, Weight: t.Weight}
			}
			res, err := s.view.Search(ctx, iq, s.bm25, evalDepth)
			if err != nil {
				return 0, err
			}
			ids := make([]string, len(res.Hits))
			for i, h := range res.Hits {
				ids[i] = h.ID
			}
			return eval.AveragePrecision(ids, s.qrels[qid]), nil
		}
		var aps []float64
		for _, sg := range sugs {
			a, err := ap(sg.Term)
			if err != nil {
				return q, sim, err
			}
			aps = append(aps, a)
			n++
			switch d := a - baseAP; {
			case d >= qualityDelta:
				good++
			case d <= -qualityDelta:
				bad++
			}
		}
		best, pair, first, mean := baseAP, baseAP, baseAP, baseAP
		if len(aps) > 0 {
			first, mean, best = aps[0], 0, aps[0]
			for _, a := range aps {
				best = max(best, a)
				mean += a / float64(len(aps))
			}
			pair = best
			for i := range sugs {
				for j := i + 1; j < len(sugs); j++ {
					a, err := ap(sugs[i].Term, sugs[j].Term)
					if err != nil {
						return q, sim, err
					}
					pair = max(pair, a)
				}
			}
		}
		sim.BestOf5 += best
		sim.BestPairOf5 += pair
		sim.FirstOf5 += first
		sim.RandomOf5 += mean
	}
	if n > 0 {
		q.Good, q.Bad = float64(good)/float64(n), float64(bad)/float64(n)
		q.Neutral = 1 - q.Good - q.Bad
	}
	q.Suggestions = n
	if q.Topics > 0 {
		t := float64(q.Topics)
		sim.BestOf5, sim.BestPairOf5, sim.FirstOf5, sim.RandomOf5 = sim.BestOf5/t, sim.BestPairOf5/t, sim.FirstOf5/t, sim.RandomOf5/t
	}
	return q, sim, nil
}

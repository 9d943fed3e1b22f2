package eval

import (
	"fmt"
	"math/rand/v2"
	"sort"
)

// Folds splits topic IDs into k folds deterministically: the IDs are sorted,
// shuffled with the seed, and dealt round-robin, so fold sizes differ by at
// most one and the split does not depend on input order.
func Folds(topics []string, k int, seed uint64) [][]string {
	if k < 2 {
		k = 2
	}
	ids := append([]string(nil), topics...)
	sort.Strings(ids)
	r := rand.New(rand.NewPCG(seed, seed^0x9e3779b97f4a7c15))
	r.Shuffle(len(ids), func(i, j int) { ids[i], ids[j] = ids[j], ids[i] })
	out := make([][]string, k)
	for i, id := range ids {
		out[i%k] = append(out[i%k], id)
	}
	for _, f := range out {
		sort.Strings(f)
	}
	return out
}

// CVResult is the outcome of cross-validation: every topic scored by the
// configuration chosen on the other folds, and the choice per fold.
type CVResult struct {
	// PerTopic holds each topic's value under the configuration chosen
	// without it.
	PerTopic map[string]float64
	// Chosen is the index (into the configurations) picked for each fold,
	// i.e. trained on all other folds and applied to this one.
	Chosen []int
	// Folds are the topic IDs per fold.
	Folds [][]string
}

// CrossValidate chooses, for each fold, the configuration with the highest
// mean value over the other folds' topics (ties: the lower index) and scores
// the fold's topics with it, so no topic is ever scored by a configuration
// tuned on itself. value(c, topics) returns the per-topic values of
// configuration c on the given topics; it is called once per configuration
// and fold pair, so callers may cache.
func CrossValidate(topics []string, k int, seed uint64, nConfigs int,
	value func(config int, topics []string) (map[string]float64, error)) (CVResult, error) {
	if nConfigs < 1 {
		return CVResult{}, fmt.Errorf("%w: cross-validation needs at least one configuration", ErrInvalid)
	}
	res := CVResult{PerTopic: map[string]float64{}, Folds: Folds(topics, k, seed)}
	for f, test := range res.Folds {
		var train []string
		for g, other := range res.Folds {
			if g != f {
				train = append(train, other...)
			}
		}
		best, bestMean := 0, -1.0
		for c := 0; c < nConfigs; c++ {
			vals, err := value(c, train)
			if err != nil {
				return CVResult{}, err
			}
			sum := 0.0
			for _, t := range train {
				sum += vals[t]
			}
			mean := sum / float64(max(1, len(train)))
			if mean > bestMean {
				best, bestMean = c, mean
			}
		}
		res.Chosen = append(res.Chosen, best)
		vals, err := value(best, test)
		if err != nil {
			return CVResult{}, err
		}
		for _, t := range test {
			res.PerTopic[t] = vals[t]
		}
	}
	return res, nil
}

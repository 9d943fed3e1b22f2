package eval

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// DefaultThreshold is the per-topic difference (in AP, or whatever measure
// is compared) below which a topic counts as neither helped nor hurt. It
// only absorbs floating-point noise.
const DefaultThreshold = 1e-9

// DefaultTrials is the number of random sign assignments RandomizationTest
// uses when asked for zero or fewer.
const DefaultTrials = 100_000

// Compare counts the topics a run helped and hurt relative to a baseline
// (per-topic scores, same topic order, typically AP) with DefaultThreshold,
// and returns the robustness index (helped - hurt) / n. See
// CompareThreshold.
func Compare(base, run []float64) (helped, hurt int, robustness float64) {
	return CompareThreshold(base, run, DefaultThreshold)
}

// CompareThreshold is Compare with an explicit threshold: a topic is helped
// when run exceeds base by more than threshold and hurt when base exceeds
// run by more than threshold. The robustness index (helped - hurt) / n, n
// the number of topics, follows Sakai, Manabe & Koyama (2005) and
// Collins-Thompson (2009); it lies in [-1, 1] and is 0 for no topics.
// It panics if the slices differ in length.
func CompareThreshold(base, run []float64, threshold float64) (helped, hurt int, robustness float64) {
	if len(base) != len(run) {
		panic(fmt.Sprintf("eval: Compare: %d baseline scores but %d run scores", len(base), len(run)))
	}
	for i := range base {
		switch d := run[i] - base[i]; {
		case d > threshold:
			helped++
		case -d > threshold:
			hurt++
		}
	}
	if len(base) == 0 {
		return 0, 0, 0
	}
	return helped, hurt, float64(helped-hurt) / float64(len(base))
}

// RandomizationTest is the two-sided paired randomization (permutation)
// test of Smucker, Allan & Carterette (CIKM 2007) on the difference of the
// means of a and b (per-topic scores of two systems, same topic order).
// Under the null hypothesis the two systems' labels are exchangeable per
// topic, so each trial flips the sign of every paired difference with
// probability 1/2; the p-value is the fraction of trials whose absolute
// mean difference is at least the observed one. trials <= 0 means
// DefaultTrials. The same seed always gives the same p-value. Identical
// vectors give 1; empty vectors give 1. It panics if the slices differ in
// length.
func RandomizationTest(a, b []float64, trials int, seed uint64) (pValue float64) {
	if len(a) != len(b) {
		panic(fmt.Sprintf("eval: RandomizationTest: %d and %d scores", len(a), len(b)))
	}
	if trials <= 0 {
		trials = DefaultTrials
	}
	n := len(a)
	if n == 0 {
		return 1
	}
	d := make([]float64, n)
	var observed, scale float64
	for i := range a {
		d[i] = b[i] - a[i]
		observed += d[i]
		scale += math.Abs(d[i])
	}
	// Sums are compared, not means (same n); the tolerance keeps sign
	// patterns whose sum equals the observed one in exact arithmetic
	// (such as the all-flipped pattern) from being lost to rounding.
	observed = math.Abs(observed) - 1e-12*scale
	rng := rand.New(rand.NewPCG(seed, 0x6b696e776f7264)) // fixed stream
	words := make([]uint64, (n+63)/64)
	atLeast := 0
	for range trials {
		for w := range words {
			words[w] = rng.Uint64()
		}
		var s float64
		for i, x := range d {
			if words[i>>6]&(1<<(uint(i)&63)) != 0 {
				s -= x
			} else {
				s += x
			}
		}
		if math.Abs(s) >= observed {
			atLeast++
		}
	}
	return float64(atLeast) / float64(trials)
}

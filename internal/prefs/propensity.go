package prefs

import (
	"math"
	"time"
)

// DecayWeight is the time-decay weight of an event of the given age:
//
//	w = 2^(−age/halfLife)
//
// the definition of a half-life (exponential decay; common practice for
// recency weighting of interaction logs). Negative ages (clock skew) weigh 1.
func DecayWeight(age, halfLife time.Duration) float64 {
	if age <= 0 || halfLife <= 0 {
		return 1
	}
	return math.Exp2(-float64(age) / float64(halfLife))
}

// DecayPropensities returns the configured examination curve
//
//	p_k = 1/(k+1)^η,  k = 0..n-1
//
// (reciprocal-rank position bias, common practice; η = 1 when eta ≤ 0).
func DecayPropensities(n int, eta float64) []float64 {
	if eta <= 0 {
		eta = 1
	}
	p := make([]float64, max(n, 0))
	for k := range p {
		p[k] = 1 / math.Pow(float64(k+1), eta)
	}
	return p
}

// EstimatePropensities estimates examination propensities p_0..p_maxPos
// (length maxPos+1, p_0 = 1) from the randomised swap slice: events with
// SwapLower = k+1 belong to impressions where the adjacent pair (k, k+1)
// was exchanged at random (Swapped says whether it was, for that
// impression).
//
// Source: Joachims, Swaminathan & Schnabel, "Unbiased Learning-to-Rank
// with Biased Feedback", WSDM 2017, §5 (swap intervention): because the
// randomisation puts the same items at k and at k+1, the ratio of the click
// rates at those two positions estimates p_{k+1}/p_k; the paper swaps rank 1
// with rank k, the adjacent-pair chaining p_{k+1} = p_k · ratio_k from p_0 = 1
// follows the same argument. To stay unbiased when the swap probability is
// not ½ the click rate at each position is averaged over the two arms:
//
//	rate_j = ½ (c_j^keep / n^keep + c_j^swap / n^swap),  j ∈ {k, k+1}
//
// where c counts clicks or accepts at position j and n counts impressions.
// A pair without data in both arms, or without clicks at k, falls back to
// the ratio of the 1/(k+1) curve, (k+1)/(k+2).
func EstimatePropensities(events []Event, maxPos int) []float64 {
	if maxPos < 0 {
		return nil
	}
	type arm struct{ n, upper, lower float64 }
	arms := make([][2]arm, maxPos+1) // index = SwapLower; [0] keep, [1] swap
	for _, ev := range events {
		l := ev.SwapLower
		if l <= 0 || l > maxPos {
			continue
		}
		a := 0
		if ev.Swapped {
			a = 1
		}
		switch ev.Kind {
		case KindImpression:
			arms[l][a].n++
		case KindClick, KindAccept:
			switch ev.Position {
			case l - 1:
				arms[l][a].upper++
			case l:
				arms[l][a].lower++
			}
		}
	}
	p := make([]float64, maxPos+1)
	p[0] = 1
	for l := 1; l <= maxPos; l++ {
		ratio := float64(l) / float64(l+1)
		keep, swap := arms[l][0], arms[l][1]
		if keep.n > 0 && swap.n > 0 {
			up := (keep.upper/keep.n + swap.upper/swap.n) / 2
			lo := (keep.lower/keep.n + swap.lower/swap.n) / 2
			if up > 0 {
				ratio = lo / up
			}
		}
		p[l] = p[l-1] * ratio
	}
	return p
}

// propensity is the clipped examination probability of position k:
// Options.Propensity when set (its last value past its end), else the decay
// curve, never below PropensityFloor (clipping: common practice for IPW
// variance control, cf. Joachims et al. 2017 §4 on clipped estimators).
func (o Options) propensity(k int) float64 {
	if k < 0 {
		k = 0
	}
	var p float64
	switch n := len(o.Propensity); {
	case n == 0:
		p = 1 / math.Pow(float64(k+1), o.Eta)
	case k < n:
		p = o.Propensity[k]
	default:
		p = o.Propensity[n-1]
	}
	if !(p >= o.PropensityFloor) { // also catches NaN
		p = o.PropensityFloor
	}
	return min(p, 1)
}

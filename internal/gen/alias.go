package gen

import "math"

// aliasTable draws from a fixed discrete distribution in O(1) with one
// 64-bit random number: Walker's alias method (Walker 1977) built with
// Vose's stable construction (Vose 1991). Slot i keeps value keep[i] when
// the low 32 random bits are below cut[i], else it yields other[i].
type aliasTable struct {
	cut   []uint32
	keep  []int32
	other []int32
}

// newAliasTable builds a table over values[i] with relative weights[i]
// (non-negative, not all zero; len(values) == len(weights)).
func newAliasTable(values []int32, weights []float64) aliasTable {
	n := len(weights)
	sum := 0.0
	for _, w := range weights {
		sum += w
	}
	scaled := make([]float64, n)
	small := make([]int, 0, n)
	large := make([]int, 0, n)
	for i, w := range weights {
		scaled[i] = w * float64(n) / sum
		if scaled[i] < 1 {
			small = append(small, i)
		} else {
			large = append(large, i)
		}
	}
	t := aliasTable{cut: make([]uint32, n), keep: make([]int32, n), other: make([]int32, n)}
	for i := range t.keep {
		t.keep[i], t.other[i] = values[i], values[i]
	}
	for len(small) > 0 && len(large) > 0 {
		s := small[len(small)-1]
		small = small[:len(small)-1]
		l := large[len(large)-1]
		t.cut[s] = probCut(scaled[s])
		t.other[s] = values[l]
		scaled[l] -= 1 - scaled[s]
		if scaled[l] < 1 {
			large = large[:len(large)-1]
			small = append(small, l)
		}
	}
	// Whatever is left has probability 1 up to rounding: keep and other
	// are already equal, so the cut does not matter.
	for _, i := range small {
		t.cut[i] = math.MaxUint32
	}
	for _, i := range large {
		t.cut[i] = math.MaxUint32
	}
	return t
}

func probCut(p float64) uint32 {
	if p <= 0 {
		return 0
	}
	if p >= 1 {
		return math.MaxUint32
	}
	return uint32(p * (1 << 32))
}

// draw maps one random 64-bit word to a value: the high 32 bits choose the
// slot by multiply-shift, the low 32 bits toss the slot's coin.
func (t *aliasTable) draw(x uint64) int32 {
	i := ((x >> 32) * uint64(len(t.cut))) >> 32
	if uint32(x) < t.cut[i] {
		return t.keep[i]
	}
	return t.other[i]
}

// probabilities returns the exact distribution the table encodes, indexed
// like values; used by tests.
func (t *aliasTable) probabilities(values []int32) []float64 {
	pos := make(map[int32]int, len(values))
	for i, v := range values {
		pos[v] = i
	}
	p := make([]float64, len(values))
	n := float64(len(t.cut))
	for i := range t.cut {
		keep := float64(t.cut[i]) / (1 << 32)
		if t.keep[i] == t.other[i] {
			keep = 1
		}
		p[pos[t.keep[i]]] += keep / n
		p[pos[t.other[i]]] += (1 - keep) / n
	}
	return p
}

// zipfWeights returns r^-s for ranks r = 1..n (index 0 is rank 1).
func zipfWeights(n int, s float64) []float64 {
	w := make([]float64, n)
	for i := range w {
		w[i] = math.Pow(float64(i+1), -s)
	}
	return w
}

// fraction64 converts a probability to a threshold for comparing against a
// uniform 64-bit word.
func fraction64(p float64) uint64 {
	switch {
	case p <= 0:
		return 0
	case p >= 1:
		return math.MaxUint64
	}
	return uint64(p*(1<<53)) << 11
}

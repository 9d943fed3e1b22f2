package prf

import (
	"cmp"
	"math"
	"slices"
)

// fbDoc is a feedback document ready for pooling.
type fbDoc struct {
	terms []TermFreq // distinct, TF > 0, sorted by Term
	len   float64    // length in tokens, > 0
}

// prepare selects the k highest-scoring documents (ties: earlier first),
// keeps them in input order so sums run in a fixed order, cleans their term
// lists and drops those without terms.
func prepare(docs []Doc, k int) []fbDoc {
	idx := make([]int, len(docs))
	for i := range idx {
		idx[i] = i
	}
	if len(docs) > k {
		slices.SortStableFunc(idx, func(a, b int) int { return cmp.Compare(docs[b].Score, docs[a].Score) })
		idx = idx[:k]
		slices.Sort(idx)
	}
	out := make([]fbDoc, 0, len(idx))
	for _, i := range idx {
		terms := cleanTerms(docs[i].Terms)
		if len(terms) == 0 {
			continue
		}
		l := float64(docs[i].Len)
		if l <= 0 {
			l = 0
			for _, t := range terms {
				l += float64(t.TF)
			}
		}
		out = append(out, fbDoc{terms, l})
	}
	return out
}

// cleanTerms returns ts if it is already strictly sorted with positive
// frequencies, and otherwise a sorted copy without non-positive entries and
// with repeated terms summed.
func cleanTerms(ts []TermFreq) []TermFreq {
	clean := true
	for i, t := range ts {
		if t.TF <= 0 || (i > 0 && ts[i-1].Term >= t.Term) {
			clean = false
			break
		}
	}
	if clean {
		return ts
	}
	out := make([]TermFreq, 0, len(ts))
	for _, t := range ts {
		if t.TF > 0 {
			out = append(out, t)
		}
	}
	slices.SortStableFunc(out, func(a, b TermFreq) int { return cmp.Compare(a.Term, b.Term) })
	n := 0
	for _, t := range out {
		if n > 0 && out[n-1].Term == t.Term {
			out[n-1].TF += t.TF
			continue
		}
		out[n] = t
		n++
	}
	return out[:n]
}

// pool merges the documents' term lists and returns, for every distinct
// term in ascending ID order, the sum over the documents containing it of
// f(document index, term frequency).
func pool(docs []fbDoc, f func(d, tf int) float64) []Weighted {
	size := 0
	for _, d := range docs {
		size = max(size, len(d.terms))
	}
	out := make([]Weighted, 0, 2*size)
	pos := make([]int, len(docs))
	for {
		next, found := uint32(0), false
		for d, p := range pos {
			if p < len(docs[d].terms) {
				if id := docs[d].terms[p].Term; !found || id < next {
					next, found = id, true
				}
			}
		}
		if !found {
			return out
		}
		var v float64
		for d, p := range pos {
			if p < len(docs[d].terms) && docs[d].terms[p].Term == next {
				v += f(d, docs[d].terms[p].TF)
				pos[d]++
			}
		}
		out = append(out, Weighted{next, v})
	}
}

// termFreq returns the frequency of id in the sorted list ts.
func termFreq(ts []TermFreq, id uint32) int {
	i, ok := slices.BinarySearchFunc(ts, id, func(t TermFreq, id uint32) int { return cmp.Compare(t.Term, id) })
	if !ok {
		return 0
	}
	return ts[i].TF
}

// lookup returns the weight of id in ws, which is sorted by ID.
func lookup(ws []Weighted, id uint32) (float64, bool) {
	i, ok := slices.BinarySearchFunc(ws, id, func(w Weighted, id uint32) int { return cmp.Compare(w.ID, id) })
	if !ok {
		return 0, false
	}
	return ws[i].Weight, true
}

// topN returns the n terms of ws with the highest positive weight, sorted
// by weight descending, then ID ascending.
func topN(ws []Weighted, n int) []Weighted {
	if n <= 0 {
		return nil
	}
	best := make([]Weighted, 0, min(n, len(ws)))
	for _, w := range ws {
		if !(w.Weight > 0) || math.IsInf(w.Weight, 1) {
			continue
		}
		if len(best) == n && byWeight(w, best[n-1]) >= 0 {
			continue
		}
		i, _ := slices.BinarySearchFunc(best, w, byWeight)
		if len(best) < n {
			best = append(best, Weighted{})
		}
		copy(best[i+1:], best[i:len(best)-1])
		best[i] = w
	}
	return best
}

// renormalise scales ws in place to sum to 1; it returns nil when the sum
// is not positive.
func renormalise(ws []Weighted) []Weighted {
	var sum float64
	for _, w := range ws {
		sum += w.Weight
	}
	if !(sum > 0) {
		return nil
	}
	for i := range ws {
		ws[i].Weight /= sum
	}
	return ws
}

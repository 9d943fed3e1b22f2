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
// f(document index, term frequency). The lists are merged pairwise, in
// ⌈log2 k⌉ linear passes, which is cheaper than scanning k list heads per
// output term.
func pool(docs []fbDoc, f func(d, tf int) float64) []Weighted {
	total := 0
	for _, d := range docs {
		total += len(d.terms)
	}
	src := make([]Weighted, 0, total)
	ends := make([]int, 0, len(docs)) // end offset of each run in src
	for d, doc := range docs {
		for _, t := range doc.terms {
			src = append(src, Weighted{t.Term, f(d, t.TF)})
		}
		ends = append(ends, len(src))
	}
	dst := make([]Weighted, 0, total)
	for len(ends) > 1 {
		dst = dst[:0]
		next := ends[:0] // overwrites ends behind the reads
		start := 0
		for i := 0; i < len(ends); i += 2 {
			mid, end := ends[i], ends[i]
			if i+1 < len(ends) {
				end = ends[i+1]
			}
			dst = mergeRuns(dst, src[start:mid], src[mid:end])
			next = append(next, len(dst))
			start = end
		}
		ends = next
		src, dst = dst, src
	}
	return src
}

// mergeRuns appends the merge of the ID-sorted runs a and b to dst, adding
// the weights of IDs present in both.
func mergeRuns(dst, a, b []Weighted) []Weighted {
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		switch {
		case a[i].ID < b[j].ID:
			dst = append(dst, a[i])
			i++
		case a[i].ID > b[j].ID:
			dst = append(dst, b[j])
			j++
		default:
			dst = append(dst, Weighted{a[i].ID, a[i].Weight + b[j].Weight})
			i++
			j++
		}
	}
	dst = append(dst, a[i:]...)
	return append(dst, b[j:]...)
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
	if len(best) == 0 {
		return nil
	}
	return best
}

// renormalise scales ws in place to sum to 1 and re-sorts it (division
// can make neighbouring weights equal, and ties go by ID); it returns nil
// when the sum is not positive.
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
	sortByWeight(ws)
	return ws
}

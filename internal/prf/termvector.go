package prf

import "slices"

// TermVector returns the distinct terms of a document's tokens toks with
// their frequencies, ascending by term ID, as Doc.Terms wants them. When
// order holds toks' positions in term order (toks[order[0]],
// toks[order[1]], ... ascending, as the index keeps them) it is read
// through without a sort; otherwise (nil, or not one position per token)
// a sorted copy of toks is counted.
func TermVector(toks []uint32, order []uint16) []TermFreq {
	if len(order) != len(toks) {
		s := slices.Clone(toks)
		slices.Sort(s)
		return countRuns(len(s), func(i int) uint32 { return s[i] })
	}
	return countRuns(len(order), func(i int) uint32 { return toks[order[i]] })
}

// countRuns turns n ascending term IDs, read through at, into (term,
// frequency) runs, allocating once.
func countRuns(n int, at func(int) uint32) []TermFreq {
	distinct := 0
	for i := range n {
		if i == 0 || at(i) != at(i-1) {
			distinct++
		}
	}
	out := make([]TermFreq, 0, distinct)
	for i := 0; i < n; {
		t, j := at(i), i+1
		for j < n && at(j) == t {
			j++
		}
		out = append(out, TermFreq{Term: t, TF: j - i})
		i = j
	}
	return out
}

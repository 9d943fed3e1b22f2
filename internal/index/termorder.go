package index

import (
	"math"
	"slices"

	"kinword/internal/prf"
)

// maxOrdered is the longest document whose term order is kept: positions
// are stored in 16 bits.
const maxOrdered = math.MaxUint16 + 1

// termOrder returns the positions of the document's tokens sorted by term
// ID, ties by position, built on first use and kept with the record (two
// bytes a token), or nil for a document longer than maxOrdered tokens. A
// term vector read through it needs no sort: the sort is paid once per
// document rather than once per request that reads it. Concurrent first
// calls may each build it; they build the same slice.
func (x *fwdDoc) termOrder() []uint16 {
	if p := x.order.Load(); p != nil {
		return *p
	}
	if len(x.Tokens) > maxOrdered {
		return nil
	}
	keys := make([]uint64, len(x.Tokens))
	for i, t := range x.Tokens {
		keys[i] = uint64(t)<<16 | uint64(i)
	}
	slices.Sort(keys)
	o := make([]uint16, len(keys))
	for i, k := range keys {
		o[i] = uint16(k)
	}
	x.order.Store(&o)
	return o
}

// TermOrder returns the positions of document d's tokens (as Tokens gives
// them) in ascending term-ID order, ties by position, so that
// Tokens[order[0]], Tokens[order[1]], ... runs through the document's terms
// sorted; shared, do not modify. It is computed on the document's first
// use and kept. It returns nil for a document of more than 65,536 tokens
// (sort Tokens instead).
func (w *View) TermOrder(d uint32) []uint16 { return w.s.docs[d].termOrder() }

// TermVector returns document d's distinct terms with frequencies, sorted by
// term ID, read through its term order (sorted when it has none).
func (w *View) TermVector(d uint32) []TermFreq {
	return prf.TermVector(w.s.docs[d].Tokens, w.TermOrder(d))
}

// Package rank holds Kinword's scoring formulas and top-k selection: the
// textbook BM25 of Robertson & Zaragoza (2009) and a bounded heap. It is pure
// arithmetic: it must not import bleve, gin, database drivers or any other
// Kinword package, so the formula can be checked by hand.
package rank

import "math"

// BM25 holds the two free parameters of BM25.
type BM25 struct {
	// K1 saturates term frequency; default 1.2 (zero means default).
	K1 float64
	// B is the length normalisation strength in [0,1]; default 0.75. A
	// negative value means 0 (no length normalisation), since zero means
	// default.
	B float64
}

// DefaultBM25 holds the conventional parameters k1 = 1.2, b = 0.75.
var DefaultBM25 = BM25{K1: 1.2, B: 0.75}

// Resolve returns p with defaults filled in.
func (p BM25) Resolve() BM25 {
	if p.K1 == 0 {
		p.K1 = DefaultBM25.K1
	}
	switch {
	case p.B == 0:
		p.B = DefaultBM25.B
	case p.B < 0:
		p.B = 0
	}
	return p
}

// IDF is the BM25 inverse document frequency with the +1 inside the
// logarithm, so it is never negative: ln(1 + (N - n + 0.5)/(n + 0.5)),
// for N documents of which n contain the term.
func IDF(N, n float64) float64 {
	return math.Log(1 + (N-n+0.5)/(n+0.5))
}

// TF is the BM25 term-frequency part tf(k1+1) / (tf + k1(1 - b + b dl/avgdl)).
func (p BM25) TF(tf, dl, avgdl float64) float64 {
	if tf <= 0 {
		return 0
	}
	norm := 1.0
	if avgdl > 0 {
		norm = 1 - p.B + p.B*dl/avgdl
	}
	return tf * (p.K1 + 1) / (tf + p.K1*norm)
}

// Term is the contribution of one query term of weight w (its count in the
// query, or a feedback weight) to a document's score: w * IDF * TF. A
// document's BM25 score is the plain sum of these over the query terms,
// without any coordination factor.
func (p BM25) Term(w, tf, dl, avgdl, N, n float64) float64 {
	return w * IDF(N, n) * p.TF(tf, dl, avgdl)
}

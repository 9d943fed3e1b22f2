package prf

import (
	"math"

	"kinword/internal/rank"
)

// RocchioOptions configure Rocchio feedback. The zero value gives every
// default. Alpha, Beta and Gamma follow the convention of rank.BM25.B:
// zero means the default, a negative value means 0.
type RocchioOptions struct {
	// FeedbackDocs is the number of highest-scoring documents taken as
	// relevant. Default 10; must not be negative.
	FeedbackDocs int
	// FeedbackTerms is the number of terms kept from the feedback vector.
	// Default 20; must not be negative.
	FeedbackTerms int
	// Alpha multiplies the original query weights. Default 1.
	Alpha float64
	// Beta multiplies the centroid of the relevant documents. Default
	// 0.75 (common practice).
	Beta float64
	// Gamma multiplies the centroid of the non-relevant documents.
	// Default 0.15 (common practice).
	Gamma float64
	// RawTF weights document terms by raw term frequency instead of BM25
	// (the textbook vector); Stats are then not consulted.
	RawTF bool
	// BM25 holds the BM25 parameters of the document term weights; the
	// zero value means k1 1.2, b 0.75 (see rank.BM25).
	BM25 rank.BM25
}

// Defaults of RocchioOptions.
const (
	DefaultAlpha = 1
	DefaultBeta  = 0.75
	DefaultGamma = 0.15
)

// Rocchio is the relevance feedback of Rocchio (1971), "Relevance feedback
// in information retrieval", in the form of Manning, Raghavan & Schütze
// (2008), Introduction to Information Retrieval, eq. 9.3:
//
//	q' = α·q + β/|R|·Σ_{D∈R} D − γ/|NR|·Σ_{D∈NR} D, negatives clipped to 0,
//
// where a document vector weighs term t by w(t,D) = IDF(N, DF(t)) ×
// BM25 TF(tf, |D|, avgdl) (rank.IDF and rank.BM25.TF), or by raw tf with
// RawTF. With pseudo-relevance feedback R is the top-ranked documents and
// NR is empty; ExpandWith also accepts judged non-relevant documents.
type Rocchio struct {
	docs, terms        int
	alpha, beta, gamma float64
	raw                bool
	bm25               rank.BM25
}

// NewRocchio returns a Rocchio model with opt's defaults filled in. The
// error wraps ErrBadOptions.
func NewRocchio(opt RocchioOptions) (*Rocchio, error) {
	if err := checkCounts("rocchio", opt.FeedbackDocs, opt.FeedbackTerms); err != nil {
		return nil, err
	}
	m := &Rocchio{
		docs:  resolveCount(opt.FeedbackDocs, DefaultFeedbackDocs),
		terms: resolveCount(opt.FeedbackTerms, DefaultFeedbackTerms),
		alpha: resolveFraction(opt.Alpha, DefaultAlpha),
		beta:  resolveFraction(opt.Beta, DefaultBeta),
		gamma: resolveFraction(opt.Gamma, DefaultGamma),
		raw:   opt.RawTF,
		bm25:  opt.BM25.Resolve(),
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"Alpha", m.alpha}, {"Beta", m.beta}, {"Gamma", m.gamma}} {
		if !checkFraction(c.v, math.MaxFloat64) {
			return nil, errorf("rocchio: %s is not a finite number", c.name)
		}
	}
	if !checkFraction(m.bm25.K1, math.MaxFloat64) || !checkFraction(m.bm25.B, 1) {
		return nil, errorf("rocchio: BM25 K1 %g or B %g out of range", opt.BM25.K1, opt.BM25.B)
	}
	return m, nil
}

// Expand is ExpandWith without non-relevant documents: pseudo-relevance
// feedback over the FeedbackDocs highest-scoring of docs.
func (m *Rocchio) Expand(q []QueryTerm, docs []Doc, st Stats) Result {
	return m.ExpandWith(q, docs, nil, st)
}

// ExpandWith computes q' from the FeedbackDocs highest-scoring documents
// of rel and all documents of nonrel. st may be nil with RawTF or when rel
// and nonrel are both empty.
//
// Result.Feedback is the FeedbackTerms strongest terms of the feedback
// vector β·centroid(R) − γ·centroid(NR) with a positive weight; Result.Query
// is q' over the query terms and those terms, negatives clipped (dropped).
// The weights are vector components, not probabilities. Without feedback
// documents Query is α·q.
func (m *Rocchio) ExpandWith(q []QueryTerm, rel, nonrel []Doc, st Stats) Result {
	qt, _ := mergeQuery(q)
	r := prepare(rel, m.docs)
	nr := prepare(nonrel, len(nonrel))
	all := make([]fbDoc, 0, len(r)+len(nr))
	all = append(append(all, r...), nr...)
	scale := make([]float64, len(all))
	for i := range all {
		if i < len(r) {
			scale[i] = m.beta / float64(len(r))
		} else {
			scale[i] = -m.gamma / float64(len(nr))
		}
	}
	var avgdl, n float64
	if !m.raw && len(all) > 0 {
		avgdl, n = st.AvgDL(), float64(st.N())
	}
	fv := pool(all, func(d, tf int) float64 {
		if m.raw {
			return scale[d] * float64(tf)
		}
		return scale[d] * m.bm25.TF(float64(tf), all[d].len, avgdl)
	})
	if !m.raw {
		for i := range fv {
			fv[i].Weight *= rank.IDF(n, float64(st.DF(fv[i].ID)))
		}
	}
	res := Result{Feedback: topN(fv, m.terms)}
	out := make([]Weighted, 0, len(qt)+len(res.Feedback))
	for _, t := range qt {
		f, _ := lookup(fv, t.ID)
		out = append(out, Weighted{t.ID, m.alpha*t.Weight + f})
	}
	for _, f := range res.Feedback {
		if _, inQuery := lookup(qt, f.ID); !inQuery {
			out = append(out, f)
		}
	}
	res.Query = out[:0]
	for _, w := range out {
		if w.Weight > 0 {
			res.Query = append(res.Query, w)
		}
	}
	sortByWeight(res.Query)
	return res
}

package prf

import (
	"cmp"
	"slices"

	"kinword/internal/rank"
)

// BlendOptions configure Blend. The zero value gives every default.
type BlendOptions struct {
	// FeedbackDocs is the number of highest-scoring documents both models
	// read. Default 10; must not be negative.
	FeedbackDocs int
	// FeedbackTerms is the number of terms each model keeps before they
	// are pooled (so the blend holds up to three times as many). Default
	// 20; must not be negative.
	FeedbackTerms int
	// OrigWeight is λ, the weight of the original query in
	// w'(t) = λ·P(t|Q) + (1−λ)·P(t|F), in [0, 1]. Default 0.5; a negative
	// value means 0.
	OrigWeight float64
	// RM3Share is the share s of the relevance model in the blended
	// feedback distribution P(t|F) = s·P_RM1(t) + (1−s)·P_θF(t), in
	// [0, 1]. Default 0.5; a negative value means 0 (the mixture model
	// alone).
	RM3Share float64
	// Mu is the relevance model's Dirichlet prior, in tokens (see
	// RM3Options.Mu). Default 1000.
	Mu float64
	// DocWeights is the relevance model's document weighting (see
	// RM3Options.DocWeights). Default "likelihood".
	DocWeights string
	// Background is the mixture model's background weight (see
	// MixtureOptions.Background). Default 0.5.
	Background float64
	// Tolerance and MaxIterations bound the mixture model's EM (see
	// MixtureOptions). Defaults 1e-8 and 100.
	Tolerance     float64
	MaxIterations int
	// RocchioShare is the share c of Rocchio's feedback vector in the
	// pooled distribution (see Blend), in [0, 1]. Default 1/3, so that
	// with RM3Share 0.5 the three models weigh alike; a negative value
	// means 0 (the relevance model and the mixture model only).
	RocchioShare float64
	// BM25 holds the BM25 parameters of Rocchio's document term weights
	// (see RocchioOptions.BM25); the zero value means k1 1.2, b 0.75.
	BM25 rank.BM25
}

// Defaults of BlendOptions.
const (
	DefaultRM3Share     = 0.5
	DefaultRocchioShare = 1.0 / 3
)

// Blend pools three feedback models over the same feedback documents: the
// relevance model RM1 of Lavrenko & Croft (SIGIR 2001), which weights each
// document by its query likelihood; the mixture-model θ_F of Zhai &
// Lafferty (CIKM 2001), which weights documents equally and discounts what
// the collection background explains; and Rocchio's (1971) feedback
// vector over BM25 term weights, whose IDF factor favours the terms that
// set the feedback documents apart. Each is cut to FeedbackTerms and
// renormalised to sum 1 (Rocchio's vector too), and the pooled
// distribution
//
//	P(t|F) = (1−c)·[s·P_RM1(t) + (1−s)·P_θF(t)] + c·R(t)
//
// (s RM3Share, c RocchioShare, R Rocchio's normalised vector) is
// interpolated with the original query as RM3 does. A weighted average of
// the models' estimates is the linear opinion pool (common practice for
// combining estimates). On the judged collections, with 2-fold
// cross-validated parameters, pooling RM1 and θ_F was steadier across folds
// than either alone, and adding Rocchio's third raised the robustness
// index (see the eval reports).
type Blend struct {
	rm3    *RM3
	mix    *Mixture
	roc    *Rocchio // nil when RocchioShare is 0
	lambda float64
	share  float64
	rshare float64
}

// NewBlend returns a blended model with opt's defaults filled in. The
// error wraps ErrBadOptions.
func NewBlend(opt BlendOptions) (*Blend, error) {
	if err := checkCounts("blend", opt.FeedbackDocs, opt.FeedbackTerms); err != nil {
		return nil, err
	}
	b := &Blend{
		lambda: resolveFraction(opt.OrigWeight, DefaultOrigWeight),
		share:  resolveFraction(opt.RM3Share, DefaultRM3Share),
		rshare: resolveFraction(opt.RocchioShare, DefaultRocchioShare),
	}
	if !checkFraction(b.lambda, 1) {
		return nil, errorf("blend: OrigWeight %g not in [0, 1]", opt.OrigWeight)
	}
	if !checkFraction(b.share, 1) {
		return nil, errorf("blend: RM3Share %g not in [0, 1]", opt.RM3Share)
	}
	if !checkFraction(b.rshare, 1) {
		return nil, errorf("blend: RocchioShare %g not in [0, 1]", opt.RocchioShare)
	}
	var err error
	// Each part gets a negative OrigWeight (meaning 0): only its feedback
	// distribution is used.
	if b.rm3, err = NewRM3(RM3Options{FeedbackDocs: opt.FeedbackDocs, FeedbackTerms: opt.FeedbackTerms, OrigWeight: -1, Mu: opt.Mu, DocWeights: opt.DocWeights}); err != nil {
		return nil, err
	}
	if b.mix, err = NewMixture(MixtureOptions{FeedbackDocs: opt.FeedbackDocs, FeedbackTerms: opt.FeedbackTerms, OrigWeight: -1,
		Background: opt.Background, Tolerance: opt.Tolerance, MaxIterations: opt.MaxIterations}); err != nil {
		return nil, err
	}
	if b.rshare > 0 {
		if b.roc, err = NewRocchio(RocchioOptions{FeedbackDocs: opt.FeedbackDocs, FeedbackTerms: opt.FeedbackTerms, BM25: opt.BM25}); err != nil {
			return nil, err
		}
	}
	return b, nil
}

// Expand runs the models for q over docs and pools them. Result.Feedback
// is the pooled distribution P(t|F) (sums to 1), Result.Query its
// interpolation with the original query, and Result.Iterations the
// mixture model's EM iterations. Without usable feedback it behaves as RM3
// does: Feedback is nil and Query is the original query's distribution;
// a model that finds nothing (θ_F all zero, or no positive Rocchio
// weight) drops out and the others keep their relative shares.
func (b *Blend) Expand(q []QueryTerm, docs []Doc, st Stats) Result {
	qt, qsum := mergeQuery(q)
	var qdist []Weighted
	if qsum > 0 {
		qdist = normalised(qt, qsum)
	}
	var res Result
	r := b.rm3.Expand(q, docs, st)
	if r.Feedback != nil {
		m := b.mix.Expand(q, docs, st)
		res.Iterations = m.Iterations
		switch {
		case len(m.Feedback) == 0:
			// The mixture model found nothing beyond the background
			// (every θ_F weight zero): the relevance model alone.
			res.Feedback = r.Feedback
		default:
			res.Feedback = pour(r.Feedback, m.Feedback, b.share)
		}
		if b.roc != nil {
			if c := unitSum(b.roc.Expand(q, docs, st).Feedback); c != nil {
				res.Feedback = pour(c, res.Feedback, b.rshare)
			}
		}
	}
	res.Query = combine(qdist, res.Feedback, b.lambda)
	return res
}

// pour returns s·a + (1−s)·c over the union of the two distributions'
// terms, zero weights dropped, sorted by weight (ties: term ID).
func pour(a, c []Weighted, s float64) []Weighted {
	byID := slices.Clone(a)
	slices.SortFunc(byID, func(x, y Weighted) int { return cmp.Compare(x.ID, y.ID) })
	return interpolate(byID, c, s)
}

// unitSum returns ws scaled to sum 1, or nil when the sum is not positive.
func unitSum(ws []Weighted) []Weighted {
	sum := 0.0
	for _, w := range ws {
		sum += w.Weight
	}
	if !(sum > 0) {
		return nil
	}
	out := make([]Weighted, len(ws))
	for i, w := range ws {
		out[i] = Weighted{w.ID, w.Weight / sum}
	}
	return out
}

package prf

import "math"

// MixtureOptions configure mixture-model feedback. The zero value gives
// every default.
type MixtureOptions struct {
	// FeedbackDocs is the number of highest-scoring documents taken as
	// pseudo-relevant. Default 10; must not be negative.
	FeedbackDocs int
	// FeedbackTerms is the number of terms kept in θ_F before it is
	// renormalised and interpolated. Default 20; must not be negative.
	FeedbackTerms int
	// OrigWeight is the weight of the original query in the expanded query
	// (1−OrigWeight)·θ_F + OrigWeight·θ_Q, in [0, 1]; Zhai & Lafferty's α
	// is 1 − OrigWeight. Default 0.5; a negative value means 0.
	OrigWeight float64
	// Background is λ, the fixed proportion of feedback-document words
	// drawn from the collection model p(w|C) (the paper's noise
	// proportion), in [0, 1). Default 0.5; a negative value means 0, which
	// makes θ_F the maximum-likelihood estimate.
	Background float64
	// Tolerance stops EM once no p(w|θ_F) changes by more than it between
	// two iterations. Default 1e-8; must not be negative.
	Tolerance float64
	// MaxIterations caps the EM iterations. Default 100; must not be
	// negative.
	MaxIterations int
}

// Defaults of MixtureOptions.
const (
	DefaultBackground    = 0.5
	DefaultTolerance     = 1e-8
	DefaultMaxIterations = 100
)

// Mixture is the model-based feedback of Zhai & Lafferty (CIKM 2001),
// "Model-based Feedback in the Language Modeling Approach to Information
// Retrieval", section 3.1: the words of the feedback documents F are taken
// as drawn from the mixture (1−λ)·p(w|θ_F) + λ·p(w|C) with the background
// p(w|C) = CF(w)/TotalLen and λ fixed, and θ_F is fitted by EM to the
// pooled counts c(w,F), starting from the maximum-likelihood estimate:
//
//	E-step: t(w) = (1−λ)p(w|θ_F) / ((1−λ)p(w|θ_F) + λp(w|C))
//	M-step: p(w|θ_F) ∝ c(w,F)·t(w)
//
// Words common in the whole collection are explained by the background and
// pushed down, leaving the words that distinguish the feedback documents.
type Mixture struct {
	docs, terms, maxIter int
	orig, lambda, tol    float64
}

// NewMixture returns a mixture-model feedback with opt's defaults filled
// in. The error wraps ErrBadOptions.
func NewMixture(opt MixtureOptions) (*Mixture, error) {
	if err := checkCounts("mixture", opt.FeedbackDocs, opt.FeedbackTerms); err != nil {
		return nil, err
	}
	m := &Mixture{
		docs:    resolveCount(opt.FeedbackDocs, DefaultFeedbackDocs),
		terms:   resolveCount(opt.FeedbackTerms, DefaultFeedbackTerms),
		maxIter: resolveCount(opt.MaxIterations, DefaultMaxIterations),
		orig:    resolveFraction(opt.OrigWeight, DefaultOrigWeight),
		lambda:  resolveFraction(opt.Background, DefaultBackground),
		tol:     opt.Tolerance,
	}
	if !checkFraction(m.orig, 1) {
		return nil, errorf("mixture: OrigWeight %g not in [0, 1]", opt.OrigWeight)
	}
	if !checkFraction(m.lambda, 1) || m.lambda == 1 {
		return nil, errorf("mixture: Background %g not in [0, 1)", opt.Background)
	}
	if m.maxIter < 0 {
		return nil, errorf("mixture: MaxIterations %d is negative", opt.MaxIterations)
	}
	if m.tol == 0 {
		m.tol = DefaultTolerance
	}
	if !checkFraction(m.tol, math.MaxFloat64) {
		return nil, errorf("mixture: Tolerance %g is not a non-negative number", opt.Tolerance)
	}
	return m, nil
}

// Expand fits θ_F to the feedback documents docs (the FeedbackDocs
// highest-scoring are used) against the background read from st; st may
// be nil only when docs is empty.
//
// Result.Feedback is θ_F cut to FeedbackTerms terms and renormalised,
// Result.Query the interpolated query (both sum to 1), and
// Result.Iterations the number of EM iterations run. Without usable
// feedback Feedback is nil and Query is the original query as the
// distribution weight/Σweight; without usable query terms Query is θ_F.
func (m *Mixture) Expand(q []QueryTerm, docs []Doc, st Stats) Result {
	return expandFrame(q, docs, m.docs, m.terms, m.orig, func(_ []Weighted, fb []fbDoc) ([]Weighted, int) {
		return m.fit(pool(fb, func(_, tf int) float64 { return float64(tf) }), st)
	})
}

// fit runs EM on the pooled counts (sorted by ID) and returns p(w|θ_F) in
// the same order, with the number of iterations run.
func (m *Mixture) fit(counts []Weighted, st Stats) ([]Weighted, int) {
	n := len(counts)
	c := make([]float64, n)     // c(w,F)
	theta := make([]float64, n) // p(w|θ_F), normalised
	raw := make([]float64, n)   // c(w,F)·t(w), the unnormalised M-step
	bg := make([]float64, n)    // λ·p(w|C)
	var total float64
	for i, x := range counts {
		c[i] = x.Weight
		total += x.Weight
	}
	collLen := float64(st.TotalLen())
	for i, x := range counts {
		theta[i] = c[i] / total
		if collLen > 0 {
			bg[i] = m.lambda * float64(st.CF(x.ID)) / collLen
		}
	}
	// Each pass normalises the previous M-step (raw/sum), measures the
	// change it made, and runs the next E- and M-step on the result, so one
	// pass over the terms serves one iteration.
	a := 1 - m.lambda
	copy(raw, theta)
	sum, iters := 1.0, 0
	for ; iters < m.maxIter; iters++ {
		inv := 1 / sum
		var change float64
		sum = 0
		theta, raw, bg := theta[:n], raw[:n], bg[:n] // bounds-check hints
		for i, cw := range c {
			th := raw[i] * inv
			if d := math.Abs(th - theta[i]); d > change {
				change = d
			}
			theta[i] = th
			var r float64
			if fg := a * th; fg > 0 {
				r = cw * fg / (fg + bg[i])
			}
			raw[i] = r
			sum += r
		}
		if iters > 0 && change < m.tol || !(sum > 0) {
			break
		}
	}
	if sum > 0 && iters == m.maxIter {
		inv := 1 / sum // the last M-step is not yet in theta
		for i := range theta {
			theta[i] = raw[i] * inv
		}
	}
	out := make([]Weighted, n)
	for i, x := range counts {
		out[i] = Weighted{x.ID, theta[i]}
	}
	return out, iters
}

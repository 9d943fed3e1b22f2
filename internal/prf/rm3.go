package prf

import "math"

// RM3Options configure RM3. The zero value gives every default.
type RM3Options struct {
	// FeedbackDocs is the number of highest-scoring documents taken as
	// pseudo-relevant. Default 10; must not be negative.
	FeedbackDocs int
	// FeedbackTerms is the number of terms kept in the relevance model
	// before it is renormalised and interpolated. Default 20; must not be
	// negative.
	FeedbackTerms int
	// OrigWeight is λ, the weight of the original query in the expanded
	// query w'(t) = λ·P(t|Q) + (1−λ)·P(t|R), in [0, 1]. Default 0.5; a
	// negative value means 0 (the expanded query is the relevance model).
	OrigWeight float64
	// Mu is the Dirichlet prior μ, in tokens, of the query likelihood
	// P(Q|D) that weights each feedback document. Default 1000 (common
	// practice). Kinword's documents are often much shorter than μ, which
	// flattens the document weights towards uniform; a μ near the mean
	// document length weights them more sharply. Must not be negative.
	Mu float64
	// DocWeights says how feedback documents are weighted: "" or
	// DocWeightsLikelihood (the posterior of P(Q|D), the relevance
	// model's own) or DocWeightsGeometric (the posterior of
	// P(Q|D)^(1/|Q|), |Q| the query's total weight: the per-word geometric
	// mean, which keeps a long query from putting nearly all the weight on
	// its single best document). Default DocWeightsLikelihood.
	DocWeights string
}

// Document weightings of RM3Options.DocWeights.
const (
	DocWeightsLikelihood = "likelihood"
	DocWeightsGeometric  = "geometric"
)

// DefaultMu is the default Dirichlet prior of RM3Options.Mu, in tokens.
const DefaultMu = 1000

// RM3 is the relevance-model feedback of Lavrenko & Croft (SIGIR 2001),
// "Relevance-Based Language Models", in its RM1 form
//
//	P(w|R) ∝ Σ_D P(w|D) · P(Q|D)
//
// over the feedback documents D, with P(Q|D) = Π_q P(q|D)^weight(q) the
// Dirichlet-smoothed query likelihood P(q|D) = (tf(q,D) + μ·p(q|C)) /
// (|D| + μ), p(q|C) = CF(q)/TotalLen, and P(w|D) = tf(w,D)/|D| the
// maximum-likelihood estimate (common practice). The posterior
// P(Q|D)/Σ P(Q|D') is computed in log space as a softmax, so long queries
// do not underflow. The RM1 distribution is cut to the FeedbackTerms
// strongest terms, renormalised, and interpolated with the original query
// as in the RM3 of Abdul-Jaleel et al. (TREC 2004), "UMass at TREC 2004".
type RM3 struct {
	docs, terms int
	lambda, mu  float64
	weights     string
}

// NewRM3 returns an RM3 model with opt's defaults filled in. The error
// wraps ErrBadOptions.
func NewRM3(opt RM3Options) (*RM3, error) {
	if err := checkCounts("rm3", opt.FeedbackDocs, opt.FeedbackTerms); err != nil {
		return nil, err
	}
	m := &RM3{
		docs:    resolveCount(opt.FeedbackDocs, DefaultFeedbackDocs),
		terms:   resolveCount(opt.FeedbackTerms, DefaultFeedbackTerms),
		lambda:  resolveFraction(opt.OrigWeight, DefaultOrigWeight),
		mu:      opt.Mu,
		weights: opt.DocWeights,
	}
	if !checkFraction(m.lambda, 1) {
		return nil, errorf("rm3: OrigWeight %g not in [0, 1]", opt.OrigWeight)
	}
	if m.mu == 0 {
		m.mu = DefaultMu
	}
	switch m.weights {
	case "":
		m.weights = DocWeightsLikelihood
	case DocWeightsLikelihood, DocWeightsGeometric:
	default:
		return nil, errorf("rm3: DocWeights %q (want %q or %q)", opt.DocWeights, DocWeightsLikelihood, DocWeightsGeometric)
	}
	if !(m.mu > 0) || math.IsInf(m.mu, 1) {
		return nil, errorf("rm3: Mu %g not a positive number", opt.Mu)
	}
	return m, nil
}

// Expand runs RM3 for query q over the feedback documents docs (the
// FeedbackDocs highest-scoring are used), reading collection statistics
// from st; st may be nil only when docs is empty.
//
// Result.Feedback is the truncated, renormalised RM1 distribution P(w|R)
// and Result.Query the interpolated query, both summing to 1. Without
// usable feedback (no documents, or none with terms) Feedback is nil and
// Query is the original query as the distribution P(t|Q) = weight/Σweight.
// Without usable query terms every document weighs the same and Query is
// the relevance model. A query term that does not occur in the collection
// (CF 0) would give every document likelihood zero and says nothing about
// which document is relevant, so it is left out of P(Q|D).
func (m *RM3) Expand(q []QueryTerm, docs []Doc, st Stats) Result {
	return expandFrame(q, docs, m.docs, m.terms, m.lambda, func(qt []Weighted, fb []fbDoc) ([]Weighted, int) {
		post := m.posterior(qt, fb, st)
		return pool(fb, func(d, tf int) float64 { return post[d] * float64(tf) / fb[d].len }), 0
	})
}

// posterior returns P(Q|D) / Σ_D' P(Q|D') for every feedback document,
// computed as a softmax of the log query likelihoods.
func (m *RM3) posterior(qt []Weighted, fb []fbDoc, st Stats) []float64 {
	type qterm struct {
		id    uint32
		w, pc float64
	}
	terms := make([]qterm, 0, len(qt))
	if total := float64(st.TotalLen()); total > 0 {
		for _, t := range qt {
			if cf := st.CF(t.ID); cf > 0 {
				terms = append(terms, qterm{t.ID, t.Weight, float64(cf) / total})
			}
		}
	}
	logp := make([]float64, len(fb))
	temp := 1.0
	if m.weights == DocWeightsGeometric {
		// P(Q|D)^(1/|Q|): the log likelihood per unit of query weight.
		temp = 0
		for _, t := range terms {
			temp += t.w
		}
		temp = max(temp, 1)
	}
	top := math.Inf(-1)
	for i, d := range fb {
		var l float64
		for _, t := range terms {
			tf := float64(termFreq(d.terms, t.id))
			l += t.w * math.Log((tf+m.mu*t.pc)/(d.len+m.mu))
		}
		logp[i] = l / temp
		top = max(top, logp[i])
	}
	var sum float64
	for i, l := range logp {
		logp[i] = math.Exp(l - top)
		sum += logp[i]
	}
	for i := range logp {
		logp[i] /= sum
	}
	return logp
}

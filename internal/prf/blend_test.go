package prf

import (
	"testing"
)

// TestBlendTinyCollection checks the blend on the tiny collection (query
// pump×2 valve×1, top 3 documents, 4 terms per model, λ 0.5, share 0.5):
// the average of RM3's feedback with μ 5 (TestRM3TinyCollection: pump
// 0.415097, water 0.293991, valve 0.277072, leak 0.013841) and the mixture
// model's with background 0.5 (TestMixtureClosedForm, derived by hand:
// pump 1/3, valve 1/4, leak 1/4, water 1/6), then interpolated with
// P(t|Q) = pump 2/3, valve 1/3. Averages and interpolation computed by
// hand from those values (checked once in Python 3). Rocchio's share is
// switched off here; TestBlendThreeModels adds it.
func TestBlendTinyCollection(t *testing.T) {
	docs, st := tiny()
	q := []QueryTerm{{pump, 2}, {valve, 1}}
	m := must(NewBlend(BlendOptions{FeedbackDocs: 3, FeedbackTerms: 4, Mu: 5, RocchioShare: -1}))
	res := m.Expand(q, docs, st)
	checkWeights(t, "feedback", res.Feedback, []Weighted{
		{pump, 0.374214962171290}, {valve, 0.263535758402475}, {water, 0.230328940737356}, {leak, 0.131920338688879}}, 1e-6)
	checkWeights(t, "query", res.Query, []Weighted{
		{pump, 0.520440814418978}, {valve, 0.298434545867904}, {water, 0.115164470368678}, {leak, 0.065960169344439}}, 1e-6)
	if res.Iterations == 0 || res.Iterations >= DefaultMaxIterations {
		t.Errorf("EM iterations %d", res.Iterations)
	}
}

// TestBlendThreeModels checks the default pool on the tiny collection
// (as TestBlendTinyCollection, Rocchio's share at its default 1/3).
// Rocchio's feedback vector over D1-D3 (β 0.75/3 per document, BM25 tf
// part with k1 1.2, b 0.75, avgdl 7.5, idf ln(1 + (N−df+0.5)/(df+0.5)),
// as in TestRocchioBM25Weights): pump 0.454400, valve 0.431550, leak
// 0.430616, meter 0.252471, water below them (its IDF ln(10/9) is small);
// those four renormalised, pooled as (2/3)·two-model + (1/3)·Rocchio, and
// interpolated with P(t|Q) at λ 0.5. Computed once by a separate plain
// Python 3 script from the documents (not through this package).
func TestBlendThreeModels(t *testing.T) {
	docs, st := tiny()
	q := []QueryTerm{{pump, 2}, {valve, 1}}
	m := must(NewBlend(BlendOptions{FeedbackDocs: 3, FeedbackTerms: 4, Mu: 5}))
	res := m.Expand(q, docs, st)
	checkWeights(t, "feedback", res.Feedback, []Weighted{
		{pump, 0.346011353919442}, {valve, 0.267371038791278}, {leak, 0.179428933910381},
		{water, 0.153552627158237}, {meter, 0.053636046220662}}, 1e-6)
	checkWeights(t, "query", res.Query, []Weighted{
		{pump, 0.506339010293055}, {valve, 0.300352186062305}, {leak, 0.089714466955191},
		{water, 0.076776313579119}, {meter, 0.026818023110331}}, 1e-6)
}

// normalisedRocchio is Rocchio's pseudo-relevance feedback with its
// feedback vector scaled to sum 1, as the blend takes it.
type normalisedRocchio struct{ *Rocchio }

func (n normalisedRocchio) Expand(q []QueryTerm, docs []Doc, st Stats) Result {
	fb := unitSum(n.Rocchio.Expand(q, docs, st).Feedback)
	qt, qsum := mergeQuery(q)
	return Result{Feedback: fb, Query: combine(normalised(qt, qsum), fb, DefaultOrigWeight)}
}

// TestBlendShares: RM3Share 1 with RocchioShare off is RM3's feedback,
// both off (negative) the mixture model's, and RocchioShare 1 Rocchio's
// normalised vector, exactly (definition of the blend).
func TestBlendShares(t *testing.T) {
	docs, st := randomCollection(4, 40, 500, 120)
	q := []QueryTerm{{3, 1}, {11, 2}}
	cases := []struct {
		name           string
		share, rocchio float64
		want           expander
	}{
		{"RM3 only", 1, -1, must(NewRM3(RM3Options{Mu: 300}))},
		{"mixture only", -1, -1, must(NewMixture(MixtureOptions{Background: 0.9}))},
		{"Rocchio only", 0.5, 1, normalisedRocchio{must(NewRocchio(RocchioOptions{}))}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := must(NewBlend(BlendOptions{RM3Share: c.share, RocchioShare: c.rocchio, Mu: 300, Background: 0.9}))
			got, want := b.Expand(q, docs, st), c.want.Expand(q, docs, st)
			checkWeights(t, "feedback", got.Feedback, want.Feedback, 1e-15)
			checkWeights(t, "query", got.Query, want.Query, 1e-15)
		})
	}
}

// TestRM3GeometricWeights: with DocWeights geometric the posterior is that
// of P(Q|D)^(1/|Q|), |Q| = 3 for pump×2 valve×1, so on the tiny collection
// with μ 5 the documents weigh 0.60938, 0.21068, 0.17995 instead of the
// likelihood's 0.93714, 0.03872, 0.02413. Expected values computed once by
// an independent straightforward Python 3 implementation (direct products,
// plain dicts).
func TestRM3GeometricWeights(t *testing.T) {
	docs, st := tiny()
	m := must(NewRM3(RM3Options{FeedbackDocs: 3, FeedbackTerms: 4, Mu: 5, DocWeights: DocWeightsGeometric}))
	res := m.Expand([]QueryTerm{{pump, 2}, {valve, 1}}, docs, st)
	checkWeights(t, "feedback", res.Feedback, []Weighted{
		{water, 0.334598991498133}, {pump, 0.331040663759184}, {valve, 0.231976906365372}, {leak, 0.102383438377312}}, 1e-9)
}

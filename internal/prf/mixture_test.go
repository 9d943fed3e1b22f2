package prf

import (
	"math"
	"testing"
)

// TestMixtureClosedForm checks the EM of Zhai & Lafferty (2001), section
// 3.1, on the tiny collection's top 3 documents. Their pooled counts are
// c = pump 4, valve 3, water 6, pressure 2, leak 3, meter 2 (T = 20) and
// the background p(w|C) = CF/30 = 4/30, 3/30, 14/30, 3/30, 3/30, 3/30.
// EM converges to the maximum of the concave log-likelihood
// Σ c(w) log((1−λ)θ_w + λp_w); its stationarity condition with a Lagrange
// multiplier, when every θ_w > 0 and Σ p_w = 1 over the pooled terms,
// gives θ_w = (c_w/T − λ p_w)/(1−λ) (derived by hand). With λ 0.5:
// θ = pump 4/15, valve 1/5, leak 1/5, water 2/15, pressure 1/10,
// meter 1/10. An independent Python 3 EM run once to 1e-16 agrees.
func TestMixtureClosedForm(t *testing.T) {
	docs, st := tiny()
	q := []QueryTerm{{pump, 2}, {valve, 1}}
	cases := []struct {
		name          string
		terms         int
		feedback, qry []Weighted
	}{
		{"all six terms", 6,
			[]Weighted{{pump, 4.0 / 15}, {valve, 0.2}, {leak, 0.2}, {water, 2.0 / 15}, {pressure, 0.1}, {meter, 0.1}},
			[]Weighted{{pump, 1.0/3 + 2.0/15}, {valve, 1.0/6 + 0.1}, {leak, 0.1}, {water, 1.0 / 15}, {pressure, 0.05}, {meter, 0.05}}},
		// Top 4 renormalised by their sum 4/5, then 0.5·P(t|Q) + 0.5·θ_F.
		{"top four renormalised", 4,
			[]Weighted{{pump, 1.0 / 3}, {valve, 0.25}, {leak, 0.25}, {water, 1.0 / 6}},
			[]Weighted{{pump, 0.5}, {valve, 1.0/6 + 0.125}, {leak, 0.125}, {water, 1.0 / 12}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := must(NewMixture(MixtureOptions{FeedbackDocs: 3, FeedbackTerms: c.terms}))
			res := m.Expand(q, docs, st)
			checkWeights(t, "feedback", res.Feedback, c.feedback, 1e-6)
			checkWeights(t, "query", res.Query, c.qry, 1e-6)
			if res.Iterations >= DefaultMaxIterations {
				t.Errorf("EM did not converge: %d iterations", res.Iterations)
			}
		})
	}
}

// TestMixtureFixedPoint checks that the returned θ_F satisfies the M-step
// equation θ(w) = c(w)t(w) / Σ c(v)t(v) with t from the E-step (Zhai &
// Lafferty 2001, section 3.1) on random collections. Terms rarer in the
// feedback documents than in the collection drift to zero slowly (EM
// converges sublinearly at the boundary), so the cap is raised here and
// convergence is required.
func TestMixtureFixedPoint(t *testing.T) {
	for _, lambda := range []float64{0.2, 0.5, 0.9} {
		for seed := uint64(1); seed <= 3; seed++ {
			all, st := randomCollection(seed, 60, 300, 80)
			docs := all[:10]
			m := must(NewMixture(MixtureOptions{Background: lambda, FeedbackTerms: 1 << 20, MaxIterations: 100000}))
			res := m.Expand([]QueryTerm{{1, 1}}, docs, st)
			if res.Iterations >= 100000 {
				t.Fatalf("λ %v seed %d: EM did not converge", lambda, seed)
			}
			t.Logf("λ %v seed %d: %d iterations", lambda, seed, res.Iterations)
			theta := map[uint32]float64{}
			for _, w := range res.Feedback {
				theta[w.ID] = w.Weight
			}
			c := map[uint32]float64{}
			for _, d := range docs {
				for _, tf := range d.Terms {
					c[tf.Term] += float64(tf.TF)
				}
			}
			next := map[uint32]float64{}
			var z float64
			for id, cw := range c {
				fg := (1 - lambda) * theta[id]
				tw := fg / (fg + lambda*float64(st.CF(id))/float64(st.TotalLen()))
				next[id] = cw * tw
				z += next[id]
			}
			var worst float64
			for id := range c {
				worst = math.Max(worst, math.Abs(next[id]/z-theta[id]))
			}
			if worst > 1e-8 {
				t.Errorf("λ %v seed %d: M-step moves θ by %g (%d iterations)", lambda, seed, worst, res.Iterations)
			}
		}
	}
}

// TestMixtureZeroBackgroundIsML: with λ = 0 the E-step gives t(w) = 1 and
// θ_F is the maximum-likelihood estimate c(w,F)/|F| (Zhai & Lafferty
// 2001, section 3.1, by substitution).
func TestMixtureZeroBackgroundIsML(t *testing.T) {
	docs, st := tiny()
	m := must(NewMixture(MixtureOptions{FeedbackDocs: 3, FeedbackTerms: 6, Background: -1}))
	res := m.Expand(nil, docs, st)
	checkWeights(t, "feedback", res.Feedback, []Weighted{
		{water, 0.3}, {pump, 0.2}, {valve, 0.15}, {leak, 0.15}, {pressure, 0.1}, {meter, 0.1}}, 1e-15)
	if res.Iterations != 1 {
		t.Errorf("took %d iterations, want 1", res.Iterations)
	}
}

// TestMixturePushesDownBackground checks the motivation of Zhai & Lafferty
// (2001), section 3.1: a word frequent in the whole collection (water,
// 14 of 30 tokens) tops the ML estimate of the feedback documents (0.3)
// but loses weight as the background proportion λ grows, while a word
// specific to the feedback documents (leak) gains.
func TestMixturePushesDownBackground(t *testing.T) {
	docs, st := tiny()
	prevWater, prevLeak := 0.3, 0.15 // the ML shares (λ = 0)
	for _, lambda := range []float64{0.4, 0.5, 0.7} {
		m := must(NewMixture(MixtureOptions{FeedbackDocs: 3, FeedbackTerms: 6, Background: lambda}))
		res := m.Expand(nil, docs, st)
		got := map[uint32]float64{}
		for _, w := range res.Feedback {
			got[w.ID] = w.Weight
		}
		if got[water] >= prevWater || got[leak] <= prevLeak {
			t.Errorf("λ %v: water %v (was %v), leak %v (was %v)", lambda, got[water], prevWater, got[leak], prevLeak)
		}
		if res.Feedback[0].ID == water {
			t.Errorf("λ %v: water still on top", lambda)
		}
		prevWater, prevLeak = got[water], got[leak]
	}
}

package suggest

import (
	"math"
	"slices"
	"testing"

	"kinword/internal/access"
	"kinword/internal/prf"
)

func TestExpand(t *testing.T) {
	q := []QueryTerm{{"pump", 1}, {"station", 2}}
	cases := []struct {
		name     string
		query    []QueryTerm
		accepted []string
		weight   float64
		want     []QueryTerm
	}{
		{"default weight 0.3 of the largest original weight", q, []string{"booster", "impel"}, 0,
			[]QueryTerm{{"pump", 1}, {"station", 2}, {"booster", 0.6}, {"impel", 0.6}}},
		{"configured weight", q, []string{"booster"}, 0.5,
			[]QueryTerm{{"pump", 1}, {"station", 2}, {"booster", 1}}},
		{"phrases stay phrases, spaces normalised", []QueryTerm{{"leak", 1}}, []string{" main  break "}, 0.3,
			[]QueryTerm{{"leak", 1}, {"main break", 0.3}}},
		{"query terms, repeats and blanks skipped", q, []string{"pump", "booster", "booster", "", " "}, 0.3,
			[]QueryTerm{{"pump", 1}, {"station", 2}, {"booster", 0.6}}},
		{"repeated query keys merged", []QueryTerm{{"leak", 1}, {"leak", 1}}, []string{"logger"}, 0.3,
			[]QueryTerm{{"leak", 2}, {"logger", 0.6}}},
		{"empty query: weight itself", nil, []string{"logger"}, 0.3, []QueryTerm{{"logger", 0.3}}},
		{"keys of suggestions", []QueryTerm{{"leak", 1}}, Keys([]Suggestion{{Term: "logger"}, {Term: "night flow"}}), 0.3,
			[]QueryTerm{{"leak", 1}, {"logger", 0.3}, {"night flow", 0.3}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := slices.Clone(c.query)
			got := Expand(c.query, c.accepted, c.weight)
			if !slices.EqualFunc(got, c.want, func(a, b QueryTerm) bool { return a.Key == b.Key && math.Abs(a.Weight-b.Weight) < 1e-12 }) {
				t.Errorf("Expand = %v, want %v", got, c.want)
			}
			if !slices.Equal(in, c.query) {
				t.Error("input modified")
			}
		})
	}
}

// TestAutoExpandInterpolation checks AutoExpand's weights against the
// interpolated query of the prf models themselves: for an expansion term t
// (not a query word) prf's Query(t) is the feedback part (1−λ)·P(t|F)
// (Rocchio: F(t)), and the query's own part is λ·w_q/Σw (Rocchio: α·w_q),
// so AutoExpand must give weight(t)/weight(q_max) = Query(t) / (λ·w_max/Σw)
// (Rocchio: Query(t) / (α·w_max)). This is RM3's interpolation as in
// Abdul-Jaleel et al. (TREC 2004), rescaled.
func TestAutoExpandInterpolation(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	query := []QueryTerm{{key("leak"), 2}, {"main break", 1}}
	hits := v.rank("leak", 10)
	cases := []struct {
		name  string
		opt   Options
		model func() (feedbackModel, error)
		orig  float64 // λ or α
		sumQW bool    // divide by Σw (rm3, mixture)
	}{
		{"rm3 defaults", Options{AutoModel: "rm3"}, func() (feedbackModel, error) {
			return prf.NewRM3(prf.RM3Options{FeedbackTerms: DefaultFeedbackTerms})
		}, prf.DefaultOrigWeight, true},
		{"rm3 lambda 0.8", Options{AutoModel: "rm3", RM3: prf.RM3Options{OrigWeight: 0.8}}, func() (feedbackModel, error) {
			return prf.NewRM3(prf.RM3Options{FeedbackTerms: DefaultFeedbackTerms, OrigWeight: 0.8})
		}, 0.8, true},
		{"blend defaults", Options{}, func() (feedbackModel, error) {
			return prf.NewBlend(prf.BlendOptions{FeedbackTerms: DefaultFeedbackTerms, Mu: DefaultBlendMu, Tolerance: DefaultBlendTolerance})
		}, prf.DefaultOrigWeight, true},
		{"mixture", Options{AutoModel: "mixture"}, func() (feedbackModel, error) {
			return prf.NewMixture(prf.MixtureOptions{FeedbackTerms: DefaultFeedbackTerms})
		}, prf.DefaultOrigWeight, true},
		{"rocchio", Options{AutoModel: "rocchio"}, func() (feedbackModel, error) {
			return prf.NewRocchio(prf.RocchioOptions{FeedbackTerms: DefaultFeedbackTerms})
		}, prf.DefaultAlpha, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e, err := New(nil, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			got := e.AutoExpand(v, Request{Query: query, Feedback: hits})
			// Originals come first; "leak" also gets its feedback part
			// (summed, as in the model's interpolated query), the phrase
			// stays at w/max w.
			if len(got) <= 2 || got[0].Key != "leak" || got[0].Weight < 1 || got[1] != (QueryTerm{"main break", 0.5}) {
				t.Fatalf("originals not first: %v", got)
			}
			// The reference: the prf model run directly on the same input.
			m, err := c.model()
			if err != nil {
				t.Fatal(err)
			}
			r := e.prepare(v, Request{Query: query, Feedback: hits})
			var docs []prf.Doc
			for _, d := range r.docs {
				docs = append(docs, prf.Doc{Terms: d.terms, Len: v.DocLen(d.d), Score: d.score})
			}
			mq := r.modelQuery() // leak 2, main 1, break 1
			res := m.Expand(mq, docs, v)
			wmax, wsum := 2.0, 4.0
			denom := c.orig * wmax
			if c.sumQW {
				denom /= wsum
			}
			for _, x := range append([]QueryTerm{got[0]}, got[2:]...) {
				id, _ := v.TermID(x.Key)
				i := slices.IndexFunc(res.Query, func(w prf.Weighted) bool { return w.ID == id })
				if i < 0 {
					t.Fatalf("%s not in the model's expanded query", x.Key)
				}
				want := res.Query[i].Weight / denom
				if x.Key == "main" || x.Key == "break" {
					// The model sees the phrase's words at the phrase's
					// weight; that original part stays on the phrase key
					// "main break" (0.5), not on its words.
					want -= 0.5
				}
				if math.Abs(x.Weight-want) > 1e-12*want {
					t.Errorf("%s: weight %g, want %g", x.Key, x.Weight, want)
				}
			}
			if n := len(got) - 2; n > DefaultAutoTerms {
				t.Errorf("%d expansion terms, want at most %d", n, DefaultAutoTerms)
			}
		})
	}
}

func TestAutoExpandEdges(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	e, _ := New(nil, Options{})
	q := []QueryTerm{{"leak", 4}}
	if got := e.AutoExpand(v, Request{Query: q}); !slices.Equal(got, []QueryTerm{{"leak", 1}}) {
		t.Errorf("no feedback: %v", got)
	}
	if got := e.AutoExpand(v, Request{Feedback: v.rank("leak", 10)}); len(got) != 0 {
		t.Errorf("no query: %v", got)
	}
	// λ = 0: the expansion has no query part to be relative to; the
	// strongest term gets weight 1.
	e0, _ := New(nil, Options{AutoModel: "rm3", RM3: prf.RM3Options{OrigWeight: -1}})
	got := e0.AutoExpand(v, Request{Query: q, Feedback: v.rank("leak", 10)})
	if len(got) < 2 {
		t.Fatalf("lambda 0: %v", got)
	}
	// The automatic mode keeps the model's own terms, unfiltered (the
	// display filters are for a searcher choosing terms); each key appears
	// once, a query term's parts summed.
	seen := map[string]bool{}
	for _, x := range got {
		if seen[x.Key] {
			t.Errorf("key %q appears twice", x.Key)
		}
		seen[x.Key] = true
	}
}

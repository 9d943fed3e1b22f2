package prf

import (
	"math"
	"reflect"
	"testing"
)

// TestRM3TinyCollection checks RM1 (Lavrenko & Croft 2001, eq. for P(w|R)
// with Dirichlet query likelihood) and the RM3 interpolation
// (Abdul-Jaleel et al. 2004) on the tiny collection: query pump×2 valve×1,
// the top 3 of 4 documents, 4 feedback terms, λ 0.5. The expected values
// were computed once by an independent straightforward Python 3
// implementation (direct products of P(q|D), no log space, plain dicts)
// and pasted here. With μ 5 the posteriors P(D|Q) are 0.93714, 0.03872,
// 0.02413, so D1 (pump 3, valve 2, water 2 of 7) dominates; with μ 1000
// they are nearly uniform (0.34462, 0.32802, 0.32736) — the flattening of
// a large μ on short documents.
func TestRM3TinyCollection(t *testing.T) {
	docs, st := tiny()
	q := []QueryTerm{{pump, 2}, {valve, 1}}
	cases := []struct {
		name          string
		mu            float64
		feedback, qry []Weighted
	}{
		{"mu 5", 5,
			[]Weighted{{pump, 0.415096591009246}, {water, 0.293991214808045}, {valve, 0.277071516804951}, {leak, 0.013840677377758}},
			[]Weighted{{pump, 0.540881628837956}, {valve, 0.305202425069142}, {water, 0.146995607404023}, {leak, 0.006920338688879}}},
		{"mu 1000 (default)", 0,
			[]Weighted{{water, 0.368311326832517}, {pump, 0.244058563753600}, {leak, 0.195670386316857}, {valve, 0.191959723097027}},
			[]Weighted{{pump, 0.455362615210133}, {valve, 0.262646528215180}, {water, 0.184155663416258}, {leak, 0.097835193158428}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := must(NewRM3(RM3Options{FeedbackDocs: 3, FeedbackTerms: 4, Mu: c.mu}))
			res := m.Expand(q, docs, st)
			checkWeights(t, "feedback", res.Feedback, c.feedback, 1e-9)
			checkWeights(t, "query", res.Query, c.qry, 1e-9)
		})
	}
}

// TestRM3LongQueryNoUnderflow: with query weights 1000 and 500 the direct
// product Π P(q|D)^w underflows to 0 for every document in float64; the
// log-space softmax still gives D1 essentially all the posterior mass, so
// P(w|R) is D1's maximum-likelihood model pump 3/7, valve 2/7, water 2/7
// (ties by ID). Derived by hand from the RM1 formula.
func TestRM3LongQueryNoUnderflow(t *testing.T) {
	docs, st := tiny()
	m := must(NewRM3(RM3Options{FeedbackDocs: 3, Mu: 5}))
	res := m.Expand([]QueryTerm{{pump, 1000}, {valve, 500}}, docs, st)
	checkWeights(t, "feedback", res.Feedback, []Weighted{{pump, 3.0 / 7}, {valve, 2.0 / 7}, {water, 2.0 / 7}}, 1e-12)
	if s := sum(res.Query); math.Abs(s-1) > 1e-12 {
		t.Errorf("query sums to %v", s)
	}
}

func TestRM3Options(t *testing.T) {
	docs, st := tiny()
	q := []QueryTerm{{pump, 2}, {valve, 1}}
	t.Run("OrigWeight negative means 0: query is the relevance model", func(t *testing.T) {
		res := must(NewRM3(RM3Options{OrigWeight: -1, Mu: 5})).Expand(q, docs, st)
		if !reflect.DeepEqual(res.Query, res.Feedback) {
			t.Errorf("query %v != feedback %v", res.Query, res.Feedback)
		}
	})
	t.Run("OrigWeight 1: query is P(t|Q)", func(t *testing.T) {
		res := must(NewRM3(RM3Options{OrigWeight: 1, Mu: 5})).Expand(q, docs, st)
		checkWeights(t, "query", res.Query, []Weighted{{pump, 2.0 / 3}, {valve, 1.0 / 3}}, 1e-15)
	})
	t.Run("FeedbackDocs picks the highest scores, not the first slots", func(t *testing.T) {
		m := must(NewRM3(RM3Options{FeedbackDocs: 3, FeedbackTerms: 4, Mu: 5}))
		want := m.Expand(q, docs, st)
		reordered := []Doc{docs[3], docs[2], docs[0], docs[1]}
		got := m.Expand(q, reordered, st)
		checkWeights(t, "feedback", got.Feedback, want.Feedback, 1e-12)
	})
	t.Run("query term absent from the collection is ignored", func(t *testing.T) {
		m := must(NewRM3(RM3Options{Mu: 5}))
		want := m.Expand(q, docs, st)
		got := m.Expand(append(q, QueryTerm{99, 1}), docs, st)
		checkWeights(t, "feedback", got.Feedback, want.Feedback, 1e-15)
	})
	t.Run("no usable query terms: uniform posterior, query is RM1", func(t *testing.T) {
		res := must(NewRM3(RM3Options{FeedbackDocs: 1})).Expand(nil, docs, st)
		checkWeights(t, "query", res.Query, []Weighted{{pump, 3.0 / 7}, {valve, 2.0 / 7}, {water, 2.0 / 7}}, 1e-15)
	})
}

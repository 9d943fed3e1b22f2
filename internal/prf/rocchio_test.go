package prf

import (
	"math"
	"testing"
)

// TestRocchioTextbook checks the Rocchio exercise of Manning, Raghavan &
// Schütze (2008), Introduction to Information Retrieval, ch. 9 (exercise
// text recalled from memory, not looked up): query "cheap CDs cheap DVDs
// extremely cheap CDs", relevant "CDs cheap software cheap CDs",
// non-relevant "cheap thrills DVDs", raw tf, no length normalisation,
// α 1, β 0.75, γ 0.25 (eq. 9.3, negatives clipped). Computed from the
// exercise by hand: cheap 3 + 0.75·2 − 0.25·1 = 4.25, CDs 2 + 0.75·2 =
// 3.5, extremely 1, DVDs 1 − 0.25 = 0.75, software 0.75·1 = 0.75,
// thrills −0.25 clipped (dropped).
func TestRocchioTextbook(t *testing.T) {
	const cheap, cds, dvds, extremely, software, thrills uint32 = 0, 1, 2, 3, 4, 5
	q := []QueryTerm{{cheap, 1}, {cds, 1}, {cheap, 1}, {dvds, 1}, {extremely, 1}, {cheap, 1}, {cds, 1}}
	rel := []Doc{{Terms: []TermFreq{{cheap, 2}, {cds, 2}, {software, 1}}}}
	nonrel := []Doc{{Terms: []TermFreq{{cheap, 1}, {dvds, 1}, {thrills, 1}}}}
	m := must(NewRocchio(RocchioOptions{Alpha: 1, Beta: 0.75, Gamma: 0.25, RawTF: true}))
	res := m.ExpandWith(q, rel, nonrel, nil)
	checkWeights(t, "query", res.Query, []Weighted{
		{cheap, 4.25}, {cds, 3.5}, {extremely, 1}, {dvds, 0.75}, {software, 0.75}}, 1e-12)
	// Feedback vector 0.75·d_R − 0.25·d_NR, positive part.
	checkWeights(t, "feedback", res.Feedback, []Weighted{{cds, 1.5}, {cheap, 1.25}, {software, 0.75}}, 1e-12)
}

// TestRocchioBM25Weights checks the document weights idf × BM25 tf part
// (Robertson & Zaragoza 2009, eq. 3.15, idf with +1 inside the log) on the
// tiny collection (N 4, avgdl 7.5), written out by hand here rather than
// through package rank. R = {D1} (pump 3, valve 2, water 2; |D| 7),
// NR = {D4} (water 8, pressure 1, meter 1; |D| 10), defaults α 1,
// β 0.75, γ 0.15, k1 1.2, b 0.75:
//
//	idf: pump, valve, pressure, meter (df 2) ln(1 + 2.5/2.5) = ln 2;
//	     water (df 4) ln(1 + 0.5/4.5) = ln(10/9)
//	tf part in D1 (norm 0.25 + 0.75·7/7.5 = 0.95): tf 3 → 6.6/4.14,
//	     tf 2 → 4.4/3.14; in D4 (norm 1.25): tf 8 → 17.6/9.5, tf 1 → 2.2/2.5
func TestRocchioBM25Weights(t *testing.T) {
	docs, st := tiny()
	ln2, ln109 := math.Log(2), math.Log(10.0/9)
	fPump := 0.75 * ln2 * 6.6 / 4.14
	fValve := 0.75 * ln2 * 4.4 / 3.14
	fWater := 0.75*ln109*4.4/3.14 - 0.15*ln109*17.6/9.5
	fPressure := -0.15 * ln2 * 2.2 / 2.5 // -0.0915: not in feedback
	cases := []struct {
		name          string
		q             []QueryTerm
		feedback, qry []Weighted
	}{
		{"query pump", []QueryTerm{{pump, 1}},
			[]Weighted{{pump, fPump}, {valve, fValve}, {water, fWater}},
			[]Weighted{{pump, 1 + fPump}, {valve, fValve}, {water, fWater}}},
		{"query term pushed below zero is dropped", []QueryTerm{{pump, 1}, {pressure, 0.05}},
			[]Weighted{{pump, fPump}, {valve, fValve}, {water, fWater}},
			[]Weighted{{pump, 1 + fPump}, {valve, fValve}, {water, fWater}}},
		{"query term reduced but kept", []QueryTerm{{pump, 1}, {pressure, 1}},
			[]Weighted{{pump, fPump}, {valve, fValve}, {water, fWater}},
			[]Weighted{{pump, 1 + fPump}, {pressure, 1 + fPressure}, {valve, fValve}, {water, fWater}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := must(NewRocchio(RocchioOptions{}))
			res := m.ExpandWith(c.q, docs[:1], docs[3:], st)
			checkWeights(t, "feedback", res.Feedback, c.feedback, 1e-12)
			checkWeights(t, "query", res.Query, c.qry, 1e-12)
		})
	}
}

// TestRocchioPseudoRelevant: Expand takes the FeedbackDocs highest-scoring
// documents as R and no NR; with one document that is D1 (score 3) even
// when it is not first in the slice, giving β·w(t, D1).
func TestRocchioPseudoRelevant(t *testing.T) {
	docs, st := tiny()
	m := must(NewRocchio(RocchioOptions{FeedbackDocs: 1}))
	res := m.Expand([]QueryTerm{{leak, 2}}, []Doc{docs[2], docs[0], docs[1]}, st)
	ln2, ln109 := math.Log(2), math.Log(10.0/9)
	checkWeights(t, "query", res.Query, []Weighted{
		{leak, 2}, {pump, 0.75 * ln2 * 6.6 / 4.14}, {valve, 0.75 * ln2 * 4.4 / 3.14}, {water, 0.75 * ln109 * 4.4 / 3.14}}, 1e-12)
}

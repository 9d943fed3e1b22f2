package prf_test

import (
	"fmt"

	"kinword/internal/prf"
)

// stats are the collection statistics of the three documents below.
type stats struct{}

var (
	names = []string{"reservoir", "level", "intake", "screen", "report"}
	cf    = []int64{3, 2, 2, 2, 3}
	df    = []int{2, 1, 1, 1, 3}
)

func (stats) N() int             { return 3 }
func (stats) TotalLen() int64    { return 12 }
func (stats) AvgDL() float64     { return 4 }
func (stats) DF(id uint32) int   { return df[id] }
func (stats) CF(id uint32) int64 { return cf[id] }

// ExampleRM3 expands the query "reservoir" from its two top documents; a
// third document (screen 2, report 1) is in the collection only. By hand:
// P(q|D1) = (2 + 4·3/12)/(5 + 4) = 1/3 and P(q|D2) = (1 + 1)/(4 + 4) = 1/4,
// so the posteriors are 4/7 and 3/7; P(w|R) is reservoir 0.3357, level
// 0.2286, report 0.2214, intake 0.2143; the top 3 renormalised by their
// sum 0.7857 and interpolated with λ 0.5 give the figures below.
func ExampleRM3() {
	const reservoir, level, intake, screen, report = 0, 1, 2, 3, 4
	docs := []prf.Doc{ // the first-pass results for "reservoir"
		{Terms: []prf.TermFreq{{reservoir, 2}, {level, 2}, {report, 1}}, Len: 5, Score: 2.1},
		{Terms: []prf.TermFreq{{reservoir, 1}, {intake, 2}, {report, 1}}, Len: 4, Score: 1.4},
	}
	m, err := prf.NewRM3(prf.RM3Options{Mu: 4, FeedbackTerms: 3})
	if err != nil {
		panic(err)
	}
	res := m.Expand([]prf.QueryTerm{{ID: reservoir, Weight: 1}}, docs, stats{})
	fmt.Println("suggest:")
	for _, w := range res.Feedback {
		fmt.Printf("  %-9s %.3f\n", names[w.ID], w.Weight)
	}
	fmt.Println("expanded query:")
	for _, w := range res.Query {
		fmt.Printf("  %-9s %.3f\n", names[w.ID], w.Weight)
	}
	// Output:
	// suggest:
	//   reservoir 0.427
	//   level     0.291
	//   report    0.282
	// expanded query:
	//   reservoir 0.714
	//   level     0.145
	//   report    0.141
}

// ExampleBlend pools, over the same two documents as ExampleRM3, the
// relevance model (reservoir 0.427, level 0.291, report 0.282 with μ 4
// and 3 terms) and the mixture model's θ_F (background weight 0.5). By
// hand (checked with a plain Python EM run to convergence): the pooled
// counts reservoir 3, level 2, intake 2, report 2 against the background
// 3/12, 2/12, 2/12, 3/12 give θ_F = 13/36, 13/54, 13/54, 17/108, whose
// top 3 renormalise to 3/7, 2/7, 2/7; the averages are below. Rocchio's
// third share is switched off here (TestBlendThreeModels checks it).
func ExampleBlend() {
	const reservoir = 0
	docs := []prf.Doc{
		{Terms: []prf.TermFreq{{0, 2}, {1, 2}, {4, 1}}, Len: 5, Score: 2.1},
		{Terms: []prf.TermFreq{{0, 1}, {2, 2}, {4, 1}}, Len: 4, Score: 1.4},
	}
	m, err := prf.NewBlend(prf.BlendOptions{Mu: 4, FeedbackTerms: 3, RocchioShare: -1})
	if err != nil {
		panic(err)
	}
	res := m.Expand([]prf.QueryTerm{{ID: reservoir, Weight: 1}}, docs, stats{})
	for _, w := range res.Feedback {
		fmt.Printf("%-9s %.3f\n", names[w.ID], w.Weight)
	}
	// Output:
	// reservoir 0.428
	// level     0.288
	// intake    0.143
	// report    0.141
}

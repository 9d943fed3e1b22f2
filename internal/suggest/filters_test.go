package suggest

import (
	"math"
	"strings"
	"testing"

	"kinword/internal/access"
	"kinword/internal/prf"
)

// mapStats is prf.Stats from fixed numbers, for hand-computed checks.
type mapStats struct {
	n      int
	df, cf map[uint32]int
}

func (m mapStats) N() int             { return m.n }
func (m mapStats) TotalLen() int64    { return 0 }
func (m mapStats) AvgDL() float64     { return 0 }
func (m mapStats) DF(id uint32) int   { return m.df[id] }
func (m mapStats) CF(id uint32) int64 { return int64(m.cf[id]) }

// TestResidualIDF checks ResidualIDF against values computed by hand from
// the definition of Church & Gale (1995), RIDF = log2(N/df) +
// log2(1 − e^(−cf/N)), with a pocket calculator's precision (python3's
// math module used as the calculator).
func TestResidualIDF(t *testing.T) {
	cases := []struct {
		name      string
		n, df, cf int
		want      float64
	}{
		// log2(100) = 6.643856; 1 − e^−0.05 = 0.0487706; log2 = −4.357845.
		{"bursty: 50 occurrences in 10 of 1000 documents", 1000, 10, 50, 2.286011},
		// log2(1000) = 9.965784; 1 − e^−0.001 = 0.0009995; log2 = −9.966506.
		{"once per document: slightly below 0", 1000, 1, 1, -0.000721},
		// Poisson with mean 1 predicts df = 100·(1 − e^−1) = 63.2:
		// log2(100/63) = 0.666576, log2(0.632121) = −0.661728.
		{"as Poisson predicts: near 0", 100, 63, 100, 0.004848},
		// log2(120/18) = 2.736966; 1 − e^−0.15 = 0.139292; log2 = −2.843815.
		{"planted generic word of the test collection", 120, 18, 18, -0.106850},
		// log2(12) = 3.584963; 1 − e^−(1/3) = 0.283469; log2 = −1.818739.
		{"planted bursty word of the test collection", 120, 10, 40, 1.766224},
		{"no documents", 0, 0, 0, 0},
		{"term absent", 100, 0, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st := mapStats{n: c.n, df: map[uint32]int{7: c.df}, cf: map[uint32]int{7: c.cf}}
			if got := ResidualIDF(st, 7); math.Abs(got-c.want) > 5e-6 {
				t.Errorf("ResidualIDF(N=%d, df=%d, cf=%d) = %.6f, want %.6f", c.n, c.df, c.cf, got, c.want)
			}
		})
	}
}

var _ prf.Stats = mapStats{}

// TestFilters runs every candidate filter on words planted in the test
// collection (see corpus_test.go), each beside a word that passes.
func TestFilters(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	cases := []struct {
		name string
		term string
		opt  Options
		want string
	}{
		{"bursty topical word passes", bursty, Options{}, ""},
		{"phrase with a query word passes", "isolation valve", Options{}, ""},
		{"stopword stem", stopStem, Options{}, rejStopword},
		{"query term itself", "valve", Options{}, rejQuery},
		{"stem variant of the query", "valves", Options{}, rejQuery},
		{"phrase of query words only", "valve valves", Options{}, rejQuery},
		{"bare number", number, Options{}, rejNumber},
		{"two-letter token", short, Options{}, rejShort},
		{"two-letter token allowed", short, Options{MinLetters: 2}, ""},
		{"not in the collection", "quagmire", Options{}, rejUnknown},
		{"in one document", rareWord, Options{}, rejRare},
		{"in one document, MinDF 1", rareWord, Options{MinDF: -1}, ""},
		{"in every document", everyDoc, Options{}, rejCommon},
		{"in every document, share filter off", everyDoc, Options{MaxDFShare: -1}, rejGeneric},
		{"generic word (residual IDF)", generic, Options{}, rejGeneric},
		{"generic word, filter off", generic, Options{MinResidualIDF: -1}, ""},
		{"phrase of generic words", genPhr, Options{}, rejGeneric},
		{"few documents: exempt from residual IDF", fewDocs, Options{}, ""},
		{"few documents, exemption off", fewDocs, Options{ResidualIDFMinDF: -1}, rejGeneric},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e, err := New(nil, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			r := e.prepare(v, Request{Query: []QueryTerm{{"valv", 1}}, Feedback: v.rank("valve", 10)})
			k := key(c.term)
			if got := e.reject(r, &cand{key: k, words: strings.Fields(k)}); got != c.want {
				t.Errorf("reject(%q) = %q, want %q", k, got, c.want)
			}
		})
	}
}

// TestFilteredNeverSuggested asks for every candidate and checks that no
// filtered word surfaces, the display-stopword check included.
func TestFilteredNeverSuggested(t *testing.T) {
	f := utilityCorpus()
	v := f.view(access.Anonymous)
	e, err := New(f.table(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	got := e.Suggest(v, Request{Query: []QueryTerm{{"valv", 1}}, Feedback: v.rank("valve", 10), K: 1000})
	seen := map[string]bool{}
	for _, s := range got {
		seen[s.Term] = true
	}
	for _, w := range []string{stopStem, stopDisp, "valve", number, short, rareWord, everyDoc, generic, genPhr} {
		if seen[key(w)] {
			t.Errorf("filtered %q (key %q) was suggested", w, key(w))
		}
	}
	if !seen[key(bursty)] {
		t.Errorf("control %q missing from %v", bursty, Keys(got))
	}
	if !e.hasStopword("however") || e.hasStopword("hydrants") {
		t.Error("display stopword check wrong")
	}
}

package prf

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// memStats computes Stats from an in-memory collection.
type memStats struct {
	n     int
	total int64
	df    map[uint32]int
	cf    map[uint32]int64
}

func statsOf(docs []Doc) *memStats {
	s := &memStats{n: len(docs), df: map[uint32]int{}, cf: map[uint32]int64{}}
	for _, d := range docs {
		for _, t := range d.Terms {
			s.df[t.Term]++
			s.cf[t.Term] += int64(t.TF)
			s.total += int64(t.TF)
		}
	}
	return s
}

func (s *memStats) N() int             { return s.n }
func (s *memStats) TotalLen() int64    { return s.total }
func (s *memStats) DF(id uint32) int   { return s.df[id] }
func (s *memStats) CF(id uint32) int64 { return s.cf[id] }
func (s *memStats) AvgDL() float64 {
	if s.n == 0 {
		return 0
	}
	return float64(s.total) / float64(s.n)
}

// Term IDs of the tiny collection.
const (
	pump uint32 = iota
	valve
	water
	pressure
	leak
	meter
)

// tiny is a four-document collection over six terms (IDs pump..meter),
// with first-pass scores 3, 2, 1, 0.5. CF: pump 4, valve 3, water 14,
// pressure 3, leak 3, meter 3; TotalLen 30; avgdl 7.5.
func tiny() ([]Doc, *memStats) {
	docs := []Doc{
		{Terms: []TermFreq{{pump, 3}, {valve, 2}, {water, 2}}, Len: 7, Score: 3},
		{Terms: []TermFreq{{pump, 1}, {water, 3}, {pressure, 2}, {leak, 1}}, Len: 7, Score: 2},
		{Terms: []TermFreq{{valve, 1}, {water, 1}, {leak, 2}, {meter, 2}}, Len: 6, Score: 1},
		{Terms: []TermFreq{{water, 8}, {pressure, 1}, {meter, 1}}, Len: 10, Score: 0.5},
	}
	return docs, statsOf(docs)
}

// randomCollection returns n documents over a vocabulary of v terms with
// skewed frequencies, decreasing scores, and their statistics.
func randomCollection(seed uint64, n, v, length int) ([]Doc, *memStats) {
	r := rand.New(rand.NewPCG(seed, 7))
	docs := make([]Doc, n)
	for i := range docs {
		tf := map[uint32]int{}
		l := 1 + r.IntN(length)
		for range l {
			// square of a uniform: low IDs are frequent, as in a Zipf law
			u := r.Float64()
			tf[uint32(u*u*float64(v))]++
		}
		for id, c := range tf {
			docs[i].Terms = append(docs[i].Terms, TermFreq{id, c})
		}
		slices.SortFunc(docs[i].Terms, func(a, b TermFreq) int { return int(a.Term) - int(b.Term) })
		docs[i].Len = l
		docs[i].Score = float64(n - i)
	}
	return docs, statsOf(docs)
}

// checkWeights fails unless ws has the given IDs in order with the given
// weights to within tol.
func checkWeights(t *testing.T, what string, ws []Weighted, want []Weighted, tol float64) {
	t.Helper()
	if len(ws) != len(want) {
		t.Fatalf("%s: got %d terms %v, want %d %v", what, len(ws), ws, len(want), want)
	}
	for i := range ws {
		if ws[i].ID != want[i].ID || math.Abs(ws[i].Weight-want[i].Weight) > tol {
			t.Errorf("%s[%d]: got %d %.15f, want %d %.15f", what, i, ws[i].ID, ws[i].Weight, want[i].ID, want[i].Weight)
		}
	}
}

// checkSorted fails unless ws is sorted by weight desc, ID asc, with
// distinct IDs and positive finite weights.
func checkSorted(t *testing.T, what string, ws []Weighted) {
	t.Helper()
	seen := map[uint32]bool{}
	for i, w := range ws {
		if !(w.Weight > 0) || math.IsInf(w.Weight, 0) {
			t.Errorf("%s[%d]: weight %v", what, i, w.Weight)
		}
		if seen[w.ID] {
			t.Errorf("%s: term %d twice", what, w.ID)
		}
		seen[w.ID] = true
		if p := ws[max(i-1, 0)]; i > 0 && (p.Weight < w.Weight || p.Weight == w.Weight && p.ID >= w.ID) {
			t.Errorf("%s: %v before %v", what, ws[i-1], w)
		}
	}
}

func sum(ws []Weighted) float64 {
	var s float64
	for _, w := range ws {
		s += w.Weight
	}
	return s
}

func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

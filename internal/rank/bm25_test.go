package rank

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// TestBM25HandComputed checks the formula of Robertson & Zaragoza (2009),
// "The Probabilistic Relevance Framework: BM25 and Beyond", eq. 3.15 with the
// idf of their eq. 3.18 plus one inside the log (the form of most current
// engines): tf 3, dl 100, avgdl 120, N 1000, n 10, k1 1.2, b 0.75 gives
// 7.42684 (computed by hand from the formula: idf = ln(1 + 990.5/10.5) =
// 4.55738, tf part = 3*2.2/(3 + 1.2*(0.25 + 0.75*100/120)) = 1.62963).
func TestBM25HandComputed(t *testing.T) {
	p := DefaultBM25
	cases := []struct {
		name                         string
		w, tf, dl, avgdl, N, n, want float64
	}{
		{"issue worked case", 1, 3, 100, 120, 1000, 10, 7.42684},
		{"query weight scales linearly", 2, 3, 100, 120, 1000, 10, 14.85368},
		{"absent term scores zero", 1, 0, 100, 120, 1000, 10, 0},
		{"idf never negative for n = N", 1, 1, 120, 120, 1000, 1000, 1 * math.Log(1+0.5/1000.5)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := p.Term(c.w, c.tf, c.dl, c.avgdl, c.N, c.n)
			if math.Abs(got-c.want) > 5e-5 {
				t.Errorf("got %.6f, want %.5f", got, c.want)
			}
		})
	}
}

func TestResolve(t *testing.T) {
	if got := (BM25{}).Resolve(); got != DefaultBM25 {
		t.Errorf("zero value resolves to %+v", got)
	}
	if got := (BM25{K1: 2, B: -1}).Resolve(); got.B != 0 || got.K1 != 2 {
		t.Errorf("negative B resolves to %+v", got)
	}
}

func TestTopKMatchesSort(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 50; trial++ {
		n := r.IntN(200)
		k := 1 + r.IntN(20)
		all := make([]Scored, n)
		tk := NewTopK(k)
		for i := range all {
			all[i] = Scored{Doc: uint32(i), Score: float64(r.IntN(10))} // many ties
			tk.Push(all[i])
		}
		sort.Slice(all, func(i, j int) bool { return Better(all[i], all[j]) })
		if len(all) > k {
			all = all[:k]
		}
		got := tk.Sorted()
		if len(got) != len(all) {
			t.Fatalf("len %d want %d", len(got), len(all))
		}
		for i := range got {
			if got[i] != all[i] {
				t.Fatalf("trial %d rank %d: %+v want %+v", trial, i, got[i], all[i])
			}
		}
	}
}

func BenchmarkTopK(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 2))
	xs := make([]Scored, 100000)
	for i := range xs {
		xs[i] = Scored{Doc: uint32(i), Score: r.Float64()}
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		tk := NewTopK(10)
		for _, x := range xs {
			tk.Push(x)
		}
		tk.Sorted()
	}
}

package index

import (
	"math/rand/v2"
	"slices"
	"sync"
	"testing"
)

// TestTermOrder checks that a record's term order lists its token
// positions by ascending term ID, ties by position, and that TermVector
// read through it counts as a plain sort and count does (the reference:
// countReference below, a count by map; common practice, no published
// value applies).
func TestTermOrder(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	random := make([]uint32, 5000)
	for i := range random {
		random[i] = uint32(rng.IntN(300))
	}
	cases := []struct {
		name string
		toks []uint32
	}{
		{"empty", nil},
		{"one token", []uint32{7}},
		{"already sorted", []uint32{1, 2, 2, 3}},
		{"ties keep their positions", []uint32{5, 1, 5, 1, 5}},
		{"large term IDs", []uint32{1 << 31, 3, 1<<32 - 1, 3}},
		{"random", random},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x := &fwdDoc{Tokens: c.toks}
			o := x.termOrder()
			if len(o) != len(c.toks) {
				t.Fatalf("order has %d positions for %d tokens", len(o), len(c.toks))
			}
			for i := 1; i < len(o); i++ {
				a, b := c.toks[o[i-1]], c.toks[o[i]]
				if a > b || (a == b && o[i-1] >= o[i]) {
					t.Fatalf("positions %d, %d (terms %d, %d) out of order", o[i-1], o[i], a, b)
				}
			}
			if again := x.termOrder(); len(o) > 0 && &again[0] != &o[0] {
				t.Error("the order was rebuilt on the second call")
			}
			w := &View{s: &snapshot{docs: []*fwdDoc{x}}}
			if got, want := w.TermVector(0), countReference(c.toks); !slices.Equal(got, want) {
				t.Errorf("TermVector = %v, want %v", got, want)
			}
		})
	}
}

// TestTermOrderTooLong: a document longer than 16-bit positions reach has
// no order, and TermVector sorts instead.
func TestTermOrderTooLong(t *testing.T) {
	toks := make([]uint32, maxOrdered+1)
	for i := range toks {
		toks[i] = uint32(len(toks) - i%3)
	}
	x := &fwdDoc{Tokens: toks}
	if o := x.termOrder(); o != nil {
		t.Fatalf("got an order of %d positions for %d tokens", len(o), len(toks))
	}
	w := &View{s: &snapshot{docs: []*fwdDoc{x}}}
	if got, want := w.TermVector(0), countReference(toks); !slices.Equal(got, want) {
		t.Errorf("TermVector = %v, want %v", got, want)
	}
}

// TestTermOrderConcurrent builds one record's order from several
// goroutines at once (run with -race).
func TestTermOrderConcurrent(t *testing.T) {
	x := &fwdDoc{Tokens: []uint32{9, 4, 9, 1, 4}}
	var wg sync.WaitGroup
	for range 8 {
		wg.Go(func() {
			if o := x.termOrder(); !slices.Equal(o, []uint16{3, 1, 4, 0, 2}) {
				t.Errorf("order %v", o)
			}
		})
	}
	wg.Wait()
}

func countReference(toks []uint32) []TermFreq {
	n := map[uint32]int{}
	for _, t := range toks {
		n[t]++
	}
	var out []TermFreq
	for t, c := range n {
		out = append(out, TermFreq{Term: t, TF: c})
	}
	slices.SortFunc(out, func(a, b TermFreq) int { return int(int64(a.Term) - int64(b.Term)) })
	return out
}

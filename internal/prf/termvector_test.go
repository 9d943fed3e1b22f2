package prf

import (
	"maps"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestTermVector checks both ways of reading a document's term vector, by
// a term order the corpus keeps and by sorting, against a count by map
// (the reference; common practice, no published value applies), including
// an order of the wrong length (ignored).
func TestTermVector(t *testing.T) {
	random := randomTokens(2000, 150)
	cases := []struct {
		name  string
		toks  []uint32
		order []uint16
	}{
		{"empty", nil, nil},
		{"sorted copy", []uint32{4, 2, 4, 9}, nil},
		{"term order", []uint32{4, 2, 4, 9}, []uint16{1, 0, 2, 3}},
		{"order of the wrong length is ignored", []uint32{4, 2, 4, 9}, []uint16{1, 0}},
		{"random, sorted copy", random, nil},
		{"random, term order", random, orderOf(random)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			want := map[uint32]int{}
			for _, x := range c.toks {
				want[x]++
			}
			got := TermVector(c.toks, c.order)
			if len(got) != len(want) {
				t.Fatalf("%d distinct terms, want %d", len(got), len(want))
			}
			for i, tf := range got {
				if want[tf.Term] != tf.TF || (i > 0 && got[i-1].Term >= tf.Term) {
					t.Fatalf("entry %d = %+v (want tf %d, ascending terms)", i, tf, want[tf.Term])
				}
			}
		})
	}
}

// orderOf is toks' positions in term order, ties by position, built by
// bucketing each term's positions (a counting sort).
func orderOf(toks []uint32) []uint16 {
	at := map[uint32][]uint16{}
	for i, t := range toks {
		at[t] = append(at[t], uint16(i))
	}
	terms := slices.Sorted(maps.Keys(at))
	var o []uint16
	for _, t := range terms {
		o = append(o, at[t]...)
	}
	return o
}

// randomTokens draws n term IDs below vocab with a fixed seed.
func randomTokens(n, vocab int) []uint32 {
	rng := rand.New(rand.NewPCG(3, 4))
	out := make([]uint32, n)
	for i := range out {
		out[i] = uint32(rng.IntN(vocab))
	}
	return out
}

package suggest

import (
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"

	"kinword/internal/access"
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
			got := termVector(c.toks, c.order)
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

// TestTermOrderSameSuggestions: an engine reading term vectors through a
// corpus's term order offers exactly what it offers when it sorts.
func TestTermOrderSameSuggestions(t *testing.T) {
	f := utilityCorpus()
	e, err := New(f.table(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	plain := f.view(access.Anonymous)
	ordered := orderedView{plain}
	for _, q := range []string{"valve", "main break", "pressure"} {
		req := Request{Query: []QueryTerm{{key(q), 1}}, Viewer: access.Anonymous, Feedback: plain.rank(q, 10), K: 8}
		a, b := e.Suggest(plain, req), e.Suggest(ordered, req)
		if len(a) == 0 {
			t.Fatalf("%q: no suggestions", q)
		}
		if !reflect.DeepEqual(a, b) {
			t.Errorf("%q: sorted %v, through the term order %v", q, Keys(a), Keys(b))
		}
		if x, y := e.AutoExpand(plain, req), e.AutoExpand(ordered, req); !reflect.DeepEqual(x, y) {
			t.Errorf("%q: automatic expansion %v, through the term order %v", q, x, y)
		}
	}
}

// orderedView is a fakeView that keeps term orders, as the index does.
type orderedView struct{ *fakeView }

func (w orderedView) TermOrder(d uint32) []uint16 {
	toks, _ := w.Tokens(d)
	return orderOf(toks)
}

func orderOf(toks []uint32) []uint16 {
	o := make([]uint16, len(toks))
	for i := range o {
		o[i] = uint16(i)
	}
	slices.SortStableFunc(o, func(a, b uint16) int { return int(int64(toks[a]) - int64(toks[b])) })
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

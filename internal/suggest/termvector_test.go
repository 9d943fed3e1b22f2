package suggest

import (
	"reflect"
	"slices"
	"testing"

	"kinword/internal/access"
)

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

package assoc

import (
	"cmp"
	"context"
	"errors"
	"slices"
	"strings"
	"testing"

	"kinword/internal/access"
)

// naive is a deliberately simple reference counter (maps, no hashing
// tricks, no spills) over paragraphs as units, for corpora whose paragraphs
// are shorter than PassageLen and with phrases disabled.
type naive struct {
	units int
	df    map[uint32]int
	udf   map[uint32]int
	k11   map[[2]uint32]int
	win   map[[2]uint32]int
	sup   map[[2]uint32]int
}

func naiveCount(c *MemCorpus, window, minDF int) *naive {
	n := &naive{df: map[uint32]int{}, udf: map[uint32]int{}, k11: map[[2]uint32]int{},
		win: map[[2]uint32]int{}, sup: map[[2]uint32]int{}}
	for i := 0; i < c.NumDocs(); i++ {
		seen := map[uint32]bool{}
		for _, t := range c.Doc(i).Tokens {
			seen[t] = true
		}
		for t := range seen {
			n.df[t]++
		}
	}
	ok := func(t uint32) bool { return n.df[t] >= minDF }
	pair := func(a, b uint32) [2]uint32 {
		if a > b {
			a, b = b, a
		}
		return [2]uint32{a, b}
	}
	for i := 0; i < c.NumDocs(); i++ {
		d := c.Doc(i)
		bounds := append([]int32{0}, d.Breaks...)
		bounds = append(bounds, int32(len(d.Tokens)))
		inDoc := map[[2]uint32]bool{}
		for p := 0; p+1 < len(bounds); p++ {
			toks := d.Tokens[bounds[p]:bounds[p+1]]
			if len(toks) == 0 {
				continue
			}
			n.units++
			set := map[uint32]bool{}
			for _, t := range toks {
				if ok(t) {
					set[t] = true
				}
			}
			for a := range set {
				n.udf[a]++
				for b := range set {
					if a < b {
						n.k11[[2]uint32{a, b}]++
						inDoc[[2]uint32{a, b}] = true
					}
				}
			}
			for x := range toks {
				for y := x + 1; y < len(toks) && y <= x+window; y++ {
					if ok(toks[x]) && ok(toks[y]) && toks[x] != toks[y] {
						n.win[pair(toks[x], toks[y])]++
					}
				}
			}
		}
		for k := range inDoc {
			n.sup[k]++
		}
	}
	return n
}

// TestCountsMatchReference checks every stored count and the choice of the
// top K against the naive reference on a generated corpus.
func TestCountsMatchReference(t *testing.T) {
	spec := smallSpec()
	spec.paraHi = 40
	c := synthCorpus(spec)
	opts := Options{MinPhraseCount: -1, PassageLen: 1000, TopK: 7, Window: 5}
	tb, err := Mine(context.Background(), c, opts)
	if err != nil {
		t.Fatal(err)
	}
	ref := naiveCount(c, 5, DefaultMinDF)
	st := tb.scopes[0]
	if int(st.units) != ref.units {
		t.Fatalf("units %d, reference %d", st.units, ref.units)
	}
	byTerm := map[uint32][][2]uint32{}
	for p := range ref.k11 {
		byTerm[p[0]] = append(byTerm[p[0]], p)
		byTerm[p[1]] = append(byTerm[p[1]], p)
	}
	checked := 0
	for id := 0; id < c.NumTerms(); id++ {
		stem := c.Term(uint32(id))
		lid, ok := tb.Lookup(stem)
		if ok != (ref.df[uint32(id)] >= DefaultMinDF) {
			t.Fatalf("term %q: in table %v, reference df %d", stem, ok, ref.df[uint32(id)])
		}
		if !ok {
			continue
		}
		if int(st.udf[lid]) != ref.udf[uint32(id)] || int(st.df[lid]) != ref.df[uint32(id)] {
			t.Fatalf("term %q: udf/df %d/%d, reference %d/%d", stem, st.udf[lid], st.df[lid], ref.udf[uint32(id)], ref.df[uint32(id)])
		}
		// Reference ranking: all supported, attracted pairs by signed G2, ties by key.
		type rn struct {
			term  string
			score float64
			p     [2]uint32
		}
		var want []rn
		for _, p := range byTerm[uint32(id)] {
			k := ref.k11[p]
			if ref.sup[p] < DefaultMinSupportDocs {
				continue
			}
			other := p[0] + p[1] - uint32(id)
			na, nb := ref.udf[uint32(id)], ref.udf[other]
			if k*ref.units <= na*nb {
				continue
			}
			want = append(want, rn{c.Term(other), NewContingency(int64(k), int64(na), int64(nb), int64(ref.units)).SignedG2(), p})
		}
		slices.SortFunc(want, func(a, b rn) int {
			if c := cmp.Compare(b.score, a.score); c != 0 {
				return c
			}
			return strings.Compare(a.term, b.term)
		})
		if len(want) > 7 {
			want = want[:7]
		}
		got := tb.Neighbours(access.Anonymous, lid, MeasureLLR, 0)
		if len(got) != len(want) {
			t.Fatalf("term %q: %d neighbours, reference %d", stem, len(got), len(want))
		}
		for i, g := range got {
			w := want[i]
			if g.Term != w.term || g.K11 != ref.k11[w.p] || g.Window != ref.win[w.p] || g.Docs != ref.sup[w.p] {
				t.Fatalf("term %q neighbour %d: got %s k11=%d win=%d docs=%d, reference %s k11=%d win=%d docs=%d",
					stem, i, g.Term, g.K11, g.Window, g.Docs, w.term, ref.k11[w.p], ref.win[w.p], ref.sup[w.p])
			}
			if g.K11+g.K12+g.K21+g.K22 != ref.units || g.K12 != ref.udf[uint32(id)]-g.K11 {
				t.Fatalf("term %q: bad contingency %+v", stem, g)
			}
			checked++
		}
	}
	if checked < 500 {
		t.Fatalf("only %d neighbours checked; corpus too weak", checked)
	}
}

// TestHandCountedExample counts a corpus small enough to do by hand.
// Units are the paragraphs; window ±2; MinDF and support 1 via options 1.
func TestHandCountedExample(t *testing.T) {
	c := NewMemCorpus(fakeStem)
	c.AddDoc(nil, strings.Fields("pumps valve meter"), strings.Fields("pump pipe"))
	c.AddDoc(nil, strings.Fields("valve pump x x x valve"))
	c.AddDoc(nil, strings.Fields("meter"))
	tb, err := Mine(context.Background(), c, Options{MinDF: 1, MinSupportDocs: 1, MinPhraseCount: -1, Window: 2})
	if err != nil {
		t.Fatal(err)
	}
	// Units: {pump valve meter}, {pump pipe}, {valve pump x}, {meter}: N = 4.
	// pump: 3 units; valve: 2; pump&valve: 2 units, 2 docs.
	// Window ±2 pump-valve: doc 1 (pumps,valve) = 1; doc 2 (valve,pump) = 1,
	// the final "valve" is 4 tokens after "pump" = 0. Total 2.
	nb := tb.Related(access.Anonymous, "pump", MeasureLLR, 0)
	var v *Neighbour
	for i := range nb {
		if nb[i].Term == "valve" {
			v = &nb[i]
		}
	}
	if v == nil {
		t.Fatalf("valve not a neighbour of pump: %+v", nb)
	}
	if v.K11 != 2 || v.K12 != 1 || v.K21 != 0 || v.K22 != 1 || v.Window != 2 || v.Docs != 2 {
		t.Errorf("pump/valve = %+v", *v)
	}
	id, _ := tb.Lookup("pump")
	if d := tb.display(id); d != "pump" { // "pumps" once, "pump" twice
		t.Errorf("display %q", d)
	}
	// pump-meter: 1 unit of 4 with pump in 3 and meter in 2: 1*4 <= 3*2, not
	// above chance, so it is not kept.
	for _, n := range nb {
		if n.Term == "meter" {
			t.Errorf("meter kept although below chance: %+v", n)
		}
	}
}

func TestPassageSpans(t *testing.T) {
	// One paragraph of 120 tokens, PassageLen 50: ceil(120/50) = 3 spans of
	// 40 tokens. Term a sits at 0 and 39 (span 1), b at 40 (span 2), so the
	// pair a-b shares no passage; c at 80 and 119 (span 3).
	words := make([]string, 120)
	for i := range words {
		words[i] = "f" + string(rune('a'+i%20)) + string(rune('a'+i/20))
	}
	words[0], words[39], words[40], words[80], words[119] = "a", "a", "b", "c", "c"
	c := NewMemCorpus(nil)
	c.AddDoc(nil, words)
	tb, err := Mine(context.Background(), c, Options{MinDF: 1, MinSupportDocs: 1, MinPhraseCount: -1})
	if err != nil {
		t.Fatal(err)
	}
	if u := tb.scopes[0].units; u != 3 {
		t.Fatalf("units %d, want 3", u)
	}
	for _, n := range tb.Related(access.Anonymous, "a", MeasureLLR, 0) {
		if n.Term == "b" || n.Term == "c" {
			t.Errorf("a has neighbour %q across a passage cut", n.Term)
		}
	}
}

func TestParagraphsIgnoresBadBreaks(t *testing.T) {
	cases := []struct {
		name   string
		n      int
		breaks []int32
		want   []int32
	}{
		{"none", 5, nil, []int32{0, 5}},
		{"zero and end ignored", 5, []int32{0, 2, 5}, []int32{0, 2, 2, 5}},
		{"decreasing ignored", 6, []int32{3, 1, 4}, []int32{0, 3, 3, 4, 4, 6}},
		{"empty doc", 0, []int32{0}, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := paragraphs(nil, tc.n, tc.breaks); !slices.Equal(got, tc.want) {
				t.Errorf("got %v, want %v", got, tc.want)
			}
		})
	}
}

// badCorpus wraps a MemCorpus and misreports its dictionary.
type badCorpus struct {
	*MemCorpus
	numTerms int
	term     func(id uint32) string
}

func (b badCorpus) NumTerms() int { return b.numTerms }

func (b badCorpus) Term(id uint32) string { return b.term(id) }

func TestBadCorpus(t *testing.T) {
	c := NewMemCorpus(nil)
	for range 4 {
		c.AddDoc(nil, strings.Fields("alpha beta gamma"))
	}
	cases := []struct {
		name string
		c    Corpus
	}{
		{"token beyond dictionary", badCorpus{c, 2, c.Term}},
		{"duplicate stems", badCorpus{c, 3, func(id uint32) string { return "same" }}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := Mine(context.Background(), tc.c, Options{MinPhraseCount: -1}); !errors.Is(err, ErrBadCorpus) {
				t.Fatalf("err = %v, want ErrBadCorpus", err)
			}
		})
	}
}

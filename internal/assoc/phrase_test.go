package assoc

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"kinword/internal/access"
)

// phraseCorpus: background words are uniform over 300 fillers (so random
// bigrams almost never repeat 5 times); planted: 40 docs with "smart water
// meters", 40 with "water meters ... leak", 30 with "water" and "meter"
// apart in one paragraph, and 4 docs with the adjacent pair "rare combo".
func phraseCorpus() *MemCorpus {
	r := rand.New(rand.NewPCG(11, 12))
	fill := func(n int) []string {
		w := make([]string, n)
		for i := range w {
			w[i] = fmt.Sprintf("fill%03d", r.IntN(300))
		}
		return w
	}
	c := NewMemCorpus(fakeStem)
	para := func(parts ...[]string) []string {
		var out []string
		for _, p := range parts {
			out = append(out, p...)
		}
		return out
	}
	for range 40 {
		c.AddDoc(nil, para(fill(5), []string{"smart", "water", "meters"}, fill(5)))
	}
	for range 40 {
		c.AddDoc(nil, para(fill(4), []string{"water", "meters"}, fill(3), []string{"leak"}, fill(4)))
	}
	for range 30 {
		c.AddDoc(nil, para([]string{"water"}, fill(6), []string{"meter"}, fill(6)))
	}
	for range 4 {
		c.AddDoc(nil, para(fill(5), []string{"rare", "combo"}, fill(5)))
	}
	for range 100 {
		c.AddDoc(nil, fill(15))
	}
	return c
}

func TestPhrases(t *testing.T) {
	tb, err := Mine(context.Background(), phraseCorpus(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	byKey := map[string]Phrase{}
	for _, p := range tb.Phrases() {
		byKey[p.Key] = p
	}
	cases := []struct {
		key, display string
		kept         bool
		docs         int
	}{
		{"water meter", "water meters", true, 40}, // parts' displays: "meters" 80x vs "meter" 30x
		{"smart water meter", "smart water meters", true, 40},
		{"rare combo", "", false, 0},      // 4 occurrences < MinPhraseCount 5
		{"smart water", "", false, 0},     // always extended to the trigram, never stands alone
		{"fill001 fill002", "", false, 0}, // background
	}
	for _, tc := range cases {
		t.Run(tc.key, func(t *testing.T) {
			p, ok := byKey[tc.key]
			if ok != tc.kept {
				t.Fatalf("kept = %v, want %v (phrases: %v)", ok, tc.kept, keys(byKey))
			}
			if ok && (p.Display != tc.display || p.Docs != tc.docs) {
				t.Errorf("got %+v, want display %q docs %d", p, tc.display, tc.docs)
			}
		})
	}
	// Parts are not double-counted: "water" and "meter" now occur only in
	// the 30 documents where they stand apart, so their pair has K11 = 30.
	st := tb.scopes[0]
	for _, w := range []string{"water", "meter"} {
		id, ok := tb.Lookup(w)
		if !ok || st.tf[id] != 30 {
			t.Fatalf("%q: in table %v, tf %d, want 30", w, ok, st.tf[id])
		}
	}
	found := false
	for _, n := range tb.Related(access.Anonymous, "water", MeasureLLR, 0) {
		if n.Term == "meter" {
			found = true
			if n.K11 != 30 {
				t.Errorf("water-meter K11 = %d, want 30", n.K11)
			}
		}
		if n.Term == "water meter" || n.Term == "smart water meter" {
			t.Errorf("water paired with its own phrase: %+v", n)
		}
	}
	if !found {
		t.Error("water-meter pair missing")
	}
	// A phrase is a term in its own right: it has neighbours.
	found = false
	for _, n := range tb.Related(access.Anonymous, "water meter", MeasureLLR, 0) {
		if n.Term == "leak" && n.K11 == 40 {
			found = true
		}
	}
	if !found {
		t.Error(`"water meter" lacks neighbour "leak" with K11 40`)
	}
}

func keys[V any](m map[string]V) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	return out
}

// TestPhraseThresholds checks the G2 gate (Dunning 1993) independently: a
// pair of frequent words adjacent only as often as chance predicts is not a
// phrase even when it is frequent.
func TestPhraseThresholds(t *testing.T) {
	c := NewMemCorpus(nil)
	r := rand.New(rand.NewPCG(3, 4))
	for range 200 {
		w := make([]string, 20)
		for i := range w {
			w[i] = []string{"alpha", "beta", "gamma", "delta"}[r.IntN(4)]
		}
		c.AddDoc(nil, w)
	}
	tb, err := Mine(context.Background(), c, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if p := tb.Phrases(); len(p) != 0 {
		t.Errorf("independent words gave phrases %+v", p)
	}
	tb, err = Mine(context.Background(), c, Options{MinPhraseLLR: -1e9})
	if err != nil {
		t.Fatal(err)
	}
	if p := tb.Phrases(); len(p) == 0 {
		t.Error("with the G2 gate open, frequent bigrams should be phrases")
	}
}

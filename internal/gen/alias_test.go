package gen

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// Walker (1977) / Vose (1991): an alias table reproduces the input
// distribution exactly, up to the 2^-32 resolution of the slot coins.
func TestAliasTableExact(t *testing.T) {
	cases := []struct {
		name    string
		weights []float64
	}{
		{"single", []float64{3}},
		{"uniform", []float64{1, 1, 1, 1, 1}},
		{"skewed with zeros", []float64{1, 0, 0, 5, 0.25}},
		{"zipf 1000", zipfWeights(1000, 1.07)},
		{"zipf steep", zipfWeights(300, 2.5)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			values := make([]int32, len(c.weights))
			sum := 0.0
			for i, w := range c.weights {
				values[i] = int32(10 * i) // values need not be indices
				sum += w
			}
			tab := newAliasTable(values, c.weights)
			for i, p := range tab.probabilities(values) {
				if want := c.weights[i] / sum; math.Abs(p-want) > 1e-8 {
					t.Errorf("value %d: probability %.10f, want %.10f", values[i], p, want)
				}
			}
			var r rng
			r.seed(1, 2)
			for range 1000 {
				v := tab.draw(r.uint64())
				if i := slices.Index(values, v); i < 0 || c.weights[i] == 0 {
					t.Fatalf("drew %d, which has zero weight or is not a value", v)
				}
			}
		})
	}
}

func TestLexicon(t *testing.T) {
	reserved := map[string]bool{}
	first := buildLexicon(5, 20000, nil)
	for _, w := range first[len(functionWords) : len(functionWords)+50] {
		reserved[w] = true
	}
	cases := []struct {
		name     string
		seed     uint64
		reserved map[string]bool
	}{
		{"plain", 5, nil},
		{"with reserved words", 5, reserved},
		{"other seed", 6, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			words := buildLexicon(c.seed, 20000, c.reserved)
			if len(words) != 20000 {
				t.Fatalf("%d words", len(words))
			}
			if !slices.Equal(words[:len(functionWords)], functionWords) {
				t.Errorf("top ranks %v are not the function words", words[:5])
			}
			seen := map[string]bool{}
			for _, w := range words {
				if seen[w] || c.reserved[w] || !isToken(w) || strings.ContainsAny(w, "0123456789") {
					t.Fatalf("bad or repeated word %q", w)
				}
				seen[w] = true
			}
			// Law of abbreviation (Zipf 1949): frequent words are shorter.
			if head, tail := meanLen(words[100:500]), meanLen(words[10000:]); head >= tail {
				t.Errorf("mean length of ranks 100-500 is %.2f, of the tail %.2f", head, tail)
			}
			same := slices.Equal(words, first)
			if want := c.seed == 5 && c.reserved == nil; same != want {
				t.Errorf("identical to seed 5 lexicon: %v, want %v", same, want)
			}
		})
	}
}

func meanLen(words []string) float64 {
	n := 0
	for _, w := range words {
		n += len(w)
	}
	return float64(n) / float64(len(words))
}

func TestAppendID(t *testing.T) {
	cases := []struct {
		index int
		want  string
	}{
		{0, "gen-000001"},
		{41, "gen-000042"},
		{999998, "gen-999999"},
		{999999, "gen-1000000"},
	}
	for _, c := range cases {
		if got := string(appendID(nil, c.index)); got != c.want {
			t.Errorf("appendID(%d) = %q, want %q", c.index, got, c.want)
		}
	}
}

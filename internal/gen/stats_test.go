package gen

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// rankFrequencySlope fits log(frequency) = a + b*log(rank) by least squares
// over ranks lo..hi (1-based) of the body tokens of opts and returns b.
func rankFrequencySlope(t *testing.T, opts Options, lo, hi int) float64 {
	counts := map[string]int{}
	for _, d := range collect(t, opts) {
		for _, w := range tokens(d.Body) {
			counts[w]++
		}
	}
	freq := make([]int, 0, len(counts))
	for _, c := range counts {
		freq = append(freq, c)
	}
	slices.Sort(freq)
	slices.Reverse(freq)
	if len(freq) < hi {
		t.Fatalf("only %d distinct tokens, need %d", len(freq), hi)
	}
	var sx, sy, sxx, sxy float64
	for r := lo; r <= hi; r++ {
		x, y := math.Log(float64(r)), math.Log(float64(freq[r-1]))
		sx, sy, sxx, sxy = sx+x, sy+y, sxx+x*x, sxy+x*y
	}
	n := float64(hi - lo + 1)
	return (n*sxy - sx*sy) / (n*sxx - sx*sx)
}

// Zipf (1949): frequency falls as rank^-s. Checking the least-squares
// slope of log frequency on log rank is common practice; the ±0.15 band
// and the rank range 10..1000 are this package's acceptance criterion.
func TestZipfSlope(t *testing.T) {
	cases := []struct {
		name string
		s    float64
	}{
		{"default 1.07", 0},
		{"flatter 0.9", 0.9},
		{"steeper 1.3", 1.3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			opts := Options{Docs: 5000, ZipfS: c.s}
			want := -mustNew(t, opts).Options().ZipfS
			got := rankFrequencySlope(t, opts, 10, 1000)
			t.Logf("slope %.3f, want %.3f", got, want)
			if math.Abs(got-want) > 0.15 {
				t.Errorf("rank-frequency slope %.3f, want %.3f ± 0.15", got, want)
			}
		})
	}
}

// The department skew must leave the corpus-wide distribution Zipfian:
// averaged over departments, the exact probability of every rank stays
// within 2% of r^-s / H(V, s) (Zipf 1949). This inspects the tables, not
// samples, so it is exact.
func TestMarginalStaysZipf(t *testing.T) {
	for _, nd := range []int{1, 3, 8} {
		opts := Options{Departments: DefaultDepartments[:nd], VocabSize: 20000}
		g := mustNew(t, opts)
		w := zipfWeights(opts.VocabSize, DefaultZipfS)
		total := 0.0
		for _, x := range w {
			total += x
		}
		lo, hi := bandBounds(opts.VocabSize, nd)
		pBand := float64(g.bandCut) / math.Exp2(64)
		common := make([]int32, 0, opts.VocabSize)
		for r := range opts.VocabSize {
			if r < lo || r >= hi {
				common = append(common, int32(r))
			}
		}
		got := make([]float64, opts.VocabSize)
		for i, p := range g.common.probabilities(common) {
			got[common[i]] = (1 - pBand) * p
		}
		band := make([]int32, hi-lo)
		for i := range band {
			band[i] = int32(lo + i)
		}
		for d := range g.depts {
			for i, p := range g.depts[d].band.probabilities(band) {
				got[band[i]] += pBand * p / float64(nd)
			}
		}
		worst := 0.0
		for r, p := range got {
			want := w[r] / total
			if dev := math.Abs(p/want - 1); dev > 0.02 {
				t.Fatalf("%d departments, rank %d: probability %.3g, want %.3g", nd, r+1, p, want)
			} else {
				worst = max(worst, dev)
			}
		}
		t.Logf("%d departments: worst relative deviation %.4f", nd, worst)
	}
}

// Lengths are lognormal with mean MeanWords; the 10% band is this
// package's acceptance criterion (the sampling error of the mean over
// 3000 documents is under 1%).
func TestLengthMean(t *testing.T) {
	for _, mean := range []int{100, 200, 500} {
		docs := collect(t, Options{Docs: 3000, MeanWords: mean})
		total := 0
		for _, d := range docs {
			n := len(strings.Fields(d.Body))
			if n < 30 || n > 6*mean {
				t.Fatalf("MeanWords %d: %s has %d words", mean, d.ID, n)
			}
			total += n
		}
		got := float64(total) / float64(len(docs))
		t.Logf("MeanWords %d: mean %.1f", mean, got)
		if math.Abs(got/float64(mean)-1) > 0.10 {
			t.Errorf("MeanWords %d: mean length %.1f, outside 10%%", mean, got)
		}
	}
}

// Design check (no external reference): a department's topic words are
// boosted by maxBoost in its own documents and damped to
// (8-maxBoost)/7 elsewhere, so their token rate inside should be about
// 4/(4/7) = 7 times the rate outside (phrases add a little more); require
// more than 4.
func TestTopicalSkew(t *testing.T) {
	g := mustNew(t, Options{Docs: 2000})
	docs := collect(t, Options{Docs: 2000})
	for _, dept := range DefaultDepartments {
		topic, _ := g.TopicWords(dept)
		set := map[string]bool{}
		for _, w := range topic {
			set[w] = true
		}
		var in, inAll, out, outAll int
		for _, d := range docs {
			hits, toks := 0, tokens(d.Body)
			for _, w := range toks {
				if set[w] {
					hits++
				}
			}
			if d.Department == dept {
				in, inAll = in+hits, inAll+len(toks)
			} else {
				out, outAll = out+hits, outAll+len(toks)
			}
		}
		ratio := (float64(in) / float64(inAll)) / (float64(out) / float64(outAll))
		t.Logf("%s: in/out ratio %.2f", dept, ratio)
		if ratio < 4 {
			t.Errorf("%s: topic-word rate ratio in/out = %.2f, want > 4", dept, ratio)
		}
	}
}

// Church & Hanks (1990) treat pointwise mutual information above 3 bits
// as a notable association (from memory). Every bigram inside a
// department phrase must clear that bar, and the phrase must recur in its
// own department far more than elsewhere.
func TestPhrasesRecur(t *testing.T) {
	g := mustNew(t, Options{Docs: 2000})
	docs := collect(t, Options{Docs: 2000})
	unigram, bigram, n := map[string]int{}, map[string]int{}, 0
	for _, d := range docs {
		toks := tokens(d.Body)
		for i, w := range toks {
			unigram[w]++
			if i > 0 {
				bigram[toks[i-1]+" "+w]++
			}
		}
		n += len(toks)
	}
	for _, dept := range DefaultDepartments {
		phrases, _ := g.Phrases(dept)
		for _, ph := range phrases {
			words := strings.Fields(ph)
			for i := 1; i < len(words); i++ {
				c := bigram[words[i-1]+" "+words[i]]
				pmi := math.Log2(float64(n) * float64(c) / float64(unigram[words[i-1]]*unigram[words[i]]))
				if c < 20 || pmi < 3 {
					t.Errorf("%s %q: bigram count %d, PMI %.2f bits", dept, ph, c, pmi)
				}
			}
			var inside, outside int
			for _, d := range docs {
				if strings.Contains(strings.ToLower(d.Body), ph) {
					if d.Department == dept {
						inside++
					} else {
						outside++
					}
				}
			}
			if inside < 10*max(outside, 1) {
				t.Errorf("%s %q: in %d own docs, %d others", dept, ph, inside, outside)
			}
		}
	}
}

package prefs

import (
	"cmp"
	"hash/fnv"
	"math"
	"math/rand/v2"
	"slices"
)

// Candidate is one suggestion before re-ranking.
type Candidate struct {
	// Term is the suggestion key.
	Term string
	// Content is the content (association) score, any non-negative scale;
	// negative and non-finite scores count as 0.
	Content float64
}

// Ranked is one re-ranked suggestion.
type Ranked struct {
	Term string
	// Score = (1−w)·Content + w·Learned, w = LearnWeight.
	Score float64
	// Content is the candidate's content score divided by the list's
	// largest (negative scores count as 0), so it lies in [0, 1].
	Content float64
	// Learned is the posterior mean acceptance, or a Thompson sample of the
	// posterior when Explored.
	Learned float64
	// Explored reports that this impression was chosen for exploration.
	Explored bool
	Evidence Evidence
}

// Rank re-ranks cands for a searcher of dept issuing query. impression is
// the impression id: together with Options.Seed it decides, reproducibly,
// whether this impression explores (a share ExploreShare of ids; an empty
// id never explores) and the Thompson samples drawn.
//
// Score = (1−w)·ĉ + w·â, w = LearnWeight, ĉ the normalised content score and
// â the smoothed acceptance whose last-resort prior mean is ĉ itself, so
// with no interaction data the content order is kept (a linear blend of a
// content score and a learned click estimate; common practice). Exploration
// replaces â by a draw from its Beta posterior: Thompson sampling
// (Thompson, Biometrika 1933; Chapelle & Li, NIPS 2011). Ties break by
// content, then term.
func (m *Model) Rank(dept, query string, cands []Candidate, impression string) []Ranked {
	top := 0.0
	for _, c := range cands {
		top = max(top, finite(c.Content))
	}
	explore := impression != "" && m.opts.ExploreShare > 0 &&
		unitFloat(hash64(m.opts.Seed, "explore", impression)) < m.opts.ExploreShare
	w := m.opts.LearnWeight
	out := make([]Ranked, len(cands))
	for i, c := range cands {
		ch := 0.0
		if v := finite(c.Content); top > 0 && v > 0 {
			ch = v / top
		}
		e := m.estimate(dept, query, c.Term, ch)
		learned := e.mean
		if explore {
			rng := rand.New(rand.NewPCG(hash64(m.opts.Seed, impression, c.Term), m.opts.Seed))
			learned = betaSample(rng, e.mean*e.n, (1-e.mean)*e.n)
		}
		out[i] = Ranked{Term: c.Term, Score: (1-w)*ch + w*learned, Content: ch,
			Learned: learned, Explored: explore, Evidence: e.ev}
	}
	slices.SortStableFunc(out, func(a, b Ranked) int {
		if c := cmp.Compare(b.Score, a.Score); c != 0 {
			return c
		}
		if c := cmp.Compare(b.Content, a.Content); c != 0 {
			return c
		}
		return cmp.Compare(a.Term, b.Term)
	})
	return out
}

// finite maps NaN and ±Inf content scores to 0.
func finite(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0
	}
	return x
}

// hash64 is 64-bit FNV-1a over the seed and the parts, NUL-separated.
func hash64(seed uint64, parts ...string) uint64 {
	h := fnv.New64a()
	var b [8]byte
	for i := range b {
		b[i] = byte(seed >> (8 * i))
	}
	h.Write(b[:])
	for _, p := range parts {
		h.Write([]byte{0})
		h.Write([]byte(p))
	}
	return mix64(h.Sum64())
}

// mix64 is the SplitMix64 finaliser (Steele, Lea & Flood, OOPSLA 2014),
// spreading FNV's weak low bits.
func mix64(z uint64) uint64 {
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// unitFloat maps a hash to [0, 1) using its top 53 bits.
func unitFloat(h uint64) float64 { return float64(h>>11) / (1 << 53) }

// betaSample draws from Beta(a, b) as X/(X+Y) with X ~ Gamma(a),
// Y ~ Gamma(b) (standard construction; Devroye, Non-Uniform Random Variate
// Generation, 1986, ch. IX; from memory).
func betaSample(rng *rand.Rand, a, b float64) float64 {
	a, b = max(a, priorEps), max(b, priorEps)
	x, y := gammaSample(rng, a), gammaSample(rng, b)
	if x+y == 0 {
		return a / (a + b)
	}
	return x / (x + y)
}

// gammaSample draws Gamma(shape, 1) by Marsaglia & Tsang, "A simple method
// for generating gamma variables", ACM TOMS 26(3), 2000; shapes below 1 use
// their boost Gamma(a) = Gamma(a+1)·U^(1/a).
func gammaSample(rng *rand.Rand, shape float64) float64 {
	if shape < 1 {
		u := rng.Float64()
		return gammaSample(rng, shape+1) * math.Pow(u, 1/shape)
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := rng.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := rng.Float64()
		if u < 1-0.0331*x*x*x*x || math.Log(u) < 0.5*x*x+d*(1-v+math.Log(v)) {
			return d * v
		}
	}
}

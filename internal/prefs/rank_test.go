package prefs

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

func TestRankWithoutData(t *testing.T) {
	// With no interactions the acceptance equals the normalised content
	// prior, so the score is the content score and the order is kept
	// (requirement; follows from the blend formula).
	m := Build(nil, now, Options{ExploreShare: -1})
	cands := []Candidate{{"b", 2}, {"a", 4}, {"c", 1}, {"d", -3}}
	got := m.Rank("ops", "pump", cands, "imp")
	want := []struct {
		term    string
		content float64
	}{{"a", 1}, {"b", 0.5}, {"c", 0.25}, {"d", 0}}
	for i, w := range want {
		r := got[i]
		// Prior means are kept inside [0.001, 0.999] (priorEps).
		prior := min(max(w.content, priorEps), 1-priorEps)
		if r.Term != w.term || r.Content != w.content || r.Learned != prior ||
			math.Abs(r.Score-(0.5*w.content+0.5*prior)) > 1e-12 || r.Evidence.Source != SourceContent {
			t.Fatalf("rank %d = %+v, want %s with content %v", i, r, w.term, w.content)
		}
	}
}

func TestRankLearnWeight(t *testing.T) {
	// Score = (1−w)·content + w·acceptance (requirement; linear blend).
	evs := sessions("ops", "pump", now, 20, 18, 1, "a", "b")
	cases := []struct {
		name string
		w    float64
		top  string
	}{
		{"content only", -1, "a"},
		{"default blend", 0, "b"},
		{"learned only", 1, "b"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := Build(evs, now, Options{LearnWeight: c.w, ExploreShare: -1})
			got := m.Rank("ops", "pump", []Candidate{{"a", 1}, {"b", 0.5}}, "imp")
			w := m.Options().LearnWeight
			for _, r := range got {
				if math.Abs(r.Score-((1-w)*r.Content+w*r.Learned)) > 1e-12 {
					t.Fatalf("score %v != blend of %+v", r.Score, r)
				}
			}
			if got[0].Term != c.top {
				t.Fatalf("top = %s, want %s: %+v", got[0].Term, c.top, got)
			}
		})
	}
}

func TestExploration(t *testing.T) {
	// Share of exploring impressions is ExploreShare: with 20000 ids the
	// binomial standard error is ≤ 0.0035, tolerance 0.015 (about 4 sigma).
	evs := sessions("ops", "pump", now, 30, 10, 0, "a", "b", "c")
	cands := []Candidate{{"a", 1}, {"b", 0.9}, {"c", 0.8}}
	cases := []struct {
		name  string
		share float64
		want  float64
	}{
		{"default", 0, 0.1},
		{"a third", 0.33, 0.33},
		{"disabled", -1, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := Build(evs, now, Options{ExploreShare: c.share, Seed: 42})
			n := 0
			for i := range 20000 {
				if m.Rank("ops", "pump", cands, fmt.Sprint("imp-", i))[0].Explored {
					n++
				}
			}
			if got := float64(n) / 20000; math.Abs(got-c.want) > 0.015 {
				t.Fatalf("explored share %.4f, want %.2f", got, c.want)
			}
		})
	}
	t.Run("deterministic given seed and id", func(t *testing.T) {
		m1 := Build(evs, now, Options{ExploreShare: 1, Seed: 42})
		m2 := Build(evs, now, Options{ExploreShare: 1, Seed: 42})
		m3 := Build(evs, now, Options{ExploreShare: 1, Seed: 43})
		same, differ := true, false
		for i := range 20 {
			id := fmt.Sprint("imp-", i)
			a, b, c := m1.Rank("ops", "pump", cands, id), m2.Rank("ops", "pump", cands, id), m3.Rank("ops", "pump", cands, id)
			same = same && fmt.Sprint(a) == fmt.Sprint(b)
			differ = differ || fmt.Sprint(a) != fmt.Sprint(c)
		}
		if !same || !differ {
			t.Fatalf("same seed reproducible = %v, other seed differs = %v", same, differ)
		}
	})
}

func TestBetaSample(t *testing.T) {
	// Beta(a, b) moments: mean a/(a+b), variance ab/((a+b)²(a+b+1))
	// (Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions
	// vol. 2, 1995, ch. 25; from memory). 200000 draws, tolerance 4 SE.
	cases := []struct {
		name string
		a, b float64
	}{
		{"uniform", 1, 1},
		{"skewed", 2, 8},
		{"small shapes", 0.5, 0.5},
		{"large", 60, 40},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(9, 9))
			const n = 200000
			var sum, sq float64
			for range n {
				x := betaSample(rng, c.a, c.b)
				sum += x
				sq += x * x
			}
			mean, s := sum/n, c.a+c.b
			variance := sq/n - mean*mean
			wantMean, wantVar := c.a/s, c.a*c.b/(s*s*(s+1))
			if math.Abs(mean-wantMean) > 4*math.Sqrt(wantVar/n) || math.Abs(variance-wantVar) > 0.03*wantVar {
				t.Fatalf("mean %.5f var %.6f, want %.5f and %.6f", mean, variance, wantMean, wantVar)
			}
		})
	}
}

func FuzzRank(f *testing.F) {
	// Invariants: scores and learned values in [0, 1], one output per input.
	f.Add("ops", "pump", "valve", 3, 1, 0.5, "imp")
	f.Add("", "", "", -2, 40, -1.0, "")
	f.Fuzz(func(t *testing.T, dept, query, term string, pos, accepts int, content float64, imp string) {
		evs := sessions(dept, query, now, 6, accepts%7, pos, term, "x")
		m := Build(evs, now, Options{ExploreShare: 0.5})
		got := m.Rank(dept, query, []Candidate{{term, content}, {"x", 1}}, imp)
		if len(got) != 2 {
			t.Fatalf("got %d results", len(got))
		}
		for _, r := range got {
			if !(r.Score >= 0 && r.Score <= 1 && r.Learned >= 0 && r.Learned <= 1) {
				t.Fatalf("out of range: %+v", r)
			}
		}
	})
}

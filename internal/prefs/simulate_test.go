package prefs

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

func TestCascadeClosedForm(t *testing.T) {
	// Craswell, Zoeter, Taylor & Ramsey, WSDM 2008, cascade model:
	// P(click at k) = r_k Π_{i<k}(1 − r_i). Hand-checked first: with r =
	// 0.05, 0.7, 0.05 the closed form is 0.05, 0.665, 0.01425, rest 0.27075.
	shown := []string{"a", "x", "b"}
	pref := map[string]bool{"x": true}
	want := []float64{0.05, 0.95 * 0.7, 0.95 * 0.3 * 0.05, 0.95 * 0.3 * 0.95}
	got := CascadeProbabilities(shown, pref, CascadeOptions{})
	for k := range want {
		if math.Abs(got[k]-want[k]) > 1e-12 {
			t.Fatalf("closed form %v, want %v", got, want)
		}
	}
	// Monte Carlo: 200000 sessions, tolerance 4 binomial standard errors.
	cases := []struct {
		name  string
		shown []string
		opts  CascadeOptions
	}{
		{"preferred second", []string{"a", "x", "b", "c"}, CascadeOptions{}},
		{"preferred first", []string{"x", "a", "b"}, CascadeOptions{}},
		{"two preferred, custom relevance", []string{"a", "x", "y", "b"}, CascadeOptions{Preferred: 0.4, Other: 0.2}},
		{"none preferred", []string{"a", "b", "c", "d", "e"}, CascadeOptions{Other: 0.15}},
	}
	pref = map[string]bool{"x": true, "y": true}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(21, 34))
			const n = 200000
			counts := make([]float64, len(c.shown)+1)
			for range n {
				k := SimulateSession(rng, c.shown, pref, c.opts)
				if k < 0 {
					k = len(c.shown)
				}
				counts[k]++
			}
			for k, p := range CascadeProbabilities(c.shown, pref, c.opts) {
				if se := math.Sqrt(p * (1 - p) / n); math.Abs(counts[k]/n-p) > 4*se+1e-9 {
					t.Fatalf("position %d: simulated %.4f, closed form %.4f", k, counts[k]/n, p)
				}
			}
		})
	}
}

func TestLearningConverges(t *testing.T) {
	// A department preferring "gasket" (r = 0.7 vs 0.05, cascade model of
	// Craswell et al. 2008) lifts it from last to first in 2000 sessions
	// (requirement; the model re-ranks every 100 simulated sessions).
	cands := []Candidate{{"valve", 1}, {"seal", 0.8}, {"meter", 0.6}, {"gasket", 0.5}}
	cases := []struct {
		name string
		seed uint64
	}{{"seed 1", 1}, {"seed 2", 2}}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sim := Simulation{Dept: "ops", Query: "pump", Candidates: cands,
				Preferred: map[string]bool{"gasket": true}, Options: Options{Seed: c.seed},
				Start: now.Add(-48 * time.Hour)}
			before := Build(nil, now, sim.Options).Rank("ops", "pump", cands, "")
			if before[len(before)-1].Term != "gasket" {
				t.Fatalf("gasket should start last: %+v", before)
			}
			events, m := sim.Run(rand.New(rand.NewPCG(c.seed, 99)), 2000, nil)
			got := m.Rank("ops", "pump", cands, "")
			if got[0].Term != "gasket" || got[0].Evidence.Source != SourceDepartment {
				t.Fatalf("after %d events gasket should lead: %+v", len(events), got)
			}
			rate, _ := m.Acceptance("ops", "pump", "gasket")
			t.Logf("gasket acceptance %.3f, score %.3f; runner-up %s %.3f",
				rate, got[0].Score, got[1].Term, got[1].Score)
		})
	}
}

func TestCascadeOptions(t *testing.T) {
	// Zero value gives the documented relevance 0.7 vs 0.05; negative Other
	// means a searcher who never accepts anything else.
	pref := map[string]bool{"x": true}
	cases := []struct {
		name        string
		opts        CascadeOptions
		wantX, want float64
	}{
		{"defaults", CascadeOptions{}, 0.7, 0.05},
		{"custom", CascadeOptions{Preferred: 0.9, Other: 0.2}, 0.9, 0.2},
		{"others never", CascadeOptions{Other: -1}, 0.7, 0},
		{"clamped to 1", CascadeOptions{Preferred: 3, Other: 2}, 1, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if x, o := c.opts.Relevance("x", pref), c.opts.Relevance("y", pref); x != c.wantX || o != c.want {
				t.Fatalf("relevance %v / %v, want %v / %v", x, o, c.wantX, c.want)
			}
		})
	}
}

func TestSessionEvents(t *testing.T) {
	// Log shape used by Simulation: one impression, at most one accept.
	shown := []string{"a", "b", "c"}
	cases := []struct {
		name     string
		pos      int
		n        int
		accepted string
	}{
		{"accept second", 1, 2, "b"},
		{"no accept", -1, 1, ""},
		{"out of range ignored", 7, 1, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			evs := SessionEvents("s", "ops", "pump", now, shown, c.pos)
			if len(evs) != c.n || evs[0].Kind != KindImpression || len(evs[0].Shown) != 3 {
				t.Fatalf("events %+v", evs)
			}
			if c.n == 2 && (evs[1].Term != c.accepted || evs[1].Position != c.pos || evs[1].Kind != KindAccept) {
				t.Fatalf("accept %+v, want %s at %d", evs[1], c.accepted, c.pos)
			}
		})
	}
}

package prefs_test

import (
	"fmt"
	"math/rand/v2"
	"time"

	"kinword/internal/prefs"
)

func ExampleModel_Rank() {
	now := time.Date(2026, 6, 1, 12, 0, 0, 0, time.UTC)
	var log []prefs.Event
	// Six sessions of the operations department accept "gasket" at position 2.
	for i := range 6 {
		log = append(log, prefs.SessionEvents(fmt.Sprint("s", i), "ops", "pump",
			now, []string{"valve", "seal", "gasket"}, 2)...)
	}
	m := prefs.Build(log, now, prefs.Options{})
	cands := []prefs.Candidate{{Term: "valve", Content: 1}, {Term: "seal", Content: 0.8}, {Term: "gasket", Content: 0.5}}
	for _, r := range m.Rank("ops", "pump", cands, "") {
		fmt.Printf("%-6s %.3f %s\n", r.Term, r.Score, r.Evidence.Source)
	}
	for _, r := range m.Rank("finance", "pump", cands, "") {
		fmt.Printf("%-6s %.3f %s\n", r.Term, r.Score, r.Evidence.Source)
	}
	// Output:
	// gasket 0.750 department
	// valve  0.695 department
	// seal   0.556 department
	// valve  0.812 organisation
	// gasket 0.750 organisation
	// seal   0.650 organisation
}

func ExampleSimulateSession() {
	// One cascade searcher per seed: examines top-down, stops at the first
	// accept (Craswell et al., WSDM 2008).
	shown := []string{"valve", "gasket", "seal"}
	preferred := map[string]bool{"gasket": true}
	rng := rand.New(rand.NewPCG(1, 2))
	counts := make(map[int]int)
	for range 10000 {
		counts[prefs.SimulateSession(rng, shown, preferred, prefs.CascadeOptions{})]++
	}
	closed := prefs.CascadeProbabilities(shown, preferred, prefs.CascadeOptions{})
	fmt.Printf("closed form: %.5f %.5f %.5f none %.5f\n", closed[0], closed[1], closed[2], closed[3])
	fmt.Println("simulated accepts at position 1 > 6000:", counts[1] > 6000)
	// Output:
	// closed form: 0.05000 0.66500 0.01425 none 0.27075
	// simulated accepts at position 1 > 6000: true
}

func ExampleEstimatePropensities() {
	// A tiny swap slice for the pair (0, 1): 100 impressions per arm; items
	// clicked 30 times at position 0 and 15 times at position 1 in each arm,
	// so p_1/p_0 = 0.5 (Joachims, Swaminathan & Schnabel, WSDM 2017).
	var log []prefs.Event
	for _, swapped := range []bool{false, true} {
		for i := range 100 {
			log = append(log, prefs.Event{Kind: prefs.KindImpression, SwapLower: 1, Swapped: swapped})
			if i < 30 {
				log = append(log, prefs.Event{Kind: prefs.KindClick, Position: 0, SwapLower: 1, Swapped: swapped})
			}
			if i < 15 {
				log = append(log, prefs.Event{Kind: prefs.KindClick, Position: 1, SwapLower: 1, Swapped: swapped})
			}
		}
	}
	fmt.Printf("%.2f\n", prefs.EstimatePropensities(log, 2))
	// Output: [1.00 0.50 0.33]
}

func ExampleBuilder() {
	// Streaming use: add events as they arrive, snapshot periodically.
	now := time.Date(2026, 6, 1, 12, 0, 0, 0, time.UTC)
	b := prefs.NewBuilder(prefs.Options{ContentPrior: 0.2})
	for i := range 6 {
		for _, ev := range prefs.SessionEvents(fmt.Sprint("s", i), "ops", "pump", now, []string{"valve"}, 0) {
			b.Add(ev)
		}
	}
	// Hand computation (S = 10, prior mean 0.2, A = E = 6): organisation
	// (2+6)/16 = 0.5, department (5+6)/16 = 0.6875.
	rate, ev := b.Snapshot(now).Acceptance("ops", "pump", "valve")
	fmt.Printf("%.4f %s sessions=%d\n", rate, ev.Source, ev.Sessions)
	// Output: 0.6875 department sessions=6
}

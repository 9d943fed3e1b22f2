package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
)

// TestEvalAcceptedWeightFromConfig: eval scores suggestions at the
// configured search.accepted_weight, the weight the server gives an
// accepted term, and says so in its report; a heavier weight moves the
// simulated searcher. A wiring check: no published value applies.
func TestEvalAcceptedWeightFromConfig(t *testing.T) {
	heavy := filepath.Join(t.TempDir(), "k.toml")
	if err := os.WriteFile(heavy, []byte("[search]\naccepted_weight = 0.9\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	type report struct {
		Suggestions struct {
			AcceptedWeight float64 `json:"accepted_weight"`
		} `json:"suggestions"`
		Simulated struct {
			Random float64 `json:"random_of_5"`
			Best   float64 `json:"best_of_5"`
		} `json:"simulated"`
	}
	run := func(extra ...string) report {
		t.Helper()
		args := append([]string{"eval", "--collection", filepath.Join("..", "..", "testdata", "tarnwick"), "--json",
			"--data", t.TempDir(), "--methods", "bm25,kinword"}, extra...)
		code, out, errs := runCLI(t, args...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var r report
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatalf("bad json: %v", err)
		}
		return r
	}
	def, hv := run(), run("--config", heavy)
	t.Logf("random of 5: %.4f at 0.3, %.4f at 0.9; best of 5 %.4f, %.4f", def.Simulated.Random, hv.Simulated.Random, def.Simulated.Best, hv.Simulated.Best)
	if def.Suggestions.AcceptedWeight != 0.3 || hv.Suggestions.AcceptedWeight != 0.9 {
		t.Errorf("reported weights %g and %g, want 0.3 and 0.9", def.Suggestions.AcceptedWeight, hv.Suggestions.AcceptedWeight)
	}
	if def.Simulated == hv.Simulated {
		t.Errorf("the simulated searcher did not move with the weight: %+v", def.Simulated)
	}
}

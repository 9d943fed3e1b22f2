package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestCranfieldEvalGolden runs the whole evaluation on Cranfield (Cleverdon
// 1960s; 1,400 aeronautics abstracts, 225 judged topics) as a user would,
// `kinword eval --collection DIR --report OUT`, and compares the Markdown
// summary with a golden file: every method's measures with cross-validated
// parameters, helped/hurt/robustness and the randomization test against
// BM25, the suggestion-quality shares (Cao, Nie, Gao & Robertson, SIGIR
// 2008) and the simulated searcher. It also checks the JSON report's shape
// and that each method has a TREC run file. Regenerate with -update after a
// deliberate change; the diff is the change's effect on quality.
func TestCranfieldEvalGolden(t *testing.T) {
	dir := filepath.Join(collections(t), "cranfield")
	out := t.TempDir()
	code, _, errs := runCLI(t, "eval", "--collection", dir, "--report", out, "--data", t.TempDir())
	if code != 0 {
		t.Fatalf("eval exit %d: %s", code, errs)
	}
	got, err := os.ReadFile(filepath.Join(out, "cranfield.md"))
	if err != nil {
		t.Fatal(err)
	}
	golden := filepath.Join("testdata", "cranfield-eval.golden.md")
	if *update {
		if err := os.WriteFile(golden, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatalf("%v (run with -update)", err)
	}
	if string(got) != string(want) {
		t.Errorf("evaluation drifted from %s:\n got:\n%s\nwant:\n%s", golden, got, want)
	}
	var rep struct {
		Runs []struct {
			Method     string   `json:"method"`
			MAP        float64  `json:"map"`
			Helped     *int     `json:"helped"`
			Hurt       *int     `json:"hurt"`
			Robustness *float64 `json:"robustness"`
		} `json:"runs"`
		Suggestions map[string]float64  `json:"suggestions"`
		Simulated   map[string]float64  `json:"simulated"`
		Parameters  map[string][]string `json:"parameters"`
	}
	js, err := os.ReadFile(filepath.Join(out, "cranfield.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(js, &rep); err != nil {
		t.Fatal(err)
	}
	methods := map[string]bool{}
	for _, r := range rep.Runs {
		if strings.Contains(r.Method, "[") {
			continue // per-kind subsets
		}
		methods[r.Method] = true
		if r.Method != "bm25" && (r.Helped == nil || r.Hurt == nil || r.Robustness == nil) {
			t.Errorf("run %s lacks helped/hurt/robustness", r.Method)
		}
		run, err := os.ReadFile(filepath.Join(out, "cranfield."+r.Method+".run"))
		if err != nil {
			t.Errorf("run file for %s: %v", r.Method, err)
			continue
		}
		// TREC run format (common practice, trec_eval's input): six
		// whitespace-separated fields per line.
		first, _, _ := strings.Cut(string(run), "\n")
		if f := strings.Fields(first); len(f) != 6 || f[1] != "Q0" || f[5] != "kinword-"+r.Method {
			t.Errorf("run file for %s starts %q", r.Method, first)
		}
	}
	for _, m := range []string{"bm25", "rm3", "mixture", "rocchio", "kinword"} {
		if !methods[m] {
			t.Errorf("report lacks method %s", m)
		}
		if m != "bm25" && len(rep.Parameters[m]) != 2 {
			t.Errorf("method %s: chosen parameters %v, want one per fold", m, rep.Parameters[m])
		}
	}
	for _, k := range []string{"good", "neutral", "bad"} {
		if _, ok := rep.Suggestions[k]; !ok {
			t.Errorf("suggestions lack %s", k)
		}
	}
	for _, k := range []string{"best_of_5", "best_pair_of_5", "first_of_5", "random_of_5"} {
		if _, ok := rep.Simulated[k]; !ok {
			t.Errorf("simulated lacks %s", k)
		}
	}
}

package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"kinword/internal/index"
	"kinword/internal/testenv"
	"kinword/internal/text"
)

func collections(t *testing.T) string { return testenv.Collections(t) }

func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, &out, &errb)
	return code, out.String(), errb.String()
}

// TestEvalBM25OnPublicCollections runs `kinword eval --json` on Cranfield
// and CISI. Reference: an independent BM25 implementation (k1 1.2, b 0.75,
// title plus text, Snowball stemming, a 515-word stopword list) measured MAP
// 0.3072 and 0.2219 on these same files (figures given in the project's
// foundation issue); the floors 0.29 and 0.21 allow for the different
// stopword list and tokenizer.
func TestEvalBM25OnPublicCollections(t *testing.T) {
	dir := collections(t)
	cases := []struct {
		name   string
		floor  float64
		ref    float64
		topics int
	}{
		{"cranfield", 0.29, 0.3072, 225},
		{"cisi", 0.21, 0.2219, 76},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCLI(t, "eval", "--collection", filepath.Join(dir, c.name), "--json", "--data", t.TempDir(), "--methods", "bm25")
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			var rep struct {
				Runs []struct {
					Method string  `json:"method"`
					Topics int     `json:"topics"`
					MAP    float64 `json:"map"`
					P10    float64 `json:"p_at_10"`
					NDCG   float64 `json:"ndcg_at_10"`
					RPrec  float64 `json:"r_prec"`
					R100   float64 `json:"recall_at_100"`
				} `json:"runs"`
			}
			if err := json.Unmarshal([]byte(out), &rep); err != nil {
				t.Fatalf("bad json: %v\n%s", err, out)
			}
			r := rep.Runs[0]
			t.Logf("%s: MAP %.4f (reference %.4f) P@10 %.4f nDCG@10 %.4f R-prec %.4f R@100 %.4f", c.name, r.MAP, c.ref, r.P10, r.NDCG, r.RPrec, r.R100)
			if r.Method != "bm25" || r.Topics != c.topics {
				t.Errorf("method %q topics %d", r.Method, r.Topics)
			}
			if r.MAP < c.floor {
				t.Errorf("MAP %.4f below %.2f", r.MAP, c.floor)
			}
		})
	}
}

func TestUsageAndExitCodes(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
		err  string
	}{
		{"no command", nil, 2, ""},
		{"unknown command", []string{"frobnicate"}, 2, "unknown command"},
		{"bad flag", []string{"search", "--nope"}, 2, "flag provided but not defined"},
		{"search without query", []string{"search", "--data", "DATA"}, 2, "a query is required"},
		{"bad viewer", []string{"search", "x", "--viewer", "colour=red"}, 2, "unknown key"},
		{"eval without collection", []string{"eval"}, 2, "--collection"},
		{"ingest missing path", []string{"ingest", "--data", "DATA", "/definitely/not/here"}, 1, ""},
		{"help", []string{"help", "search"}, 0, ""},
		{"version", []string{"version", "--json"}, 0, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := append([]string(nil), c.args...)
			for i, a := range args {
				if a == "DATA" {
					args[i] = t.TempDir()
				}
			}
			code, _, errs := runCLI(t, args...)
			if code != c.code {
				t.Errorf("exit %d, want %d (stderr %q)", code, c.code, errs)
			}
			if c.err != "" && !strings.Contains(errs, c.err) {
				t.Errorf("stderr %q lacks %q", errs, c.err)
			}
			if code != 0 && strings.Count(strings.TrimSpace(errs), "\n") > 0 && c.code != 2 {
				t.Errorf("runtime failure should be one line, got %q", errs)
			}
		})
	}
}

func TestIngestSearchRoundTrip(t *testing.T) {
	data := t.TempDir()
	src := t.TempDir()
	os.MkdirAll(filepath.Join(src, "ops"), 0o755)
	os.WriteFile(filepath.Join(src, "ops", ".kinword-folder.toml"), []byte("department = \"field-operations\"\n"), 0o644)
	os.WriteFile(filepath.Join(src, "ops", "main-break.md"), []byte("# Main break response\n\nCrews isolate the valve and repair the main break.\n"), 0o644)
	os.WriteFile(filepath.Join(src, "ops", "secret.md"), []byte("---\ngroups: [executive]\n---\n# Kestrelmoor valve plan\n\nThe Kestrelmoor valve programme.\n"), 0o644)
	os.WriteFile(filepath.Join(src, "broken.jsonl"), []byte("{not json\n"), 0o644)
	code, out, errs := runCLI(t, "ingest", "--data", data, src)
	if code != 0 {
		t.Fatalf("ingest exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "indexed 2") || !strings.Contains(out, "malformed") {
		t.Errorf("summary: %s", out)
	}
	code, out, _ = runCLI(t, "search", "--data", data, "valve", "--json")
	if code != 0 || strings.Contains(out, "Kestrelmoor") || !strings.Contains(out, "Main break response") {
		t.Errorf("anonymous search leaked or missed: %s", out)
	}
	code, out, _ = runCLI(t, "search", "--data", data, "kestrelmoor", "--viewer", "groups=executive")
	if code != 0 || !strings.Contains(out, "Kestrelmoor valve plan") {
		t.Errorf("insider search: %s", out)
	}
	code, out, _ = runCLI(t, "ingest", "--data", data, src)
	if code != 0 || !strings.Contains(out, "unchanged 2") {
		t.Errorf("re-ingest not incremental: %s", out)
	}
}

// TestNextLearn: the learning refresh waits its interval, or ten times as
// long as the last rebuild took when that is longer (at most a tenth of
// one core goes to rebuilding).
func TestNextLearn(t *testing.T) {
	tests := []struct {
		name        string
		every, took time.Duration
		want        time.Duration
	}{
		{"fast rebuild keeps the interval", 30 * time.Second, 200 * time.Millisecond, 30 * time.Second},
		{"at the bound", 30 * time.Second, 3 * time.Second, 30 * time.Second},
		{"slow rebuild stretches the wait", 30 * time.Second, 10630 * time.Millisecond, 106300 * time.Millisecond},
		{"zero took", time.Second, 0, time.Second},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := nextLearn(tc.every, tc.took); got != tc.want {
				t.Errorf("nextLearn(%v, %v) = %v, want %v", tc.every, tc.took, got, tc.want)
			}
		})
	}
}

// TestHeldDataFolderRefused: ingest (or a second serve) on a data folder
// another process holds fails within seconds with a message that says so,
// rather than waiting on the index lock without a word.
func TestHeldDataFolderRefused(t *testing.T) {
	data := t.TempDir()
	src := t.TempDir()
	os.WriteFile(filepath.Join(src, "a.md"), []byte("# Valve exercising\n\nEvery valve is exercised yearly.\n"), 0o644)
	if code, _, errs := runCLI(t, "ingest", "--data", data, src); code != 0 {
		t.Fatalf("ingest exit %d: %s", code, errs)
	}
	p, _ := text.NewPipeline("")
	held, err := index.Open(context.Background(), filepath.Join(data, "index"), index.Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	defer held.Close()
	code, _, errs := runCLI(t, "ingest", "--data", data, src)
	if code == 0 || !strings.Contains(errs, "in use by another kinword process") {
		t.Errorf("ingest on a held folder: exit %d, stderr %q", code, errs)
	}
}

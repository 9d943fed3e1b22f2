package main

// Process-level test of several replicas: one builder publishes versions
// into a shared folder; two `kinword serve --snapshots` processes over one
// PostgreSQL schema serve them and swap to a new one under load.

import (
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// publishWith runs `kinword publish` on data into shared and returns the
// version it printed.
func publishWith(t *testing.T, bin, data, shared string) string {
	t.Helper()
	out, err := exec.Command(bin, "publish", "--data", data, "--to", shared, "--json").CombinedOutput()
	if err != nil {
		t.Fatalf("publish: %v\n%s", err, out)
	}
	var res struct{ Version string }
	if err := json.Unmarshal(out[strings.IndexByte(string(out), '{'):], &res); err != nil || res.Version == "" {
		t.Fatalf("publish output: %v\n%s", err, out)
	}
	return res.Version
}

// builtWith ingests and mines docs with the binary.
func builtWith(t *testing.T, bin string, docs map[string]string) string {
	t.Helper()
	src := t.TempDir()
	writeCorpus(t, src, docs)
	data := ingestCorpus(t, bin, src)
	if out, err := exec.Command(bin, "mine", "--data", data).CombinedOutput(); err != nil {
		t.Fatalf("mine: %v\n%s", err, out)
	}
	return data
}

// fieldRecordCorpus is valveCorpus with other titles and other words
// beside "valve": the same query finds other documents and other
// suggestions.
func fieldRecordCorpus() map[string]string {
	r := strings.NewReplacer("# Handbook note", "# Field record", "gasket", "bonnet", "spindle", "packing",
		"flange", "coupling", "actuator", "handwheel")
	out := map[string]string{}
	for k, v := range valveCorpus() {
		out[k] = r.Replace(v)
	}
	return out
}

// servedVersion is the version /readyz reports.
func servedVersion(ctx context.Context, base string) (string, error) {
	req, _ := http.NewRequestWithContext(ctx, http.MethodGet, base+"/readyz", nil)
	resp, err := httpClient.Do(req)
	if err != nil {
		return "", err
	}
	defer resp.Body.Close()
	var out struct {
		Loaded struct {
			Version string `json:"version"`
		} `json:"loaded"`
	}
	if err := json.NewDecoder(resp.Body).Decode(&out); err != nil {
		return "", err
	}
	return out.Loaded.Version, nil
}

// lookupTitles runs /api/v1/lookup for q and returns the result titles
// and the suggestion keys.
func lookupTitles(ctx context.Context, base, q string, v viewer) ([]string, []string, error) {
	req, _ := http.NewRequestWithContext(ctx, http.MethodGet, base+"/api/v1/lookup?q="+url.QueryEscape(q), nil)
	v.prepare(req)
	resp, err := httpClient.Do(req)
	if err != nil {
		return nil, nil, err
	}
	defer resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		return nil, nil, fmt.Errorf("lookup: status %d", resp.StatusCode)
	}
	var out struct {
		Results []struct {
			Title string `json:"title"`
		} `json:"results"`
		Suggestions []suggestionOut `json:"suggestions"`
	}
	if err := json.NewDecoder(resp.Body).Decode(&out); err != nil {
		return nil, nil, err
	}
	var titles []string
	for _, r := range out.Results {
		titles = append(titles, r.Title)
	}
	return titles, termsOf(out.Suggestions), nil
}

// stderrOf reads what a server process has logged so far, under the
// lock its writer takes.
func stderrOf(s *server) string {
	lw := s.cmd.Stderr.(*lockedWriter)
	lw.mu.Lock()
	defer lw.mu.Unlock()
	return s.stderr.String()
}

var swapLine = regexp.MustCompile(`snapshots: swapped.* fetch_ms=(\d+) swap_ms=(\d+)`)

// TestSnapshotReplicasSwapUnderLoad: a builder publishes version A
// (corpus 1) and both replicas serve it; while 8 searchers per replica
// look up "valve", the builder publishes version B (corpus 2, whose
// results and suggestions for "valve" differ); within a few refresh
// intervals both replicas serve B, no lookup failed (every one answered
// 200), answers of both versions were seen during the load, both replicas
// offer the same suggestions for the same query and department, and each
// removed its copy of A once A's index was closed.
func TestSnapshotReplicasSwapUnderLoad(t *testing.T) {
	dsn := pgSchemaDSN(t)
	bin := kinwordBinary(t)
	shared := filepath.Join(t.TempDir(), "shared")
	data1 := builtWith(t, bin, fieldRecordCorpus())
	data2 := builtWith(t, bin, valveCorpus())
	verA := publishWith(t, bin, data1, shared)
	cfg := filepath.Join(t.TempDir(), "kinword.toml")
	if err := os.WriteFile(cfg, []byte("[server]\nrefresh_seconds = 1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	const secret = "snapshot-test-secret"
	env := []string{"KINWORD_STORE_DSN=" + dsn, "KINWORD_PROXY_SECRET=" + secret}
	local := []string{filepath.Join(t.TempDir(), "r1"), filepath.Join(t.TempDir(), "r2")}
	var reps []*server
	for _, d := range local { // the first migrates the schema
		reps = append(reps, startServer(t, bin, d, env, "--config", cfg, "--snapshots", shared))
	}
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	for i, r := range reps {
		if v, err := servedVersion(ctx, r.base); err != nil || v != verA {
			t.Fatalf("replica %d serves %q (%v), want %q\n%s", i, v, err, verA, stderrOf(r))
		}
	}
	const q, dept = "valve", "field-operations"
	corpus2 := func(titles []string) bool { return len(titles) > 0 && strings.HasPrefix(titles[0], "Handbook note") }
	v := viewer{session: newSession(t), dept: dept, secret: secret}
	var sugsA [2][]string
	for i, r := range reps {
		titles, s, err := lookupTitles(ctx, r.base, q, v)
		if err != nil || len(titles) == 0 || corpus2(titles) {
			t.Fatalf("replica %d on version A: titles %v, err %v", i, titles, err)
		}
		sort.Strings(s) // exploration may re-order a share of impressions
		sugsA[i] = s
	}
	sugA := sugsA[0]
	if len(sugA) == 0 || strings.Join(sugA, ",") != strings.Join(sugsA[1], ",") {
		t.Fatalf("replicas differ on A: %v vs %v", sugA, sugsA[1])
	}

	// Load on both replicas across the swap.
	var ok, failed atomic.Int64
	var sawA, sawB [2]atomic.Int64
	stop := make(chan struct{})
	var wg sync.WaitGroup
	for i, r := range reps {
		for range 8 {
			wg.Add(1)
			go func() {
				defer wg.Done()
				v := viewer{session: newSession(t), dept: dept, secret: secret}
				for {
					select {
					case <-stop:
						return
					default:
					}
					titles, _, err := lookupTitles(ctx, r.base, q, v)
					if err != nil {
						failed.Add(1)
						t.Errorf("replica %d: lookup during the swap: %v", i, err)
						continue
					}
					ok.Add(1)
					if corpus2(titles) {
						sawB[i].Add(1)
					} else {
						sawA[i].Add(1)
					}
				}
			}()
		}
	}
	time.Sleep(500 * time.Millisecond)
	verB := publishWith(t, bin, data2, shared)
	published := time.Now()
	var took [2]time.Duration
	for i, r := range reps {
		for {
			if v, err := servedVersion(ctx, r.base); err == nil && v == verB {
				took[i] = time.Since(published)
				break
			}
			if time.Since(published) > 15*time.Second {
				close(stop)
				wg.Wait()
				t.Fatalf("replica %d did not serve %s within 15 s\n%s", i, verB, stderrOf(r))
			}
			time.Sleep(50 * time.Millisecond)
		}
	}
	time.Sleep(500 * time.Millisecond)
	close(stop)
	wg.Wait()
	t.Logf("B served %.2f s and %.2f s after publish (refresh 1 s); %d lookups during the swap, %d failed; replica answers A/B: %d/%d and %d/%d",
		took[0].Seconds(), took[1].Seconds(), ok.Load(), failed.Load(), sawA[0].Load(), sawB[0].Load(), sawA[1].Load(), sawB[1].Load())
	if failed.Load() != 0 {
		t.Errorf("%d lookups failed during the swap", failed.Load())
	}
	for i := range reps {
		if sawA[i].Load() == 0 || sawB[i].Load() == 0 {
			t.Errorf("replica %d: answers of A %d, of B %d: the load did not span the swap", i, sawA[i].Load(), sawB[i].Load())
		}
		if m := swapLine.FindStringSubmatch(stderrOf(reps[i])); m != nil {
			t.Logf("replica %d: fetch %s ms, open and swap %s ms", i, m[1], m[2])
		} else {
			t.Errorf("replica %d logged no swap:\n%s", i, stderrOf(reps[i]))
		}
	}

	// Both replicas now answer from B, alike.
	var sugs [2][]string
	for i, r := range reps {
		titles, s, err := lookupTitles(ctx, r.base, q, viewer{session: newSession(t), dept: dept, secret: secret})
		if err != nil || !corpus2(titles) {
			t.Fatalf("replica %d after the swap: titles %v, err %v", i, titles, err)
		}
		sort.Strings(s) // exploration may re-order a share of impressions
		sugs[i] = s
	}
	t.Logf("suggestions for %q (%s): A %v; B on both %v", q, dept, sugA, sugs[0])
	if len(sugs[0]) == 0 || strings.Join(sugs[0], ",") != strings.Join(sugs[1], ",") {
		t.Errorf("replicas differ on B: %v vs %v", sugs[0], sugs[1])
	}
	for _, a := range sugA {
		for _, b := range sugs[0] {
			if a == b {
				t.Errorf("A and B both offer %q: the corpora do not tell the versions apart", a)
			}
		}
	}
	for i, d := range local {
		old := filepath.Join(d, "snapshots", verA)
		deadline := time.Now().Add(5 * time.Second)
		for {
			if _, err := os.Stat(old); os.IsNotExist(err) {
				break
			}
			if time.Now().After(deadline) {
				t.Errorf("replica %d kept %s after its index was closed", i, old)
				break
			}
			time.Sleep(50 * time.Millisecond)
		}
	}
}

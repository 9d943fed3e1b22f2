package main

// Reload of a corrupt or truncated association table while the server
// is under load (see faults_test.go for the other fault tests).

import (
	"context"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"
)

// TestCorruptTableReload serves a mined association table under 4
// concurrent lookup clients, then replaces the file with (1) a copy with
// one flipped byte in the middle (section checksum mismatch) and (2) a
// copy cut to half its length, sending SIGHUP after each. Checks: zero
// failed requests throughout; /readyz keeps the old table and its load
// time; suggestions keep their association evidence; a log line names the
// failure; kinword_reload_total{result="failed"} counts 2. Restoring the
// good file and SIGHUP then reloads (result="ok" 1).
//
// A truncated index file is not tested: reload does not reopen the index
// (the process holds its folder lock and serves every committed change
// already, see finder.Reload), so no reload reads it.
func TestCorruptTableReload(t *testing.T) {
	bin := kinwordBinary(t)
	src := t.TempDir()
	writeCorpus(t, src, valveCorpus())
	data := ingestCorpus(t, bin, src)
	if out, err := exec.Command(bin, "mine", "--data", data).CombinedOutput(); err != nil {
		t.Fatalf("mine: %v\n%s", err, out)
	}
	table := filepath.Join(data, "assoc.kwa")
	good, err := os.ReadFile(table)
	if err != nil {
		t.Fatal(err)
	}
	srv := startServer(t, bin, data, nil)
	ready := func() (bool, string) {
		t.Helper()
		resp, err := httpClient.Get(srv.base + "/readyz")
		if err != nil {
			t.Fatalf("readyz: %v", err)
		}
		defer resp.Body.Close()
		var r struct {
			Loaded struct {
				Table  bool   `json:"association_table"`
				Loaded string `json:"loaded"`
			} `json:"loaded"`
		}
		if err := json.NewDecoder(resp.Body).Decode(&r); err != nil {
			t.Fatalf("readyz: %v", err)
		}
		return r.Loaded.Table, r.Loaded.Loaded
	}
	assocTerms := func() int {
		t.Helper()
		out, err := getSuggestions(context.Background(), srv.base, "/api/v1/hints", "valve", viewer{})
		if err != nil {
			t.Fatalf("hints: %v", err)
		}
		n := 0
		for _, s := range out.Suggestions {
			if s.Evidence.Parts["association"] > 0 {
				n++
			}
		}
		return n
	}
	hadTable, loaded0 := ready()
	assoc0 := assocTerms()
	if !hadTable || assoc0 == 0 {
		t.Fatalf("before: table loaded %v, %d suggestions with association evidence; want a table in use", hadTable, assoc0)
	}

	ctx, cancel := context.WithCancel(context.Background())
	var (
		wg           sync.WaitGroup
		reqs, failed atomic.Int64
		firstErr     firstError
	)
	for w := 0; w < 4; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			route := []string{"/api/v1/lookup", "/api/v1/hints"}[w%2]
			for ctx.Err() == nil {
				_, err := getSuggestions(ctx, srv.base, route, "valve", viewer{})
				if ctx.Err() != nil {
					return
				}
				reqs.Add(1)
				if err != nil {
					failed.Add(1)
					firstErr.set(err)
				}
			}
		}()
	}
	flipped := append([]byte(nil), good...)
	flipped[len(flipped)/2] ^= 0x5a
	logLine := "reload failed; the previous snapshot keeps serving"
	for i, bad := range []struct {
		name string
		body []byte
	}{{"one byte flipped", flipped}, {"truncated to half", good[:len(good)/2]}} {
		writeAtomic(t, table, bad.body)
		time.Sleep(100 * time.Millisecond) // some requests before the reload
		_ = srv.cmd.Process.Signal(syscall.SIGHUP)
		waitLog(t, srv, logLine, i+1)
		time.Sleep(100 * time.Millisecond) // and some after it
		hasTable, loaded := ready()
		n := assocTerms()
		t.Logf("%s: table still loaded %v, load time unchanged %v, %d suggestions with association evidence (was %d)", bad.name, hasTable, loaded == loaded0, n, assoc0)
		if !hasTable || loaded != loaded0 || n != assoc0 {
			t.Errorf("%s: the old table stopped serving: table %v, loaded %s (was %s), association suggestions %d (was %d)", bad.name, hasTable, loaded, loaded0, n, assoc0)
		}
	}
	writeAtomic(t, table, good)
	_ = srv.cmd.Process.Signal(syscall.SIGHUP)
	deadline := time.Now().Add(10 * time.Second)
	for scrape(t, srv.base, `kinword_reload_total{result="ok"}`)[`kinword_reload_total{result="ok"}`] < 1 {
		if time.Now().After(deadline) {
			t.Fatalf("the good table was not reloaded within 10 s\n%s", srv.stderr)
		}
		time.Sleep(20 * time.Millisecond)
	}
	cancel()
	wg.Wait()
	m := scrape(t, srv.base, "kinword_reload_total")
	t.Logf("%d requests during the reloads, %d failed; %v; log: %q", reqs.Load(), failed.Load(), m, firstLine(srv, logLine))
	if failed.Load() > 0 {
		t.Errorf("%d of %d requests failed, first: %v", failed.Load(), reqs.Load(), firstErr.get())
	}
	if m[`kinword_reload_total{result="failed"}`] != 2 || m[`kinword_reload_total{result="ok"}`] != 1 {
		t.Errorf("reload metric %v, want failed 2 and ok 1", m)
	}
	if _, loaded := ready(); loaded == loaded0 {
		t.Errorf("the good table's reload kept the old load time")
	}
}

// writeAtomic replaces path with body via a rename, as an operator's
// copy tool would; the finder reads the whole file at reload.
func writeAtomic(t *testing.T, path string, body []byte) {
	t.Helper()
	tmp := path + ".tmp"
	if err := os.WriteFile(tmp, body, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Rename(tmp, path); err != nil {
		t.Fatal(err)
	}
}

// waitLog waits until the server's stderr holds line n times.
func waitLog(t *testing.T, srv *server, line string, n int) {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for {
		lw := srv.cmd.Stderr.(*lockedWriter)
		lw.mu.Lock()
		got := strings.Count(srv.stderr.String(), line)
		lw.mu.Unlock()
		if got >= n {
			return
		}
		if time.Now().After(deadline) {
			t.Fatalf("log line %q seen %d times within 10 s, want %d\n%s", line, got, n, srv.stderr)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

func firstLine(srv *server, sub string) string {
	lw := srv.cmd.Stderr.(*lockedWriter)
	lw.mu.Lock()
	defer lw.mu.Unlock()
	for _, l := range strings.Split(srv.stderr.String(), "\n") {
		if strings.Contains(l, sub) {
			return l
		}
	}
	return ""
}

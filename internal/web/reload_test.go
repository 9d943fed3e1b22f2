package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"testing"

	"kinword/internal/assoc"
	"kinword/internal/doc"
	"kinword/internal/finder"
)

// reloadServer indexes a small corpus in a data folder without an
// association table and serves it with an admin token.
func reloadServer(t *testing.T) (s *Server, dataDir, admin string) {
	t.Helper()
	dataDir = t.TempDir()
	var docs []doc.Document
	for i := 0; i < 12; i++ {
		docs = append(docs, doc.Document{ID: fmt.Sprintf("n%02d", i), Title: fmt.Sprintf("Network note %d", i),
			Body: "A main break needs the valve closed; a burst pipe is a main break. Valve records sit in the register."})
	}
	f := indexFinder(t, dataDir, docs)
	admin, sum, err := NewToken()
	if err != nil {
		t.Fatal(err)
	}
	s, err = New(f, Options{Tokens: []Token{{Name: "ops", Role: RoleAdmin, SHA256: sum}}, Log: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		t.Fatal(err)
	}
	return s, dataDir, admin
}

// tableBytes mines a tiny association table and returns its file.
func tableBytes(t *testing.T) []byte {
	t.Helper()
	c := assoc.NewMemCorpus(nil)
	for i := 0; i < 4; i++ {
		c.AddDoc(nil, []string{"main", "break", "valve", "burst", "pipe"})
	}
	tbl, err := assoc.Mine(context.Background(), c, assoc.Options{MinDF: 1, MinSupportDocs: 1, TempDir: t.TempDir(), Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "assoc.kwa")
	if err := tbl.Write(path); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// placeTable moves a table into the data folder atomically (write, then
// rename), as a rebuild beside a running server would.
func placeTable(dataDir string, b []byte) error {
	tmp := filepath.Join(dataDir, "assoc.kwa.tmp")
	if err := os.WriteFile(tmp, b, 0o644); err != nil {
		return err
	}
	return os.Rename(tmp, filepath.Join(dataDir, "assoc.kwa"))
}

// loaded reads /readyz.
func loaded(t *testing.T, s *Server) finder.Status {
	t.Helper()
	var r struct {
		Loaded finder.Status `json:"loaded"`
	}
	rec := call(t, s, http.MethodGet, "/readyz", "", nil)
	if err := json.Unmarshal(rec.Body.Bytes(), &r); err != nil {
		t.Fatal(err)
	}
	return r.Loaded
}

// reloadCount reads kinword_reload_total{result} from /metrics.
func reloadCount(t *testing.T, s *Server, result string) string {
	t.Helper()
	m := call(t, s, http.MethodGet, "/metrics", "", nil).Body.String()
	prefix := `kinword_reload_total{result="` + result + `"} `
	for _, line := range strings.Split(m, "\n") {
		if v, ok := strings.CutPrefix(line, prefix); ok {
			return v
		}
	}
	return "absent"
}

// TestReloadSwapsOrKeepsTheOldSnapshot: a reload picks up a new table; a
// reload over a corrupt table answers 500 and the previous snapshot (table
// and load time) keeps serving; both outcomes are counted.
func TestReloadSwapsOrKeepsTheOldSnapshot(t *testing.T) {
	s, dir, admin := reloadServer(t)
	tbl := tableBytes(t)
	put := func() {
		if err := placeTable(dir, tbl); err != nil {
			t.Fatal(err)
		}
	}
	steps := []struct {
		name   string
		before func()
		status int
		table  bool
		same   bool // the load time must not change
		ok     string
		failed string
	}{
		{"no table yet", func() {}, 200, false, false, "1", "0"},
		{"table appears", put, 200, true, false, "2", "0"},
		{"corrupt table", func() {
			if err := os.WriteFile(filepath.Join(dir, "assoc.kwa"), []byte("not an association table"), 0o644); err != nil {
				t.Fatal(err)
			}
		}, 500, true, true, "2", "1"},
		{"repaired", put, 200, true, false, "3", "1"},
	}
	for _, st := range steps {
		t.Run(st.name, func(t *testing.T) {
			before := loaded(t, s)
			st.before()
			rec := call(t, s, http.MethodPost, "/api/v1/reload", "", bearerHdr(admin))
			if rec.Code != st.status {
				t.Fatalf("reload: %d %s", rec.Code, rec.Body)
			}
			if st.status == 500 && !strings.Contains(rec.Body.String(), `"reload_failed"`) {
				t.Errorf("failure body: %s", rec.Body)
			}
			after := loaded(t, s)
			if after.Table != st.table || after.Loaded.Equal(before.Loaded) != st.same {
				t.Errorf("after reload: table %v (want %v), load time kept %v (want %v)", after.Table, st.table, after.Loaded.Equal(before.Loaded), st.same)
			}
			if _, total := lookupIDs(t, s, "main break", nil); total != 12 {
				t.Errorf("search after reload: total %d, want 12", total)
			}
			if ok, failed := reloadCount(t, s, "ok"), reloadCount(t, s, "failed"); ok != st.ok || failed != st.failed {
				t.Errorf("kinword_reload_total ok=%s failed=%s, want %s and %s", ok, failed, st.ok, st.failed)
			}
		})
	}
	// SIGHUP in kinword serve calls Server.Reload: it counts the same way.
	if err := s.Reload(context.Background(), "SIGHUP"); err != nil || reloadCount(t, s, "ok") != "4" {
		t.Errorf("Server.Reload: %v, ok count %s", err, reloadCount(t, s, "ok"))
	}
}

// TestReloadUnderConcurrentSearches: searches running while the snapshot
// is reloaded (table swapped in and out) and documents are pushed and
// deleted never fail. Run with -race.
func TestReloadUnderConcurrentSearches(t *testing.T) {
	s, dir, admin := reloadServer(t)
	tbl := tableBytes(t)
	if err := placeTable(dir, tbl); err != nil {
		t.Fatal(err)
	}
	var failed atomic.Int64
	var first atomic.Value
	fail := func(format string, args ...any) {
		if failed.Add(1) == 1 {
			first.Store(fmt.Sprintf(format, args...))
		}
	}
	var wg sync.WaitGroup
	queries := []string{"valve", "main break", "burst pipe", "register"}
	for w := 0; w < 4; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			for i := 0; i < 40; i++ {
				q := queries[(w+i)%len(queries)]
				rec := call(t, s, http.MethodGet, "/api/v1/lookup?q="+strings.ReplaceAll(q, " ", "+"), "", nil)
				if rec.Code != 200 || !strings.Contains(rec.Body.String(), `"results":[{`) {
					fail("search %q: %d %s", q, rec.Code, rec.Body)
				}
			}
		}(w)
	}
	wg.Add(2)
	go func() {
		defer wg.Done()
		for i := 0; i < 12; i++ {
			if i%2 == 1 {
				os.Remove(filepath.Join(dir, "assoc.kwa")) // no table is a valid state too
			} else if err := placeTable(dir, tbl); err != nil {
				fail("place table: %v", err)
			}
			if rec := call(t, s, http.MethodPost, "/api/v1/reload", "", bearerHdr(admin)); rec.Code != 200 {
				fail("reload %d: %d %s", i, rec.Code, rec.Body)
			}
		}
	}()
	go func() {
		defer wg.Done()
		for i := 0; i < 6; i++ {
			body := fmt.Sprintf(`{"documents":[{"id":"live-%d","body":"Valve log entry %d for the main break."}]}`, i, i)
			if rec := call(t, s, http.MethodPost, "/api/v1/documents", body, bearerHdr(admin)); rec.Code != 200 {
				fail("push %d: %d %s", i, rec.Code, rec.Body)
			}
			if i%2 == 0 {
				if rec := call(t, s, http.MethodDelete, fmt.Sprintf("/api/v1/documents/live-%d", i), "", bearerHdr(admin)); rec.Code != 200 {
					fail("delete %d: %d %s", i, rec.Code, rec.Body)
				}
			}
		}
	}()
	wg.Wait()
	if n := failed.Load(); n > 0 {
		t.Fatalf("%d failed requests; first: %v", n, first.Load())
	}
	if got := loaded(t, s).Documents; got != 15 {
		t.Errorf("documents after the pushes: %d, want 12 + 3", got)
	}
}

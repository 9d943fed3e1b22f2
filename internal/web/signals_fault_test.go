package web

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"kinword/internal/store"
)

// TestSignalStoreDiskFullSQLite runs the real server over HTTP on a real
// SQLite store that fills up. Mechanism: the store is capped at its
// current size (store.Options.SQLiteMaxPages, i.e. PRAGMA max_page_count),
// so SQLite itself fails the commit with SQLITE_FULL, "database or disk is
// full", the code it gives for ENOSPC (SQLite documentation, "Result and
// Error Codes"); a full disk cannot be made without privileges, and file
// modes do not stop root. Clients keep posting while lookups run; once
// enough 503s came back, Prune frees the pages of old "ballast" events
// (an operator freeing space) and posting must succeed again. Checks:
// every 503 has Retry-After and the error shape, no batch answered 503 is
// stored (a failed SQLite commit is rolled back whole), every 202 batch is
// stored, no lookup failed, and kinword_store_errors_total{kind="disk_full"}
// counted every 503.
func TestSignalStoreDiskFullSQLite(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "events.db")
	dsn := "sqlite:" + path
	st, err := store.Open(ctx, dsn)
	if err != nil {
		t.Fatal(err)
	}
	old := time.Now().Add(-400 * 24 * time.Hour)
	for i := 0; i < 200; i++ {
		id := fmt.Sprintf("ballast-%d", i)
		if err := st.Append(ctx, []store.Event{{ID: id, Impression: id, Kind: store.KindImpression, Time: old,
			Query: strings.Repeat("ballast ", 60), Terms: []string{"main"}}}); err != nil {
			t.Fatal(err)
		}
	}
	st.Close() // the last connection checkpoints the WAL into the file
	fi, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	pages := int(fi.Size() / 4096) // SQLite's default page size (documentation, "PRAGMA page_size")
	st, err = store.OpenWith(ctx, dsn, store.Options{SQLiteMaxPages: pages})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	s := newSignalServer(t, st)
	hs := httptest.NewServer(s.Handler())
	defer hs.Close()

	var (
		mu                sync.Mutex
		acked, refused    []string
		n503, lookupFails atomic.Int64
		badRefusals       atomic.Int64
		recovered         atomic.Bool
		afterRecovery     atomic.Int64
		stop              = make(chan struct{})
		wg                sync.WaitGroup
		seq               atomic.Int64
	)
	for w := 0; w < 4; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				select {
				case <-stop:
					return
				default:
				}
				imp := fmt.Sprintf("imp-%d", seq.Add(1))
				ids := []string{imp, imp + "-a0", imp + "-a1"}
				body := fmt.Sprintf(`{"events":[{"id":%q,"impression":%q,"kind":"impression","query":"valve main","terms":["main","break"]},`+
					`{"id":%q,"impression":%q,"kind":"accept","term":"main","position":0},{"id":%q,"impression":%q,"kind":"accept","term":"break","position":1}]}`,
					ids[0], imp, ids[1], imp, ids[2], imp)
				resp, err := http.Post(hs.URL+"/api/v1/signals", "application/json", strings.NewReader(body))
				if err != nil {
					t.Errorf("post: %v", err)
					return
				}
				b, _ := io.ReadAll(resp.Body)
				resp.Body.Close()
				mu.Lock()
				switch resp.StatusCode {
				case http.StatusAccepted:
					acked = append(acked, ids...)
					if recovered.Load() {
						afterRecovery.Add(1)
					}
				case http.StatusServiceUnavailable:
					refused = append(refused, ids...)
					n503.Add(1)
					var e struct {
						Error struct{ Code string } `json:"error"`
					}
					if resp.Header.Get("Retry-After") != "5" || json.Unmarshal(b, &e) != nil || e.Error.Code != "store_unavailable" {
						badRefusals.Add(1)
					}
				default:
					t.Errorf("signals: %d %s", resp.StatusCode, b)
				}
				mu.Unlock()
			}
		}()
	}
	for w := 0; w < 2; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				select {
				case <-stop:
					return
				default:
				}
				resp, err := http.Get(hs.URL + "/api/v1/lookup?q=valve")
				if err != nil || resp.StatusCode != http.StatusOK {
					lookupFails.Add(1)
				}
				if resp != nil {
					_, _ = io.Copy(io.Discard, resp.Body)
					resp.Body.Close()
				}
			}
		}()
	}
	wait := func(what string, cond func() bool) {
		deadline := time.Now().Add(20 * time.Second)
		for !cond() {
			if time.Now().After(deadline) {
				close(stop)
				wg.Wait()
				t.Fatalf("timed out waiting for %s", what)
			}
			time.Sleep(5 * time.Millisecond)
		}
	}
	wait("20 refusals of a full store", func() bool { return n503.Load() >= 20 })
	full503 := n503.Load()
	if _, err := st.Prune(ctx, time.Now().Add(-300*24*time.Hour)); err != nil {
		t.Fatalf("prune while full: %v", err)
	}
	recovered.Store(true)
	wait("20 acknowledged batches after freeing space", func() bool { return afterRecovery.Load() >= 20 })
	close(stop)
	wg.Wait()

	stored := map[string]bool{}
	if err := st.Events(ctx, time.Time{}, func(e store.Event) error { stored[e.ID] = true; return nil }); err != nil {
		t.Fatal(err)
	}
	var lost, leaked int
	for _, id := range acked {
		if !stored[id] {
			lost++
		}
	}
	for _, id := range refused {
		if stored[id] {
			leaked++
		}
	}
	t.Logf("capped at %d pages: %d events acknowledged (%d batches after freeing space), %d batches refused with 503 (%d before freeing), %d lookups failed; lost %d, refused-but-stored %d",
		pages, len(acked), afterRecovery.Load(), n503.Load(), full503, lookupFails.Load(), lost, leaked)
	if lost > 0 || leaked > 0 || lookupFails.Load() > 0 || badRefusals.Load() > 0 {
		t.Errorf("lost %d acknowledged events, stored %d refused ones, %d lookups failed, %d refusals without Retry-After 5 or the error shape",
			lost, leaked, lookupFails.Load(), badRefusals.Load())
	}
	metrics := get(t, s, "/metrics", nil).Body.String()
	if want := fmt.Sprintf("kinword_store_errors_total{kind=\"disk_full\"} %d\n", n503.Load()); !strings.Contains(metrics, want) {
		t.Errorf("metrics lack %q:\n%s", want, grepLines(metrics, "kinword_store_errors_total"))
	}
}

func grepLines(s, sub string) string {
	var b bytes.Buffer
	for _, l := range strings.Split(s, "\n") {
		if strings.Contains(l, sub) {
			b.WriteString(l + "\n")
		}
	}
	return b.String()
}

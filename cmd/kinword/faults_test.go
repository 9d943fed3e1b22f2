package main

// Fault tests of `kinword serve` as a process: the PostgreSQL store cut
// off mid-load and restored, and SIGKILL at random moments during event
// load (SQLite). Like faults_reload_test.go and faults_drain_test.go they
// start the real binary on 127.0.0.1 (helpers in replica_util_test.go and
// faults_util_test.go).

import (
	"context"
	"fmt"
	"math/rand/v2"
	"net/http"
	"net/url"
	"path/filepath"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// TestOutagePostgres runs the server on PostgreSQL through a TCP proxy
// (the shared server itself cannot be stopped); 6 clients post
// self-contained batches while 2 run lookups. After 1 s the proxy is cut (sessions dropped, new connections refused) for 2 s, then
// restored. Checks: during the outage events are answered 503 with
// Retry-After 5 and the error shape, never 202; lookups never fail; after
// the restore posting succeeds again; every acknowledged event id is in
// the database; and the store errors were counted as kind "connection".
func TestOutagePostgres(t *testing.T) {
	direct := pgSchemaDSN(t)
	bin := kinwordBinary(t)
	src := t.TempDir()
	writeCorpus(t, src, fiveDocs)
	data := ingestCorpus(t, bin, src)
	u, err := url.Parse(direct)
	if err != nil {
		t.Fatal(err)
	}
	target := u.Host // 127.0.0.1:5432 unless KINWORD_TEST_PG says otherwise
	if u.Port() == "" {
		target += ":5432"
	}
	proxy := startProxy(t, target)
	srv := startServer(t, bin, data, []string{"KINWORD_STORE_DSN=" + viaProxy(t, direct, proxy)})

	const (
		phaseUp = iota
		phaseDown
		phaseRestored
	)
	var (
		phase       atomic.Int32
		mu          sync.Mutex
		acked       = map[string]bool{}
		refused     []string
		counts      [3]struct{ ok, unavailable int }
		badRefusals []string
		lookupFails atomic.Int64
		lookups     atomic.Int64
		firstErr    firstError
		wg          sync.WaitGroup
	)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	for w := 0; w < 6; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			v := viewer{session: newSession(t)}
			for ctx.Err() == nil {
				batch := ownBatch(t)
				ph := phase.Load()
				r, err := postSignalsFull(ctx, srv.base, v, batch)
				if err != nil {
					if ctx.Err() == nil {
						firstErr.set(err)
					}
					return
				}
				mu.Lock()
				switch r.status {
				case http.StatusAccepted:
					for _, e := range batch {
						acked[e.ID] = true
					}
					counts[ph].ok++
				case http.StatusServiceUnavailable:
					counts[ph].unavailable++
					for _, e := range batch {
						refused = append(refused, e.ID)
					}
					if r.retryAfter != "5" || r.errCode != "store_unavailable" {
						badRefusals = append(badRefusals, fmt.Sprintf("Retry-After %q code %q", r.retryAfter, r.errCode))
					}
				default:
					badRefusals = append(badRefusals, fmt.Sprintf("status %d code %q", r.status, r.errCode))
				}
				mu.Unlock()
				if r.status != http.StatusAccepted {
					time.Sleep(20 * time.Millisecond) // a client honouring Retry-After would wait longer
				}
			}
		}()
	}
	for w := 0; w < 2; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ctx.Err() == nil {
				lookups.Add(1)
				if err := lookupOK(ctx, srv.base); err != nil {
					lookupFails.Add(1)
					firstErr.set(err)
				}
			}
		}()
	}
	time.Sleep(time.Second)
	proxy.cut()
	phase.Store(phaseDown)
	time.Sleep(2 * time.Second)
	// Batches posted after the cut (phase down) cannot have committed.
	mu.Lock()
	downOK := counts[phaseDown].ok
	mu.Unlock()
	phase.Store(phaseRestored)
	proxy.restore(t)
	restoredAt := time.Now()
	deadline := restoredAt.Add(20 * time.Second)
	for {
		mu.Lock()
		n := counts[phaseRestored].ok
		mu.Unlock()
		if n >= 30 {
			break
		}
		if time.Now().After(deadline) {
			cancel()
			wg.Wait()
			t.Fatalf("only %d batches acknowledged within 20 s of the restore\n%s", n, srv.stderr)
		}
		time.Sleep(20 * time.Millisecond)
	}
	recovery := time.Since(restoredAt)
	kinds := scrape(t, srv.base, "kinword_store_errors_total")
	cancel()
	wg.Wait()
	if err := srv.stop(t); err != nil {
		t.Errorf("server exit after SIGTERM: %v", err)
	}

	missing, stored := missingIDs(t, direct, acked)
	refusedStored := 0
	if len(refused) > 0 {
		inRefused := map[string]bool{}
		for _, id := range refused {
			inRefused[id] = true
		}
		notStored, _ := missingIDs(t, direct, inRefused)
		refusedStored = len(refused) - len(notStored)
	}
	t.Logf("posted before the cut: %d batches 202, %d 503 (answered after it); during the outage (2 s): %d 202 (must be 0), %d 503; restored: %d 202, %d 503, recovered within %s",
		counts[phaseUp].ok, counts[phaseUp].unavailable, downOK, counts[phaseDown].unavailable,
		counts[phaseRestored].ok, counts[phaseRestored].unavailable, recovery.Round(time.Millisecond))
	t.Logf("%d events acknowledged, %d stored, %d acknowledged missing; %d refused events of which %d were committed anyway (commit answered after the cut; a retry gets 409); lookups %d, failed %d; store errors %v",
		len(acked), stored, len(missing), len(refused), refusedStored, lookups.Load(), lookupFails.Load(), kinds)
	if err := firstErr.get(); err != nil {
		t.Errorf("a client failed: %v", err)
	}
	if len(missing) > 0 {
		t.Errorf("%d acknowledged events missing, e.g. %v", len(missing), missing[:min(5, len(missing))])
	}
	if lookupFails.Load() > 0 {
		t.Errorf("%d lookups failed during the outage", lookupFails.Load())
	}
	if counts[phaseDown].unavailable == 0 {
		t.Errorf("no 503 during the outage: the cut did not reach the store")
	}
	if downOK > 0 {
		t.Errorf("%d batches posted after the cut were acknowledged", downOK)
	}
	if len(badRefusals) > 0 {
		t.Errorf("%d refusals without Retry-After 5 and the error shape, e.g. %v", len(badRefusals), badRefusals[:min(3, len(badRefusals))])
	}
	if kinds[`kinword_store_errors_total{kind="connection"}`] == 0 {
		t.Errorf("no store error counted as kind connection: %v", kinds)
	}
}

// TestKillRandomMomentSQLite repeats 10 times: start the server on the
// same data folder (SQLite store), post self-contained batches from 4
// clients, SIGKILL it at a random moment (50..400 ms after the first
// acknowledgement; seeded, so the schedule repeats), and check on the
// killed store that every acknowledged event is present.
func TestKillRandomMomentSQLite(t *testing.T) {
	bin := kinwordBinary(t)
	src := t.TempDir()
	writeCorpus(t, src, fiveDocs)
	data := ingestCorpus(t, bin, src)
	dsn := "sqlite:" + filepath.Join(t.TempDir(), "events.db")
	env := []string{"KINWORD_STORE_DSN=" + dsn}
	rng := rand.New(rand.NewPCG(2026, 12))
	acked := map[string]bool{}
	var totalPosted, totalInFlight int
	started := time.Now()
	for round := 1; round <= 10; round++ {
		srv := startServer(t, bin, data, env)
		delay := time.Duration(50+rng.IntN(351)) * time.Millisecond
		var (
			mu       sync.Mutex
			ids      []string
			posted   atomic.Int64
			inFlight atomic.Int64
			killed   atomic.Bool
			first    = make(chan struct{})
			once     sync.Once
			wg       sync.WaitGroup
			failures atomic.Int64
		)
		for w := 0; w < 4; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				v := viewer{session: newSession(t)}
				for !killed.Load() {
					batch := ownBatch(t)
					posted.Add(int64(len(batch)))
					code, err := postSignals(context.Background(), srv.base, v, batch)
					if killed.Load() && (err != nil || code != 202) {
						inFlight.Add(int64(len(batch)))
						return
					}
					if err != nil || code != 202 {
						failures.Add(1)
						continue
					}
					mu.Lock()
					for _, e := range batch {
						ids = append(ids, e.ID)
					}
					mu.Unlock()
					once.Do(func() { close(first) })
				}
			}()
		}
		select {
		case <-first:
		case <-time.After(10 * time.Second):
			t.Fatalf("round %d: nothing acknowledged within 10 s\n%s", round, srv.stderr)
		}
		time.Sleep(delay)
		killed.Store(true)
		srv.kill()
		wg.Wait()
		if f := failures.Load(); f > 0 {
			t.Errorf("round %d: %d posts failed while the server was up", round, f)
		}
		mu.Lock()
		for _, id := range ids {
			acked[id] = true
		}
		n := len(ids)
		mu.Unlock()
		missing, stored := missingIDs(t, dsn, acked)
		totalPosted += int(posted.Load())
		totalInFlight += int(inFlight.Load())
		t.Logf("round %2d: killed %3d ms after the first ack: %4d acknowledged (%4d posted, %2d unanswered at the kill); %5d acknowledged in total, %5d stored, missing %d",
			round, delay.Milliseconds(), n, posted.Load(), inFlight.Load(), len(acked), stored, len(missing))
		if len(missing) > 0 {
			t.Fatalf("round %d: %d acknowledged events lost after SIGKILL, e.g. %v", round, len(missing), missing[:min(5, len(missing))])
		}
	}
	t.Logf("10 rounds in %s: %d events acknowledged and all present; %d posted, %d unanswered at a kill",
		time.Since(started).Round(time.Millisecond), len(acked), totalPosted, totalInFlight)
}

package main

// Process-level tests of `kinword serve`: acknowledged events survive a
// SIGKILL of the server (SQLite and PostgreSQL stores), and two replicas
// over one PostgreSQL schema share what searchers taught either of them.
// Both start the real binary on 127.0.0.1 and kill it on cleanup.

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"kinword/internal/store"
)

// fiveDocs is the tiny corpus of the durability test.
var fiveDocs = map[string]string{
	"a.md": "# Main break response\n\nCrews isolate the valve and repair the main break. Crews flush the hydrant after the repair.\n",
	"b.md": "# Valve exercising\n\nField crews exercise each gate valve yearly; a seized valve delays isolation of a main break.\n",
	"c.md": "# Hydrant flushing\n\nFlushing a hydrant clears sediment from the main. Crews open the hydrant slowly.\n",
	"d.md": "# Pressure surge\n\nA pressure surge can crack an old main. Slow valve closure limits the surge.\n",
	"e.md": "# Meter reading\n\nMeter readers log consumption monthly and report pressure drops to field crews.\n",
}

// valveCorpus is 30 documents in which the query "valve" has a few
// co-occurring terms of document frequency 2..5 (the suggestion filters
// keep terms in 2 or more documents and at most a fifth of them); every
// other word is in one document or in all of them.
func valveCorpus() map[string]string {
	docs := map[string]string{}
	co := map[int][]string{}
	for i := 0; i < 5; i++ {
		co[i] = append(co[i], "gasket")
	}
	for i := 0; i < 4; i++ {
		co[i] = append(co[i], "spindle")
	}
	for i := 5; i < 8; i++ {
		co[i] = append(co[i], "flange")
	}
	for i := 8; i < 10; i++ {
		co[i] = append(co[i], "actuator")
	}
	for i := 0; i < 30; i++ {
		body := fmt.Sprintf("# Handbook note %d\n\nThis handbook note belongs to the crew handbook. Entry quorvel%c%c describes", i, 'a'+i%26, 'a'+i/26)
		if i < 10 {
			body += " the valve"
			for _, w := range co[i] {
				body += " and the " + w + " of the valve"
			}
		} else {
			body += fmt.Sprintf(" the plinthar%c%c reading", 'a'+i%26, 'a'+i/26)
		}
		docs[fmt.Sprintf("note-%02d.md", i)] = body + ".\n"
	}
	return docs
}

func TestServerSIGKILLDurability(t *testing.T) {
	for _, b := range []struct {
		name string
		dsn  func(t *testing.T) string
	}{
		{"sqlite", func(t *testing.T) string { return "sqlite:" + filepath.Join(t.TempDir(), "events.db") }},
		{"postgres", pgSchemaDSN},
	} {
		t.Run(b.name, func(t *testing.T) {
			dsn := b.dsn(t)
			bin := kinwordBinary(t)
			src := t.TempDir()
			writeCorpus(t, src, fiveDocs)
			data := ingestCorpus(t, bin, src)
			rounds := 3
			if os.Getenv("KINWORD_LONG") == "1" {
				rounds = 10
			}
			env := []string{"KINWORD_STORE_DSN=" + dsn}
			acked := map[string]bool{}
			for r := 1; r <= rounds; r++ {
				srv := startServer(t, bin, data, env)
				ids, attempted := driveUntilAcked(t, srv.base, 300, srv.kill)
				for _, id := range ids {
					acked[id] = true
				}
				// Restart on the crashed store: it must serve and record again.
				srv = startServer(t, bin, data, env)
				probe := "probe-" + randomID(t)
				v := viewer{session: newSession(t)}
				code, err := postSignals(context.Background(), srv.base, v, []signalEv{{ID: probe, Impression: probe, Kind: store.KindImpression, Query: "valve", Terms: []string{"main"}}})
				if err != nil || code != 202 {
					t.Fatalf("round %d: restarted server: signals status %d, err %v\n%s", r, code, err, srv.stderr)
				}
				acked[probe] = true
				if err := srv.stop(t); err != nil {
					t.Fatalf("round %d: restarted server exited with %v\n%s", r, err, srv.stderr)
				}
				missing, stored := missingIDs(t, dsn, acked)
				t.Logf("round %d: acknowledged %d this round (%d posted), %d in total; %d stored; missing %d", r, len(ids), attempted, len(acked), stored, len(missing))
				if len(missing) > 0 {
					sort.Strings(missing)
					t.Fatalf("round %d: %d acknowledged events lost after SIGKILL, e.g. %v", r, len(missing), missing[:min(5, len(missing))])
				}
			}
		})
	}
}

// driveUntilAcked runs 8 concurrent searchers against base, each looking
// up "valve", posting the impression and then one accept per shown term,
// until at least n events were acknowledged with 202; then it calls kill
// while the other searchers' requests are still in flight. It returns the
// acknowledged ids and how many events were posted.
func driveUntilAcked(t *testing.T, base string, n int, kill func()) ([]string, int) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	var (
		mu       sync.Mutex
		ids      []string
		posted   atomic.Int64
		failures atomic.Int64
		wg       sync.WaitGroup
		killed   atomic.Bool
		once     sync.Once
	)
	count := func() int { mu.Lock(); defer mu.Unlock(); return len(ids) }
	fail := func() {
		if !killed.Load() {
			failures.Add(1)
		}
	}
	for w := 0; w < 8; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			v := viewer{session: newSession(t)}
			for ctx.Err() == nil && !killed.Load() {
				lk, err := getSuggestions(ctx, base, "/api/v1/lookup", "valve", v)
				if err != nil {
					fail()
					continue
				}
				shown := termsOf(lk.Suggestions)
				if len(shown) == 0 {
					shown = []string{"main", "crew"} // the page may show none; the store does not check
				}
				imp := lk.Impression
				batches := [][]signalEv{{{ID: imp, Impression: imp, Kind: store.KindImpression, Query: "valve", Terms: shown}}}
				var acc []signalEv
				for i, term := range shown {
					acc = append(acc, signalEv{ID: randomID(t), Impression: imp, Kind: store.KindAccept, Query: "valve", Term: term, Position: i})
				}
				batches = append(batches, acc)
				for _, batch := range batches {
					posted.Add(int64(len(batch)))
					code, err := postSignals(ctx, base, v, batch)
					if err != nil || code != 202 {
						fail()
						break // an unrecorded impression makes its accepts unknown
					}
					mu.Lock()
					for _, e := range batch {
						ids = append(ids, e.ID)
					}
					enough := len(ids) >= n
					mu.Unlock()
					if enough {
						once.Do(func() { killed.Store(true); kill() })
					}
				}
			}
		}()
	}
	wg.Wait()
	once.Do(func() { killed.Store(true); kill() })
	if got := count(); got < n {
		t.Fatalf("only %d events acknowledged within 60 s (%d failed requests)", got, failures.Load())
	}
	if f := failures.Load(); f > 0 {
		t.Errorf("%d requests failed while the server was up", f)
	}
	return ids, int(posted.Load())
}

// missingIDs opens the store directly and returns the acknowledged ids it
// lacks, and how many events it holds.
func missingIDs(t *testing.T, dsn string, acked map[string]bool) ([]string, int) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
	defer cancel()
	st, err := store.Open(ctx, dsn)
	if err != nil {
		t.Fatalf("open store: %v", err)
	}
	defer st.Close()
	seen := map[string]bool{}
	if err := st.Events(ctx, time.Time{}, func(e store.Event) error { seen[e.ID] = true; return nil }); err != nil {
		t.Fatalf("read store: %v", err)
	}
	var missing []string
	for id := range acked {
		if !seen[id] {
			missing = append(missing, id)
		}
	}
	return missing, len(seen)
}

// TestTwoReplicasShareLearning runs two replicas, each on its own copy of
// the data folder (the index folder is locked by its process), over one
// PostgreSQL schema with a 1 s refresh. Searchers of field-operations
// teach replica A to prefer the term the content ranking puts last for
// "valve"; replica B must rank it first for that department within a few
// refresh intervals. Another department on B keeps the same terms (its
// order may follow the organisation-wide estimate, which A's data feeds).
func TestTwoReplicasShareLearning(t *testing.T) {
	dsn := pgSchemaDSN(t)
	bin := kinwordBinary(t)
	src := t.TempDir()
	writeCorpus(t, src, valveCorpus())
	dataA := ingestCorpus(t, bin, src)
	dataB := filepath.Join(t.TempDir(), "data")
	copyTree(t, dataA, dataB)
	cfg := filepath.Join(t.TempDir(), "kinword.toml")
	if err := os.WriteFile(cfg, []byte("[server]\nrefresh_seconds = 1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	const secret = "replica-test-secret"
	env := []string{"KINWORD_STORE_DSN=" + dsn, "KINWORD_PROXY_SECRET=" + secret}
	a := startServer(t, bin, dataA, env, "--config", cfg)
	b := startServer(t, bin, dataB, env, "--config", cfg) // after A: A has migrated the schema
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()

	const q, dept, other = "valve", "field-operations", "customer-care"
	base := func(srv *server, d string) []suggestionOut {
		t.Helper()
		out, err := getSuggestions(ctx, srv.base, "/api/v1/hints", q, viewer{session: newSession(t), dept: d, secret: secret})
		if err != nil {
			t.Fatalf("hints: %v\n%s", err, srv.stderr)
		}
		return out.Suggestions
	}
	before := base(b, dept)
	otherBefore := termsOf(base(b, other))
	if len(before) < 2 {
		t.Fatalf("query %q offers %d suggestions, want at least 2: %v", q, len(before), termsOf(before))
	}
	// The content ranking is the order of the normalised content scores.
	byContent := append([]suggestionOut(nil), before...)
	sort.SliceStable(byContent, func(i, j int) bool {
		return byContent[i].Evidence.Parts["content"] > byContent[j].Evidence.Parts["content"]
	})
	target := byContent[len(byContent)-1].Term
	t.Logf("before: %s on B: %v (content order %v), target %q; %s: %v", dept, termsOf(before), termsOf(byContent), target, other, otherBefore)
	if byContent[0].Term == target {
		t.Fatalf("content ranking has a tie at the top; pick another corpus: %v", termsOf(byContent))
	}

	const sessions = 40
	for i := 0; i < sessions; i++ {
		v := viewer{session: newSession(t), dept: dept, secret: secret}
		lk, err := getSuggestions(ctx, a.base, "/api/v1/lookup", q, v)
		if err != nil {
			t.Fatalf("lookup on A: %v", err)
		}
		shown := termsOf(lk.Suggestions)
		pos := -1
		for j, term := range shown {
			if term == target {
				pos = j
			}
		}
		if pos < 0 {
			t.Fatalf("session %d: A no longer shows %q: %v", i, target, shown)
		}
		imp := lk.Impression
		events := []signalEv{
			{ID: imp, Impression: imp, Kind: store.KindImpression, Query: q, Terms: shown},
			{ID: randomID(t), Impression: imp, Kind: store.KindAccept, Query: q, Term: target, Position: pos},
		}
		if code, err := postSignals(ctx, a.base, v, events); err != nil || code != 202 {
			t.Fatalf("session %d: signals on A: status %d, err %v\n%s", i, code, err, a.stderr)
		}
	}
	recorded := time.Now()

	// Exploration re-orders a share of impressions by a posterior sample,
	// so B must rank the target first on 3 consecutive fresh lists.
	deadline := recorded.Add(20 * time.Second)
	streak, polls := 0, 0
	var last []string
	for streak < 3 {
		if time.Now().After(deadline) {
			t.Fatalf("B did not rank %q first for %s within 20 s of A recording %d sessions; last list %v\nA: %s\nB: %s", target, dept, sessions, last, a.stderr, b.stderr)
		}
		last = termsOf(base(b, dept))
		polls++
		if len(last) > 0 && last[0] == target {
			streak++
		} else {
			streak = 0
		}
		time.Sleep(350 * time.Millisecond) // past the 1 s suggestion cache within 3 polls
	}
	delay := time.Since(recorded)
	t.Logf("B ranked %q first for %s %.1f s after A recorded %d sessions (%d polls): %v", target, dept, delay.Seconds(), sessions, polls, last)

	otherAfter := termsOf(base(b, other))
	t.Logf("%s on B: before %v, after %v", other, otherBefore, otherAfter)
	if !sameSet(otherBefore, otherAfter) {
		t.Errorf("%s's suggestions on B changed terms: before %v, after %v", other, otherBefore, otherAfter)
	}
}

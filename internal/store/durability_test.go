package store

import (
	"bufio"
	"context"
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"sync"
	"syscall"
	"testing"
	"time"
)

// Environment of the helper process.
const (
	envHelper = "KINWORD_STORE_HELPER" // "1" in the child
	envDSN    = "KINWORD_STORE_DSN"    // store the child appends to
	envRound  = "KINWORD_STORE_ROUND"  // makes ids unique across rounds
)

// TestHelperProcess is not a test: re-executed by TestDurabilityKill (the
// usual Go pattern for subprocess tests), it appends events from 4
// goroutines until killed and prints each event id on stdout only after
// the Append that carried it has returned nil.
func TestHelperProcess(t *testing.T) {
	if os.Getenv(envHelper) != "1" {
		t.Skip("helper process for TestDurabilityKill")
	}
	ctx := context.Background()
	s, err := Open(ctx, os.Getenv(envDSN))
	if err != nil {
		fmt.Fprintln(os.Stderr, "helper open:", err)
		os.Exit(2)
	}
	round := os.Getenv(envRound)
	imp := "dur-" + round
	if err := s.Append(ctx, []Event{impression(imp, t0, "a")}); err != nil {
		fmt.Fprintln(os.Stderr, "helper append:", err)
		os.Exit(2)
	}
	out := bufio.NewWriter(os.Stdout)
	var mu sync.Mutex
	print := func(ids ...string) {
		mu.Lock()
		defer mu.Unlock()
		for _, id := range ids {
			fmt.Fprintln(out, id)
		}
		out.Flush()
	}
	print("ev-" + imp)
	var wg sync.WaitGroup
	for g := 0; g < 4; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := 0; ; k++ {
				batch := []Event{
					accept(fmt.Sprintf("r%s-g%d-%d-a", round, g, k), imp, "a", 0, t0),
					accept(fmt.Sprintf("r%s-g%d-%d-b", round, g, k), imp, "a", 0, t0),
				}
				if err := s.Append(ctx, batch); err != nil {
					fmt.Fprintln(os.Stderr, "helper append:", err)
					os.Exit(2)
				}
				print(batch[0].ID, batch[1].ID)
			}
		}()
	}
	wg.Wait()
}

// TestDurabilityKill: the child appends; the parent reads N acknowledged
// ids, kills the child with SIGKILL mid-stream, reopens the store and
// requires every acknowledged id. 3 rounds (10 with KINWORD_LONG=1).
// SIGKILL checks that an acknowledgement follows the commit; power-loss
// durability rests on synchronous=FULL (SQLite) and synchronous_commit=on
// (PostgreSQL), which this test cannot cut the power to check.
func TestDurabilityKill(t *testing.T) {
	if os.Getenv(envHelper) == "1" {
		t.Skip("inside helper")
	}
	rounds, want := 3, 200
	if os.Getenv("KINWORD_LONG") == "1" {
		rounds = 10
	}
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			dsn := b.dsn(t)
			var acked []string
			for r := 0; r < rounds; r++ {
				ids := runAndKill(t, dsn, r, want)
				acked = append(acked, ids...)
				s, err := Open(context.Background(), dsn)
				if err != nil {
					t.Fatalf("round %d: reopen: %v", r, err)
				}
				stored := map[string]bool{}
				for _, e := range allEvents(t, s) {
					stored[e.ID] = true
				}
				s.Close()
				missing := 0
				for _, id := range acked {
					if !stored[id] {
						missing++
						if missing <= 5 {
							t.Errorf("round %d: acknowledged %s missing after SIGKILL", r, id)
						}
					}
				}
				t.Logf("round %d: %d acknowledged this round, %d stored in all (>= %d acknowledged so far), %d missing",
					r, len(ids), len(stored), len(acked), missing)
			}
		})
	}
}

// runAndKill starts the helper, reads n acknowledged ids, SIGKILLs it and
// returns the ids read.
func runAndKill(t *testing.T, dsn string, round, n int) []string {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperProcess$", "-test.count=1")
	cmd.Env = append(os.Environ(), envHelper+"=1", envDSN+"="+dsn, envRound+"="+strconv.Itoa(round))
	cmd.Stderr = os.Stderr
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	ids := make([]string, 0, n)
	done := make(chan struct{})
	go func() {
		defer close(done)
		sc := bufio.NewScanner(stdout)
		for len(ids) < n && sc.Scan() {
			ids = append(ids, sc.Text())
		}
	}()
	select {
	case <-done:
	case <-time.After(30 * time.Second):
		t.Errorf("round %d: helper acknowledged only %d ids in 30s", round, len(ids))
	}
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatalf("kill: %v", err)
	}
	<-done
	_ = cmd.Wait() // "signal: killed" is the expected outcome
	if st, ok := cmd.ProcessState.Sys().(syscall.WaitStatus); !ok || !st.Signaled() || st.Signal() != syscall.SIGKILL {
		t.Errorf("round %d: helper ended with %v, want killed by SIGKILL", round, cmd.ProcessState)
	}
	if len(ids) < n {
		t.Fatalf("round %d: read %d ids, want %d", round, len(ids), n)
	}
	return ids
}

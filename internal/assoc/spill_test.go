package assoc

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"
)

func writeBytes(t *testing.T, tb *Table) []byte {
	t.Helper()
	p := filepath.Join(t.TempDir(), "t.kwassoc")
	if err := tb.Write(p); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestSpillIdentity: tiny budgets force many spills and merge rounds; the
// artifact must be byte-for-byte the one of an all-in-memory run, whatever
// the number of workers.
func TestSpillIdentity(t *testing.T) {
	old := mergeFanIn
	mergeFanIn = 4
	defer func() { mergeFanIn = old }()
	spec := smallSpec()
	spec.groups = func(i int) []string {
		if i%10 == 0 {
			return []string{"ops"}
		}
		return nil
	}
	c := synthCorpus(spec)
	base, err := Mine(context.Background(), c, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if base.stats.spills != 0 {
		t.Fatalf("default budget spilled %d times", base.stats.spills)
	}
	want := writeBytes(t, base)
	cases := []struct {
		name    string
		budget  int64
		workers int
	}{
		{"1 byte, 1 worker", 1, 1},
		{"1 byte, 3 workers", 1, 3},
		{"64 KiB, 2 workers", 64 << 10, 2},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			tmp := t.TempDir()
			tb, err := Mine(context.Background(), c, Options{MemoryBudget: tc.budget, Workers: tc.workers, TempDir: tmp})
			if err != nil {
				t.Fatal(err)
			}
			if tb.stats.spills < 2 {
				t.Fatalf("only %d spills; budget not binding", tb.stats.spills)
			}
			if got := writeBytes(t, tb); !bytes.Equal(got, want) {
				t.Fatalf("artifact differs from in-memory run (%d vs %d bytes)", len(got), len(want))
			}
			if left, _ := os.ReadDir(tmp); len(left) != 0 {
				t.Errorf("spill files left behind: %v", left)
			}
			t.Logf("%d spills", tb.stats.spills)
		})
	}
}

// TestCancel: a cancelled Mine returns promptly with ctx's error, removes
// its spill files and leaves an existing artifact untouched.
func TestCancel(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "assoc.kwassoc")
	c := synthCorpus(smallSpec())
	prev, err := Mine(context.Background(), c, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := prev.Write(path); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(path)
	for _, phase := range []string{"scan", "bigrams", "trigrams", "vocab", "pairs"} {
		t.Run(phase, func(t *testing.T) {
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			spill := t.TempDir()
			opts := Options{MemoryBudget: 1, TempDir: spill, Progress: func(p string, done, total int) {
				if p == phase && done > total/2 {
					cancel()
				}
			}}
			start := time.Now()
			tb, err := Mine(ctx, c, opts)
			if !errors.Is(err, context.Canceled) || tb != nil {
				t.Fatalf("got %v, %v; want context.Canceled", tb, err)
			}
			if d := time.Since(start); d > 5*time.Second {
				t.Errorf("took %v", d)
			}
			if left, _ := os.ReadDir(spill); len(left) != 0 {
				t.Errorf("spill files left: %v", left)
			}
		})
	}
	after, _ := os.ReadFile(path)
	if !bytes.Equal(before, after) {
		t.Error("previous artifact changed")
	}
	if files, _ := os.ReadDir(dir); len(files) != 1 {
		t.Errorf("artifact folder has %d entries", len(files))
	}
}

func TestCounterSpillsOnlyBetweenDocs(t *testing.T) {
	store := newSpillStore(t.TempDir())
	defer store.cleanup()
	c := newCounter(1, store) // minimum capacity
	for doc := uint32(0); doc < 3; doc++ {
		for k := uint64(0); k < 200; k++ { // more keys than minCap in one doc
			c.add(k, doc, 1, 0)
		}
		if err := c.endDoc(); err != nil {
			t.Fatal(err)
		}
	}
	var got []entry
	if err := mergeAll(context.Background(), store, [][]slot{c.finish()}, func(e entry) error {
		got = append(got, e)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	if len(got) != 200 {
		t.Fatalf("%d keys", len(got))
	}
	for i, e := range got {
		if e.key != uint64(i) || e.u != 3 || e.d != 3 {
			t.Fatalf("entry %d = %+v, want key %d u 3 d 3", i, e, i)
		}
	}
}

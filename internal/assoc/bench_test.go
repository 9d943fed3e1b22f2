package assoc

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"testing"
	"time"
)

// zipfSpec is the benchmark corpus: 10k documents, 1-5 paragraphs of 20-80
// tokens, background words from a Zipf law (s = 1.1) over 30k words mixed
// with 50 topics' words; fixed seed.
func zipfSpec(docs int) synthSpec {
	return synthSpec{docs: docs, vocab: 30000, topics: 50, paraLo: 20, paraHi: 80, paras: 5, seed: 42, zipfS: 1.1}
}

var (
	benchOnce   sync.Once
	benchCorpus *MemCorpus
)

func zipfCorpus() *MemCorpus {
	benchOnce.Do(func() { benchCorpus = synthCorpus(zipfSpec(10000)) })
	return benchCorpus
}

func benchMine(b *testing.B, opts Options) { benchMineOn(b, zipfCorpus(), opts) }

var (
	benchGroupsOnce   sync.Once
	benchGroupsCorpus *MemCorpus
)

// groupsSpec is zipfSpec with every tenth document restricted to one of
// four access groups (10% restricted), so Mine builds five scopes.
func groupsSpec(docs int) synthSpec {
	spec := zipfSpec(docs)
	spec.groups = func(i int) []string {
		if i%10 != 0 {
			return nil
		}
		return []string{fmt.Sprintf("group%d", i/10%4)}
	}
	return spec
}

func zipfGroupsCorpus() *MemCorpus {
	benchGroupsOnce.Do(func() { benchGroupsCorpus = synthCorpus(groupsSpec(10000)) })
	return benchGroupsCorpus
}

func benchMineOn(b *testing.B, c *MemCorpus, opts Options) {
	b.ReportAllocs()
	b.ResetTimer()
	var st mineStats
	var tb *Table
	start := time.Now()
	for range b.N {
		var err error
		tb, err = Mine(context.Background(), c, opts)
		if err != nil {
			b.Fatal(err)
		}
		st = tb.stats
	}
	sec := time.Since(start).Seconds()
	b.StopTimer()
	b.ReportMetric(float64(st.toks)*float64(b.N)/sec, "tokens/s")
	b.ReportMetric(float64(st.incr)*float64(b.N)/sec, "pairs/s")
	b.ReportMetric(float64(st.spills), "spills")
	path := filepath.Join(b.TempDir(), "bench.kwassoc")
	if err := tb.Write(path); err != nil {
		b.Fatal(err)
	}
	if fi, err := os.Stat(path); err == nil {
		b.ReportMetric(float64(fi.Size()), "artifact-bytes")
	}
}

// BenchmarkMine times a whole Mine (scan, phrases, vocabulary, pair
// counting, ranking). tokens/s counts the tokens the pair pass reads;
// pairs/s the pair increments (passage pairs plus window pairs).
func BenchmarkMine(b *testing.B) { benchMine(b, Options{}) }

// BenchmarkMineGroups mines the corpus with four restricted groups: the
// open documents are counted once and reused by every group scope.
// Set KINWORD_BENCH_LARGE=1 to also mine 100k documents (about a minute).
func BenchmarkMineGroups(b *testing.B) {
	b.Run("docs=10000", func(b *testing.B) { benchMineOn(b, zipfGroupsCorpus(), Options{}) })
	b.Run("docs=100000", func(b *testing.B) {
		if os.Getenv("KINWORD_BENCH_LARGE") == "" {
			b.Skip("set KINWORD_BENCH_LARGE=1")
		}
		benchMineOn(b, synthCorpus(groupsSpec(100000)), Options{})
	})
}

// BenchmarkMineNoPhrases isolates counting from phrase detection.
func BenchmarkMineNoPhrases(b *testing.B) { benchMine(b, Options{MinPhraseCount: -1}) }

// BenchmarkMineSpill runs with a 4 MiB budget, forcing spills and merges.
func BenchmarkMineSpill(b *testing.B) {
	benchMine(b, Options{MinPhraseCount: -1, MemoryBudget: 4 << 20, TempDir: b.TempDir()})
}

// BenchmarkLoad loads the table of the 10k-document corpus. Set
// KINWORD_BENCH_LARGE=1 to also build and load one of 100k documents (takes
// minutes to build).
func BenchmarkLoad(b *testing.B) {
	b.Run("docs=10000", func(b *testing.B) { benchLoad(b, zipfCorpus()) })
	b.Run("docs=100000", func(b *testing.B) {
		if os.Getenv("KINWORD_BENCH_LARGE") == "" {
			b.Skip("set KINWORD_BENCH_LARGE=1")
		}
		benchLoad(b, synthCorpus(zipfSpec(100000)))
	})
}

func benchLoad(b *testing.B, c Corpus) {
	start := time.Now()
	tb, err := Mine(context.Background(), c, Options{})
	if err != nil {
		b.Fatal(err)
	}
	b.Logf("mined %d docs in %v: %+v", c.NumDocs(), time.Since(start), tb.Info().Scopes)
	path := filepath.Join(b.TempDir(), "bench.kwassoc")
	if err := tb.Write(path); err != nil {
		b.Fatal(err)
	}
	in := tb.Info()
	b.ReportMetric(float64(in.Scopes[0].Neighbours), "neighbours")
	if fi, err := os.Stat(path); err == nil {
		b.SetBytes(fi.Size())
	}
	b.ResetTimer()
	for range b.N {
		if _, err := Load(path); err != nil {
			b.Fatal(err)
		}
	}
}

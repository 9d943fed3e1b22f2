package index

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"kinword/internal/doc"
	"kinword/internal/gen"
	"kinword/internal/text"
)

// Benchmark corpus settings. KINWORD_BENCH_DOCS sets the size; the default
// keeps `go test -bench .` quick, the acceptance runs use 100000.
const (
	benchDocsEnv     = "KINWORD_BENCH_DOCS"
	benchDocsDefault = 10000
	benchSeed        = 20240601 // fixed: every run benchmarks the same corpus
	benchMeanWords   = 200
	benchBatch       = 1000 // documents per Put (and per bleve batch)
)

// benchDocs returns the corpus size from the environment.
func benchDocs(tb testing.TB) int {
	s := os.Getenv(benchDocsEnv)
	if s == "" {
		return benchDocsDefault
	}
	n, err := strconv.Atoi(s)
	if err != nil || n <= 0 {
		tb.Fatalf("%s=%q: want a positive integer", benchDocsEnv, s)
	}
	return n
}

func benchGenOptions(n int) gen.Options {
	return gen.Options{Docs: n, Seed: benchSeed, MeanWords: benchMeanWords}
}

// The corpus is generated once per process, outside every timer, and shared
// by the ingest and search benchmarks.
var (
	corpusOnce sync.Once
	corpusDocs []doc.Document
	corpusErr  error
)

func benchCorpus(tb testing.TB) []doc.Document {
	tb.Helper()
	n := benchDocs(tb)
	corpusOnce.Do(func() {
		corpusDocs = make([]doc.Document, 0, n)
		corpusErr = gen.Generate(context.Background(), benchGenOptions(n), func(d doc.Document) error {
			corpusDocs = append(corpusDocs, d)
			return nil
		})
	})
	if corpusErr != nil {
		tb.Fatal(corpusErr)
	}
	return corpusDocs
}

// ingestKinword Puts docs in batches of benchBatch and commits; it returns
// how long the Commit took.
func ingestKinword(ctx context.Context, ix *Index, docs []doc.Document) (time.Duration, error) {
	for i := 0; i < len(docs); i += benchBatch {
		if err := ix.Put(ctx, docs[i:min(i+benchBatch, len(docs))]); err != nil {
			return 0, err
		}
	}
	t0 := time.Now()
	err := ix.Commit(ctx)
	return time.Since(t0), err
}

// The search benchmarks share one index per process. It lives in a folder
// of its own (a benchmark's TempDir would vanish with that benchmark) that
// TestMain removes.
var (
	sharedOnce sync.Once
	sharedIx   *Index
	sharedDir  string
	sharedErr  error
)

func sharedIndex(tb testing.TB) *Index {
	tb.Helper()
	docs := benchCorpus(tb)
	sharedOnce.Do(func() {
		ctx := context.Background()
		p, err := text.NewPipeline("")
		if err != nil {
			sharedErr = err
			return
		}
		if sharedDir, err = os.MkdirTemp("", "kinword-bench-*"); err != nil {
			sharedErr = err
			return
		}
		ix, err := Open(ctx, sharedDir, Options{Pipeline: p})
		if err != nil {
			sharedErr = err
			return
		}
		if _, err := ingestKinword(ctx, ix, docs); err != nil {
			ix.Close()
			sharedErr = err
			return
		}
		sharedIx = ix
	})
	if sharedErr != nil {
		tb.Fatal(sharedErr)
	}
	return sharedIx
}

func TestMain(m *testing.M) {
	code := m.Run()
	if sharedIx != nil {
		sharedIx.Close()
	}
	if sharedDir != "" {
		os.RemoveAll(sharedDir)
	}
	os.Exit(code)
}

// heapMB returns the live heap after a full collection, in MiB.
func heapMB() float64 {
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	return float64(ms.HeapAlloc) / (1 << 20)
}

// processCPU returns the CPU time (user + system, all threads) the process
// has used, from /proc/self/stat (fields 14 and 15, in USER_HZ ticks of
// 1/100 s, fixed by the Linux ABI). ok is false where /proc is missing, and
// the CPU metrics are then not reported. Other processes sharing the
// machine change CPU time less than they change wall time.
func processCPU() (d time.Duration, ok bool) {
	b, err := os.ReadFile("/proc/self/stat")
	if err != nil {
		return 0, false
	}
	// The command name (field 2) may hold spaces; the fields after it
	// start after the last ')'.
	i := strings.LastIndexByte(string(b), ')')
	if i < 0 {
		return 0, false
	}
	f := strings.Fields(string(b[i+1:])) // f[0] is field 3
	if len(f) < 13 {
		return 0, false
	}
	ut, err1 := strconv.ParseInt(f[11], 10, 64)
	st, err2 := strconv.ParseInt(f[12], 10, 64)
	if err1 != nil || err2 != nil {
		return 0, false
	}
	return time.Duration(ut+st) * 10 * time.Millisecond, true
}

// cpuMeter sums the process CPU time over the timed sections of a
// benchmark.
type cpuMeter struct {
	total time.Duration
	start time.Duration
	ok    bool
}

func (m *cpuMeter) begin() { m.start, m.ok = processCPU() }

func (m *cpuMeter) end() {
	if now, ok := processCPU(); ok && m.ok {
		m.total += now - m.start
	} else {
		m.ok = false
	}
}

// report adds cpu-ms/doc and cores (CPU time over wall time) to b.
func (m *cpuMeter) report(b *testing.B, docs int) {
	if !m.ok || m.total == 0 {
		return
	}
	b.ReportMetric(float64(m.total.Microseconds())/1e3/float64(docs*b.N), "cpu-ms/doc")
	b.ReportMetric(m.total.Seconds()/b.Elapsed().Seconds(), "cores")
}

// percentile returns the nearest-rank p-th percentile (0 < p <= 100) of
// sorted: the smallest value with at least p% of the values at or below it.
func percentile[T int64 | float64](sorted []T, p float64) T {
	if len(sorted) == 0 {
		return 0
	}
	r := int(math.Ceil(p / 100 * float64(len(sorted))))
	return sorted[min(max(r, 1), len(sorted))-1]
}

// Query classes of the search benchmark. Mid-frequency words are content
// words (stopwords removed) of rank 300-3000 in the generator's
// vocabulary: under its Zipf law (s = 1.07) they fall in roughly 5% down to
// 0.5% of documents. The common word is one of content ranks 5-20, in
// roughly a quarter to a third of documents.
const (
	queriesPerClass = 200
	midLo, midHi    = 300, 3000 // content-word ranks, 1-based, inclusive
	commonLo        = 5
	commonHi        = 20
	querySeed       = 7
)

// queryClass is a named, fixed list of query strings.
type queryClass struct {
	name    string
	queries []string
}

// benchQueries draws the query classes deterministically from the
// vocabulary: for 1, 2 and 3 mid-frequency words, queriesPerClass queries,
// each also with one common word added (same mid words, so the two classes
// are paired). Words in one query have distinct stems.
func benchQueries(tb testing.TB, p *text.Pipeline) []queryClass {
	tb.Helper()
	g, err := gen.New(benchGenOptions(1))
	if err != nil {
		tb.Fatal(err)
	}
	var content []string
	for _, w := range g.Vocabulary() {
		if p.Keep(w, "") {
			content = append(content, w)
		}
	}
	if len(content) < midHi {
		tb.Fatalf("vocabulary has %d content words, want at least %d", len(content), midHi)
	}
	mid, common := content[midLo-1:midHi], content[commonLo-1:commonHi]
	rng := rand.New(rand.NewPCG(querySeed, 0))
	var out []queryClass
	for n := 1; n <= 3; n++ {
		plain := queryClass{name: fmt.Sprintf("%dw", n)}
		plus := queryClass{name: fmt.Sprintf("%dw+common", n)}
		for range queriesPerClass {
			var words, stems []string
			for len(words) < n {
				w := mid[rng.IntN(len(mid))]
				if st := p.Key(w, ""); !slices.Contains(stems, st) {
					words, stems = append(words, w), append(stems, st)
				}
			}
			plain.queries = append(plain.queries, strings.Join(words, " "))
			c := common[rng.IntN(len(common))]
			for slices.Contains(stems, p.Key(c, "")) {
				c = common[rng.IntN(len(common))]
			}
			plus.queries = append(plus.queries, strings.Join(append(words, c), " "))
		}
		out = append(out, plain, plus)
	}
	return out
}

// TestPercentileNearestRank checks the nearest-rank percentile against the
// worked example of the nearest-rank method in Wikipedia's "Percentile"
// article (list 15, 20, 35, 40, 50; from memory).
func TestPercentileNearestRank(t *testing.T) {
	data := []float64{15, 20, 35, 40, 50}
	cases := []struct {
		name string
		p    float64
		want float64
	}{
		{"5th", 5, 15},
		{"30th", 30, 20},
		{"40th", 40, 20},
		{"50th", 50, 35},
		{"100th", 100, 50},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := percentile(data, c.p); got != c.want {
				t.Errorf("percentile(%v) = %v, want %v", c.p, got, c.want)
			}
		})
	}
}

// loadAvg returns the 1-minute load average (Linux), so a log shows whether
// other work shared the machine during a measurement.
func loadAvg() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "unknown"
	}
	if f := strings.Fields(string(b)); len(f) > 0 {
		return f[0]
	}
	return "unknown"
}

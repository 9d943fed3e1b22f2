package index

// Ingest and top-10 search benchmarks on the synthetic corpus of
// internal/gen. The corpus size comes from KINWORD_BENCH_DOCS (default
// 10000); the acceptance run is
//
//	KINWORD_BENCH_DOCS=100000 go test ./internal/index -run XXX \
//	    -bench 'Ingest|SearchTop10' -benchtime 1x -count 1 -timeout 60m
//
// None of these benchmarks asserts a time: they report docs/s, latency
// percentiles and ratios for people to judge.

import (
	"context"
	"fmt"
	"os"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/blevesearch/bleve/v2"
	"github.com/blevesearch/bleve/v2/analysis/analyzer/standard"
	"github.com/blevesearch/bleve/v2/mapping"

	"kinword/internal/access"
	"kinword/internal/rank"
	"kinword/internal/text"
)

// BenchmarkIngest measures Put in batches of 1000 plus the final Commit of
// the whole corpus into a fresh index. Generating the corpus, opening the
// index and closing it are outside the timer; close-s reports the close.
func BenchmarkIngest(b *testing.B) {
	docs := benchCorpus(b)
	p, err := text.NewPipeline("")
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	var closeTime time.Duration
	var heap float64
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		base := heapMB()
		dir, err := os.MkdirTemp(b.TempDir(), "ingest-*")
		if err != nil {
			b.Fatal(err)
		}
		ix, err := Open(ctx, dir, Options{Pipeline: p})
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		if err := ingestKinword(ctx, ix, docs); err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		if ix.Len() != len(docs) {
			b.Fatalf("index holds %d documents, want %d", ix.Len(), len(docs))
		}
		heap = heapMB() - base
		t0 := time.Now()
		if err := ix.Close(); err != nil {
			b.Fatal(err)
		}
		closeTime += time.Since(t0)
		os.RemoveAll(dir)
		b.StartTimer()
	}
	b.StopTimer()
	b.ReportMetric(float64(len(docs)*b.N)/b.Elapsed().Seconds(), "docs/s")
	b.ReportMetric(closeTime.Seconds()/float64(b.N), "close-s")
	b.ReportMetric(heap, "heap-MB")
}

// bleveOnlyMapping is a plain bleve mapping: title and body as text fields
// with the standard analyzer. "defaults" keeps bleve's text-field defaults
// (stored, term vectors, doc values, included in _all); "lean" keeps only
// what Kinword's own bleve mapping keeps for its content field plus stored
// text (no term vectors, no _all), the closer comparison.
func bleveOnlyMapping(lean bool) *mapping.IndexMappingImpl {
	im := bleve.NewIndexMapping()
	im.DefaultAnalyzer = standard.Name
	dm := bleve.NewDocumentStaticMapping()
	for _, f := range []string{fieldTitle, fieldBody} {
		fm := bleve.NewTextFieldMapping()
		fm.Analyzer = standard.Name
		if lean {
			fm.IncludeTermVectors = false
			fm.IncludeInAll = false
		}
		dm.AddFieldMappingsAt(f, fm)
	}
	im.DefaultMapping = dm
	return im
}

// BenchmarkIngestBleveOnly indexes the same documents with bleve alone, in
// batches of 1000, for the ratio to BenchmarkIngest.
func BenchmarkIngestBleveOnly(b *testing.B) {
	docs := benchCorpus(b)
	for _, variant := range []string{"defaults", "lean"} {
		b.Run(variant, func(b *testing.B) {
			var closeTime time.Duration
			var heap float64
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				b.StopTimer()
				base := heapMB()
				dir, err := os.MkdirTemp(b.TempDir(), "bleve-*")
				if err != nil {
					b.Fatal(err)
				}
				bi, err := bleve.New(dir+"/idx", bleveOnlyMapping(variant == "lean"))
				if err != nil {
					b.Fatal(err)
				}
				b.StartTimer()
				for s := 0; s < len(docs); s += benchBatch {
					batch := bi.NewBatch()
					for _, d := range docs[s:min(s+benchBatch, len(docs))] {
						if err := batch.Index(d.ID, map[string]interface{}{fieldTitle: d.Title, fieldBody: d.Body}); err != nil {
							b.Fatal(err)
						}
					}
					if err := bi.Batch(batch); err != nil {
						b.Fatal(err)
					}
				}
				b.StopTimer()
				if n, err := bi.DocCount(); err != nil || n != uint64(len(docs)) {
					b.Fatalf("bleve holds %d documents (%v), want %d", n, err, len(docs))
				}
				heap = heapMB() - base
				t0 := time.Now()
				if err := bi.Close(); err != nil {
					b.Fatal(err)
				}
				closeTime += time.Since(t0)
				os.RemoveAll(dir)
				b.StartTimer()
			}
			b.StopTimer()
			b.ReportMetric(float64(len(docs)*b.N)/b.Elapsed().Seconds(), "docs/s")
			b.ReportMetric(closeTime.Seconds()/float64(b.N), "close-s")
			b.ReportMetric(heap, "heap-MB")
		})
	}
}

// searchFunc runs one query string for one viewer and returns the hits.
type searchFunc func(ctx context.Context, v access.Viewer, q string) ([]Hit, error)

// kinwordSearch is the whole Kinword request path: take a view, parse the
// query through the pipeline, rank with BM25 (bleve's path analyses the
// words too, so both sides include analysis).
func kinwordSearch(ix *Index) searchFunc {
	return func(ctx context.Context, v access.Viewer, s string) ([]Hit, error) {
		q, err := ParseQuery(ix.Pipeline(), s, QueryLimits{})
		if err != nil {
			return nil, err
		}
		res, err := ix.View(v).Search(ctx, q, rank.BM25{}, 10)
		return res.Hits, err
	}
}

func bleveSearch(ix *Index) searchFunc {
	return func(ctx context.Context, v access.Viewer, s string) ([]Hit, error) {
		return ix.BleveSearch(ctx, v, s, 10)
	}
}

// latencies is what one search sub-benchmark measured.
type latencies struct{ p50, p99 float64 } // microseconds

// runQueries is the body of one search sub-benchmark: one untimed warm-up
// pass, then b.N passes over the class's queries, each query timed on its
// own. p50-us and p99-us are nearest-rank percentiles over all
// b.N x len(queries) latencies; ns/op is the cost of one pass.
func runQueries(b *testing.B, search searchFunc, v access.Viewer, queries []string) latencies {
	ctx := context.Background()
	for _, q := range queries {
		hits, err := search(ctx, v, q)
		if err != nil {
			b.Fatal(err)
		}
		if len(hits) == 0 {
			b.Fatalf("query %q found nothing", q)
		}
	}
	lat := make([]float64, 0, b.N*len(queries))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for _, q := range queries {
			t0 := time.Now()
			if _, err := search(ctx, v, q); err != nil {
				b.Fatal(err)
			}
			lat = append(lat, float64(time.Since(t0).Nanoseconds())/1e3)
		}
	}
	b.StopTimer()
	slices.Sort(lat)
	l := latencies{p50: percentile(lat, 50), p99: percentile(lat, 99)}
	b.ReportMetric(l.p50, "p50-us")
	b.ReportMetric(l.p99, "p99-us")
	return l
}

// BenchmarkSearchTop10 compares Kinword's top-10 BM25 search with bleve's
// own on one shared index, per query class and viewer. The bleve
// sub-benchmark also reports p99-kw/bl, the p99 ratio kinword/bleve, and
// logs both sides' percentiles, the document frequencies of the query
// words, the mean top-10 overlap of the two rankings (they differ by
// design: see TestBleveScoringDiffersFromTextbook) and the load average.
// Latencies are wall-clock: other processes on the machine inflate the
// tails, so compare runs made on a quiet machine.
func BenchmarkSearchTop10(b *testing.B) {
	ix := sharedIndex(b)
	classes := benchQueries(b, ix.Pipeline())
	viewers := []struct {
		name string
		v    access.Viewer
	}{
		{"anon", access.Anonymous},
		{"group", access.Viewer{Groups: []string{"executive"}}},
	}
	for _, c := range classes {
		b.Run(c.name, func(b *testing.B) {
			for _, vw := range viewers {
				b.Run(vw.name, func(b *testing.B) {
					var kw latencies
					b.Run("kinword", func(b *testing.B) { kw = runQueries(b, kinwordSearch(ix), vw.v, c.queries) })
					b.Run("bleve", func(b *testing.B) {
						bl := runQueries(b, bleveSearch(ix), vw.v, c.queries)
						if kw.p99 == 0 {
							return // kinword filtered out by -bench
						}
						b.ReportMetric(kw.p99/bl.p99, "p99-kw/bl")
						b.Logf("%s %s: p50 kinword %.1f us, bleve %.1f us; p99 kinword %.1f us, bleve %.1f us; p99 ratio kinword/bleve %.3f; %s; loadavg %s",
							c.name, vw.name, kw.p50, bl.p50, kw.p99, bl.p99, kw.p99/bl.p99, describeClass(b, ix, vw.v, c.queries), loadAvg())
					})
				})
			}
		})
	}
}

// describeClass reports, outside any timer, the median document frequency
// (readable by v) of the class's query words and the mean overlap of the
// Kinword and bleve top-10 sets.
func describeClass(b *testing.B, ix *Index, v access.Viewer, queries []string) string {
	ctx := context.Background()
	w := ix.View(v)
	var dfs []int
	overlap := 0
	for _, q := range queries {
		for _, word := range strings.Fields(q) {
			dfs = append(dfs, w.KeyDF(ix.Pipeline().Key(word, "")))
		}
		kh, err := kinwordSearch(ix)(ctx, v, q)
		if err != nil {
			b.Fatal(err)
		}
		bh, err := bleveSearch(ix)(ctx, v, q)
		if err != nil {
			b.Fatal(err)
		}
		ids := map[string]bool{}
		for _, h := range kh {
			ids[h.ID] = true
		}
		for _, h := range bh {
			if ids[h.ID] {
				overlap++
			}
		}
	}
	slices.Sort(dfs)
	return fmt.Sprintf("N %d, word df min %d median %d max %d, mean top-10 overlap %.1f",
		w.N(), dfs[0], dfs[len(dfs)/2], dfs[len(dfs)-1], float64(overlap)/float64(len(queries)))
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

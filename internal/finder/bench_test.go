package finder

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"slices"
	"sort"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/index"
	"kinword/internal/suggest"
	"kinword/internal/text"
)

// BenchmarkLatency compares, on the same queries in the same run, plain
// BM25 top-10, search with suggestions (what the search page asks for),
// and the search a searcher gets after accepting five suggestions. It
// needs a data folder from `kinword ingest` and `kinword mine` in
// KINWORD_BENCH_DATA (e.g. the 100,000-document synthetic corpus of
// `kinword gen --docs 100000 --seed 7`); without it, it skips. Queries are
// 1 to 3 words drawn with a fixed seed from the terms of the corpus's
// documents. Each sub-benchmark reports the median and p99 per query in
// ms; the suggestion cache is off so every request computes its
// suggestions. search and expanded-5-search are retrieval alone (BM25
// top-10, the query as typed and with five accepted terms added);
// suggestions is the finder's suggestion path without results;
// suggest-engine is the suggestion engine alone over first-pass results
// computed beforehand; search-with-suggestions and expanded-5 are whole
// page requests (results with snippets and suggestions); paired times
// search and suggestions alternately on each query and reports their
// ratios, the figure to quote on a noisy machine. Repeat by running the
// command again rather than with -count: later runs in one process, which
// open the finder again after the first closed it, come out slower.
//
//	KINWORD_BENCH_DATA=/tmp/k100k go test ./internal/finder -run XXX -bench Latency -benchtime 2000x
func BenchmarkLatency(b *testing.B) {
	dir := os.Getenv("KINWORD_BENCH_DATA")
	if dir == "" {
		b.Skip("KINWORD_BENCH_DATA is not set: give it a data folder of `kinword ingest` and `kinword mine`")
	}
	ctx := context.Background()
	p, _ := text.NewPipeline("")
	f, err := Open(ctx, dir, p, Options{CacheTTL: -1})
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	<-f.st.Load().warmed // as a server is some seconds after start
	v := access.Anonymous
	view := f.ix.View(v)
	queries, accepted := benchQueries(b, f, view)
	parsed := make([][]index.QueryTerm, len(queries))
	for i, q := range queries {
		if parsed[i], err = index.ParseQuery(p, q, f.opts.Limits); err != nil {
			b.Fatal(err)
		}
	}
	measure := func(b *testing.B, one func(i int)) {
		lat := make([]time.Duration, 0, b.N)
		b.ResetTimer()
		for i := range b.N {
			t0 := time.Now()
			one(i % len(queries))
			lat = append(lat, time.Since(t0))
		}
		b.StopTimer()
		p50, p99 := percentiles(lat)
		b.ReportMetric(ms(p50), "p50-ms")
		b.ReportMetric(ms(p99), "p99-ms")
	}
	b.Run("search", func(b *testing.B) {
		measure(b, func(i int) {
			if _, err := view.Search(ctx, parsed[i], f.opts.BM25, 10); err != nil {
				b.Fatal(err)
			}
		})
	})
	// search-top-50 is search ranking the feedback pool's 50 rather than
	// 10: what every suggestion request paid before the pool was kept for
	// learning.
	b.Run("search-top-50", func(b *testing.B) {
		measure(b, func(i int) {
			if _, err := view.Search(ctx, parsed[i], f.opts.BM25, 50); err != nil {
				b.Fatal(err)
			}
		})
	})
	// paired times plain search and the suggestion path on each query in
	// turn, so both meet the same moments of a noisy machine; it reports
	// each one's median and p99 and the ratios suggestions/search.
	b.Run("paired", func(b *testing.B) {
		plain := make([]time.Duration, 0, b.N)
		sugg := make([]time.Duration, 0, b.N)
		b.ResetTimer()
		for n := range b.N {
			i := n % len(queries)
			t0 := time.Now()
			if _, err := view.Search(ctx, parsed[i], f.opts.BM25, 10); err != nil {
				b.Fatal(err)
			}
			t1 := time.Now()
			if _, err := f.Search(ctx, Request{Query: queries[i], Viewer: v}); err != nil {
				b.Fatal(err)
			}
			plain, sugg = append(plain, t1.Sub(t0)), append(sugg, time.Since(t1))
		}
		b.StopTimer()
		s50, s99 := percentiles(plain)
		g50, g99 := percentiles(sugg)
		b.ReportMetric(ms(s50), "search-p50-ms")
		b.ReportMetric(ms(s99), "search-p99-ms")
		b.ReportMetric(ms(g50), "sugg-p50-ms")
		b.ReportMetric(ms(g99), "sugg-p99-ms")
		b.ReportMetric(float64(g50)/float64(s50), "p50-ratio")
		b.ReportMetric(float64(g99)/float64(s99), "p99-ratio")
	})
	b.Run("suggestions", func(b *testing.B) {
		measure(b, func(i int) {
			if _, err := f.Search(ctx, Request{Query: queries[i], Viewer: v}); err != nil {
				b.Fatal(err)
			}
		})
	})
	// The suggestion engine alone, over first-pass results computed
	// beforehand: the cost suggestions add to a search.
	first := make([][]suggest.Hit, len(queries))
	for i := range queries {
		res, err := view.Search(ctx, parsed[i], f.opts.BM25, f.opts.FeedbackDocs)
		if err != nil {
			b.Fatal(err)
		}
		first[i] = feedback(res.Hits, f.opts.FeedbackDocs)
	}
	eng := f.st.Load().eng
	b.Run("suggest-engine", func(b *testing.B) {
		measure(b, func(i int) {
			eng.Suggest(view, suggest.Request{Query: toSuggest(parsed[i]), Viewer: v, Feedback: first[i], K: f.opts.Suggestions})
		})
	})
	b.Run("search-with-suggestions", func(b *testing.B) {
		measure(b, func(i int) {
			if _, err := f.Search(ctx, Request{Query: queries[i], Viewer: v, WithResults: true}); err != nil {
				b.Fatal(err)
			}
		})
	})
	expanded := make([][]index.QueryTerm, len(queries))
	for i := range queries {
		for _, t := range suggest.Expand(toSuggest(parsed[i]), accepted[i], f.opts.AcceptWeight) {
			expanded[i] = append(expanded[i], index.QueryTerm{Key: t.Key, Weight: t.Weight})
		}
	}
	b.Run("expanded-5-search", func(b *testing.B) {
		measure(b, func(i int) {
			if _, err := view.Search(ctx, expanded[i], f.opts.BM25, 10); err != nil {
				b.Fatal(err)
			}
		})
	})
	b.Run("expanded-5", func(b *testing.B) {
		measure(b, func(i int) {
			if _, err := f.Search(ctx, Request{Query: queries[i], Viewer: v, WithResults: true, Accepted: accepted[i]}); err != nil {
				b.Fatal(err)
			}
		})
	})
}

// percentiles sorts lat and returns its median and 99th percentile.
func percentiles(lat []time.Duration) (p50, p99 time.Duration) {
	slices.Sort(lat)
	return lat[len(lat)/2], lat[len(lat)*99/100]
}

// ms is d in milliseconds, to the microsecond.
func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1000 }

// benchQueries draws 500 queries of 1-3 words (fixed seed) from document
// terms, with the five suggestions each gets as its accepted terms.
func benchQueries(b *testing.B, f *Finder, view *index.View) ([]string, [][]string) {
	rng := rand.New(rand.NewPCG(7, 7))
	var qs []string
	var acc [][]string
	for len(qs) < 500 {
		d := uint32(rng.IntN(view.NumDocs()))
		tv := view.TermVector(d)
		if len(tv) < 10 {
			continue
		}
		sort.Slice(tv, func(i, j int) bool { return tv[i].TF > tv[j].TF })
		n := 1 + rng.IntN(3)
		q := ""
		for k := range n {
			q += " " + view.Display(view.Term(tv[rng.IntN(min(10, len(tv)))].Term))
			_ = k
		}
		res, err := f.Search(context.Background(), Request{Query: q, Viewer: access.Anonymous})
		if err != nil || len(res.Suggestions) == 0 {
			continue
		}
		var keys []string
		for _, s := range res.Suggestions {
			keys = append(keys, s.Term)
		}
		qs = append(qs, q)
		acc = append(acc, keys)
	}
	if len(qs) == 0 {
		b.Fatal(fmt.Errorf("no queries"))
	}
	return qs, acc
}

package store

import (
	"context"
	"fmt"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// BenchmarkAppend measures committed events per second with 1 and 16
// concurrent appenders of 20-event batches. One b.N iteration is one batch.
func BenchmarkAppend(b *testing.B) {
	for _, be := range backends() {
		for _, conc := range []int{1, 16} {
			b.Run(fmt.Sprintf("%s/appenders=%d", be.name, conc), func(b *testing.B) {
				benchAppend(b, be, conc)
			})
		}
	}
}

var benchRun atomic.Int64

func benchAppend(b *testing.B, be backend, conc int) {
	const perBatch = 20
	s, err := Open(context.Background(), be.dsn(b))
	if err != nil {
		b.Fatal(err)
	}
	defer s.Close()
	ctx := context.Background()
	run := benchRun.Add(1)
	imp := fmt.Sprintf("bench-%d", run)
	if err := s.Append(ctx, []Event{impression(imp, t0, "a", "b", "c")}); err != nil {
		b.Fatal(err)
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	var failed atomic.Value
	b.ResetTimer()
	start := time.Now()
	for g := 0; g < conc; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			batch := make([]Event, perBatch)
			for {
				k := next.Add(1)
				if k > int64(b.N) {
					return
				}
				for j := range batch {
					batch[j] = accept(fmt.Sprintf("b%d-%d-%d", run, k, j), imp, "b", 1, t0)
				}
				if err := s.Append(ctx, batch); err != nil {
					failed.Store(err)
					return
				}
			}
		}()
	}
	wg.Wait()
	elapsed := time.Since(start)
	b.StopTimer()
	if err, ok := failed.Load().(error); ok {
		b.Fatal(err)
	}
	b.ReportMetric(float64(b.N*perBatch)/elapsed.Seconds(), "events/s")
	b.ReportMetric(float64(s.batches.Load())/float64(s.groups.Load()), "batches/commit")
}

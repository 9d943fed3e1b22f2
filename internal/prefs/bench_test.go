package prefs

import (
	"fmt"
	"math/rand/v2"
	"sync"
	"testing"
	"time"
)

// syntheticLog is a deterministic log of n events: about 85% impressions of
// five suggestions and 15% accepts, over 20 departments, 500 two-stem
// queries, 40 terms, n/10 sessions and 90 days.
func syntheticLog(n int) []Event {
	rng := rand.New(rand.NewPCG(5, 8))
	evs := make([]Event, 0, n)
	for len(evs) < n {
		s := rng.IntN(n/10 + 1)
		dept := fmt.Sprint("d", s%20)
		qi := rng.IntN(500)
		q := fmt.Sprintf("q%03d q%03d", qi%100, 100+qi/5)
		at := now.Add(-time.Duration(rng.IntN(90*24)) * time.Hour)
		shown := make([]string, 5)
		for i := range shown {
			shown[i] = fmt.Sprint("t", rng.IntN(40))
		}
		sess := fmt.Sprint("s", s)
		evs = append(evs, Event{Kind: KindImpression, Time: at, Session: sess, Department: dept, Query: q, Shown: shown})
		if rng.Float64() < 0.18 {
			k := rng.IntN(5)
			evs = append(evs, Event{Kind: KindAccept, Time: at, Session: sess, Department: dept, Query: q, Term: shown[k], Position: k})
		}
	}
	return evs[:n]
}

func BenchmarkBuild100k(b *testing.B) {
	evs := syntheticLog(100000)
	b.ReportAllocs()
	for b.Loop() {
		Build(evs, now, Options{})
	}
}

func BenchmarkRank(b *testing.B) {
	evs := syntheticLog(100000)
	m := Build(evs, now, Options{})
	cands := make([]Candidate, 20)
	for i := range cands {
		cands[i] = Candidate{Term: fmt.Sprint("t", i), Content: 1 / float64(i+1)}
	}
	q := evs[0].Query
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		m.Rank("d0", q, cands, fmt.Sprint("imp", i))
		i++
	}
}

func TestBuildOrderIndependent(t *testing.T) {
	// Deterministic output (house rule): shuffling the log changes nothing.
	evs := syntheticLog(5000)
	shuffled := append([]Event(nil), evs...)
	rand.New(rand.NewPCG(1, 1)).Shuffle(len(shuffled), func(i, j int) {
		shuffled[i], shuffled[j] = shuffled[j], shuffled[i]
	})
	a, b := Build(evs, now, Options{}), Build(shuffled, now, Options{})
	cands := []Candidate{{"t1", 1}, {"t2", 0.5}, {"t3", 0.25}}
	for _, ev := range evs[:200] {
		ra, rb := a.Rank(ev.Department, ev.Query, cands, ev.Session), b.Rank(ev.Department, ev.Query, cands, ev.Session)
		if fmt.Sprint(ra) != fmt.Sprint(rb) {
			t.Fatalf("order-dependent result:\n%v\n%v", ra, rb)
		}
	}
}

func TestBuilderStreaming(t *testing.T) {
	// A streaming Builder gives the same model as Build, Snapshot leaves it
	// usable, and later events do not leak into an earlier snapshot.
	evs := syntheticLog(3000)
	cands := []Candidate{{"t1", 1}, {"t2", 0.5}, {"t3", 0.25}}
	b := NewBuilder(Options{})
	for _, ev := range evs[:1500] {
		b.Add(ev)
	}
	early := b.Snapshot(now)
	earlyRef := Build(evs[:1500], now, Options{})
	for _, ev := range evs[1500:] {
		b.Add(ev)
	}
	late, lateRef := b.Snapshot(now), Build(evs, now, Options{})
	for _, ev := range evs[:100] {
		pairs := [][2]*Model{{early, earlyRef}, {late, lateRef}}
		for i, p := range pairs {
			x, y := p[0].Rank(ev.Department, ev.Query, cands, ev.Session), p[1].Rank(ev.Department, ev.Query, cands, ev.Session)
			if fmt.Sprint(x) != fmt.Sprint(y) {
				t.Fatalf("snapshot %d differs from Build:\n%v\n%v", i, x, y)
			}
		}
	}
}

func TestConcurrentRank(t *testing.T) {
	// Model is immutable: concurrent readers are race-free (run with -race).
	m := Build(syntheticLog(2000), now, Options{})
	cands := []Candidate{{"t1", 1}, {"t2", 0.5}}
	var wg sync.WaitGroup
	for g := range 4 {
		wg.Go(func() {
			for i := range 200 {
				m.Rank(fmt.Sprint("d", g), "q001 q100", cands, fmt.Sprint(g, i))
				m.Acceptance("d0", "q001 q100", "t1")
			}
		})
	}
	wg.Wait()
}

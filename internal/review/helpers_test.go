package review

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
	"time"
)

var t0 = time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)

func at(d time.Duration) time.Time { return t0.Add(d) }

// shown is an impression event; hits < 0 means unknown.
func shown(id, sess, dept, query string, when time.Time, hits int, terms ...string) Event {
	return Event{Kind: KindImpression, Impression: id, Time: when, Session: sess, Department: dept,
		Query: query, Hits: hits, Terms: terms}
}

func accepted(imp, term string, when time.Time) Event {
	return Event{Kind: KindAccept, Impression: imp, Term: term, Time: when}
}

func dismissed(imp, term string, when time.Time) Event {
	return Event{Kind: KindDismiss, Impression: imp, Term: term, Time: when}
}

func clicked(imp, sess, query string, when time.Time, terms ...string) Event {
	return Event{Kind: KindClick, Impression: imp, Session: sess, Query: query, Time: when, Doc: "doc-1", Terms: terms}
}

// reciprocal is the propensity 1/(k+1), which keeps hand arithmetic exact.
func reciprocal(pos int) float64 { return 1 / float64(pos+1) }

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

// findRow returns the Terms (query "") or Pairs row of (dept, query, term).
func findRow(t *testing.T, r *Report, dept, query, term string) TermRow {
	t.Helper()
	rows := r.Terms
	if query != "" {
		rows = r.Pairs
	}
	for _, x := range rows {
		if x.Department == dept && x.Query == query && x.Term == term {
			return x
		}
	}
	t.Fatalf("no row %q/%q/%q", dept, query, term)
	return TermRow{}
}

// synth makes n synthetic events with a fixed seed: sessions of a few
// searches, 8 terms per impression from a per-query pool of 24, accepts falling with position, some
// dismissals, zero-hit and empty impressions, clicks after accepts and
// refreshed impressions. Times are distinct and increasing.
func synth(n int, seed uint64) []Event {
	rng := rand.New(rand.NewPCG(seed, 0x7a2e))
	depts := []string{"operations", "finance", "customer-care", "engineering"}
	out := make([]Event, 0, n+16)
	clock := t0
	tick := func() time.Time { clock = clock.Add(time.Duration(1+rng.IntN(3000)) * time.Millisecond); return clock }
	for s := 0; len(out) < n; s++ {
		sess := "s" + strconv.Itoa(s)
		dept := depts[rng.IntN(len(depts))]
		for range 1 + rng.IntN(3) {
			qi := int(math.Sqrt(float64(rng.IntN(250000)))) // skewed over 500 queries
			q := "q" + strconv.Itoa(qi)
			id := "i" + strconv.Itoa(len(out))
			hits := 1 + rng.IntN(40)
			if rng.IntN(20) == 0 {
				hits = 0
			}
			var terms []string
			if rng.IntN(50) != 0 {
				// Each query draws from its own pool of 24 of the 2,000 terms.
				off := rng.IntN(24)
				for k := range 8 {
					j := (off + 3*k) % 24
					terms = append(terms, "t"+strconv.Itoa((qi*13+j*7)%2000))
				}
			}
			out = append(out, shown(id, sess, dept, q, tick(), hits, terms...))
			for k, term := range terms {
				switch u := rng.Float64(); {
				case u < 0.3/float64(k+1):
					out = append(out, accepted(id, term, tick()))
					id2 := id + "b" + strconv.Itoa(k)
					out = append(out, shown(id2, sess, dept, q, tick(), 1+rng.IntN(10), terms...))
					if rng.IntN(2) == 0 {
						out = append(out, clicked(id2, sess, q, tick(), term))
					}
				case u > 0.95:
					out = append(out, dismissed(id, term, tick()))
				}
			}
		}
	}
	return out
}

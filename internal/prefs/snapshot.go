package prefs

import (
	"cmp"
	"maps"
	"math"
	"slices"
	"time"
)

// stats are the sufficient statistics of one pair at one level.
type stats struct {
	A, E     float64 // decayed IPW accepts, decayed examinations
	Sessions int     // distinct sessions that saw the pair
}

// fixScale is the fixed-point scale of the accumulators: sums of integers
// do not depend on the order of addition, so a Snapshot is bit-for-bit
// reproducible despite Go's random map order (resolution 2^-32 per unit;
// weights are at most 1/PropensityFloor, far from overflow).
const fixScale = 1 << 32

// acc is the fixed-point accumulator of one pair at one level.
type acc struct {
	a, e     int64
	sessions int
}

func (s acc) stats() stats {
	return stats{A: float64(s.a) / fixScale, E: float64(s.e) / fixScale, Sessions: s.sessions}
}

// table is an indexed set of accumulators keyed by packed ids.
type table struct {
	idx  map[uint64]int32
	accs []acc
}

func newTable(n int) table { return table{idx: make(map[uint64]int32, n)} }

func (t *table) slot(key uint64) *acc {
	i, ok := t.idx[key]
	if !ok {
		i = int32(len(t.accs))
		t.idx[key] = i
		t.accs = append(t.accs, acc{})
	}
	return &t.accs[i]
}

func (t *table) get(key uint64) stats {
	if i, ok := t.idx[key]; ok {
		return t.accs[i].stats()
	}
	return stats{}
}

// Snapshot computes the model as of now. Each unit weighs
// DecayWeight(now − time, HalfLife); an accept unit additionally weighs
// 1/p(position) (inverse propensity weighting; Joachims, Swaminathan &
// Schnabel, WSDM 2017, IPS estimator: a click observed with examination
// probability p counts 1/p). Examinations are not propensity-weighted, so
// A/E estimates the position-free accept rate under the examination
// hypothesis P(accept at k) = p_k · r. The Builder stays usable.
func (b *Builder) Snapshot(now time.Time) *Model {
	nowNs := now.UnixNano()
	org := table{idx: maps.Clone(b.qtIdx), accs: make([]acc, len(b.qtKeys))}
	dept := newTable(len(b.qtKeys))
	qt := newTable(len(b.qtKeys))
	// Visit records grouped by session so the "seen" set of the
	// query-term level stays small (and in cache): cleared per session.
	order := make([]int32, len(b.recs))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(x, y int32) int {
		return cmp.Or(cmp.Compare(b.recs[x].ds, b.recs[y].ds), cmp.Compare(b.recs[x].qt, b.recs[y].qt))
	})
	seen := make(map[uint64]struct{})
	lastDS := int32(-1)
	qterms := make(map[int32][]int32)
	rev := make([]string, len(b.names))
	for s, id := range b.names {
		rev[id] = s
	}
	for _, ri := range order {
		rec := &b.recs[ri]
		if rec.ds != lastDS {
			clear(seen)
			lastDS = rec.ds
		}
		var a, e int64
		for _, u := range rec.units {
			w := DecayWeight(time.Duration(nowNs-u.at), b.opts.HalfLife)
			if u.accept {
				a += int64(math.Round(w / b.opts.propensity(u.pos) * fixScale))
			} else {
				e += int64(math.Round(w * fixScale))
			}
		}
		deptID := int32(b.dsKeys[rec.ds] >> 32)
		query, term := int32(b.qtKeys[rec.qt]>>32), int32(uint32(b.qtKeys[rec.qt]))
		// Each record is one (department, session): a new distinct session
		// for its department and organisation totals.
		for _, s := range []*acc{&org.accs[rec.qt], dept.slot(pack(deptID, rec.qt))} {
			s.a += a
			s.e += e
			s.sessions++
		}
		ts, ok := qterms[query]
		if !ok {
			for _, t := range queryTerms(rev[query], nil) {
				ts = append(ts, b.intern(t))
			}
			qterms[query] = ts
		}
		for _, t := range ts {
			s := qt.slot(pack(t, term))
			s.a += a
			s.e += e
			// A session may see several queries sharing t: count it once.
			if _, dup := seen[pack(t, term)]; !dup {
				seen[pack(t, term)] = struct{}{}
				s.sessions++
			}
		}
	}
	return &Model{opts: b.opts, names: maps.Clone(b.names), dept: dept, org: org, qt: qt,
		snip: buildSnippets(b.snippets, b.opts, now)}
}

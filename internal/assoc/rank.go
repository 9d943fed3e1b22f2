package assoc

import (
	"context"
	"slices"
)

// cand is a neighbour candidate in a term's top-K heap.
type cand struct {
	score            float64
	nb, k11, win, sp uint32
}

// worse reports whether a ranks below b: lower score, or equal score and
// larger table ID (table IDs follow key order).
func worse(a, b cand) bool {
	if a.score != b.score {
		return a.score < b.score
	}
	return a.nb > b.nb
}

// topK keeps, per term, the K best candidates in a min-heap.
type topK struct {
	k     int
	heaps [][]cand
}

func (t *topK) offer(term uint32, c cand) {
	h := t.heaps[term]
	if len(h) < t.k {
		if len(h) == cap(h) { // grow to at most k, never past it (append would round up)
			g := make([]cand, len(h), min(max(2*cap(h), 4), t.k))
			copy(g, h)
			h = g
		}
		h = append(h, c)
		for i := len(h) - 1; i > 0; {
			p := (i - 1) / 2
			if !worse(h[i], h[p]) {
				break
			}
			h[i], h[p] = h[p], h[i]
			i = p
		}
		t.heaps[term] = h
		return
	}
	if !worse(h[0], c) {
		return
	}
	h[0] = c
	for i := 0; ; {
		l := 2*i + 1
		if l >= len(h) {
			break
		}
		m := l
		if r := l + 1; r < len(h) && worse(h[r], h[l]) {
			m = r
		}
		if !worse(h[m], h[i]) {
			break
		}
		h[i], h[m] = h[m], h[i]
		i = m
	}
}

// rankScope merges the scope's pair counts (the open part's base runs plus
// the store's files and own, the group's own runs; both empty for the open
// scope), keeps pairs of terms counted in the scope (st.df > 0) with enough
// supporting documents whose passage co-occurrence exceeds chance, and
// builds every term's neighbour list, best first: all of them for the open
// scope, the delta against the open scope (st.base) for a group scope.
// udf and n are the scope's passage frequencies (zero outside the scope)
// and passages. With last set no scope follows, and the base runs are
// released as soon as they are merged, before the lists are built.
func (m *miner) rankScope(ctx context.Context, base *baseRuns, own [][]slot, udf []uint32, n int64, st *scopeTable, last bool) error {
	nLocal := len(udf)
	tk := &topK{k: m.o.TopK, heaps: make([][]cand, nLocal)}
	minSup := uint32(m.o.MinSupportDocs)
	meas := m.o.Measure
	err := base.merge(ctx, m.store, own, func(e entry) error {
		if e.d < minSup {
			return nil
		}
		a, b := uint32(e.key>>32), uint32(e.key)
		if st.df[a] == 0 || st.df[b] == 0 { // counted for another scope only
			return nil
		}
		na, nb := int64(udf[a]), int64(udf[b])
		if int64(e.u)*n <= na*nb { // not above chance
			return nil
		}
		ab := NewContingency(int64(e.u), na, nb, n)
		sab := ab.Score(meas)
		sba := sab
		if meas == MeasureCondProb {
			sba = NewContingency(int64(e.u), nb, na, n).Score(meas)
		}
		tk.offer(a, cand{sab, b, e.u, e.w, e.d})
		tk.offer(b, cand{sba, a, e.u, e.w, e.d})
		st.pairs++
		return nil
	})
	if err != nil {
		return err
	}
	if last {
		base.release()
	}
	st.units = uint64(n)
	st.udf = udf
	for _, h := range tk.heaps {
		slices.SortFunc(h, func(x, y cand) int {
			if worse(y, x) {
				return -1
			}
			if worse(x, y) {
				return 1
			}
			return 0
		})
	}
	if st.base != nil {
		st.addDelta(tk.heaps)
		return nil
	}
	total := 0
	for _, h := range tk.heaps {
		total += len(h)
	}
	st.off = make([]uint32, 1, nLocal+1)
	st.nb = make([]uint32, 0, total)
	st.k11 = make([]uint32, 0, total)
	st.win = make([]uint32, 0, total)
	st.sup = make([]uint32, 0, total)
	for t, h := range tk.heaps {
		for _, c := range h {
			st.nb = append(st.nb, c.nb)
			st.k11 = append(st.k11, c.k11)
			st.win = append(st.win, c.win)
			st.sup = append(st.sup, c.sp)
		}
		st.off = append(st.off, uint32(len(st.nb)))
		tk.heaps[t] = nil
	}
	return nil
}

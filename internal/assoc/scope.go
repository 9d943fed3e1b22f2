package assoc

import (
	"fmt"
	"slices"
)

// scopeTable is one scope's counts. Per-term arrays (udf, df, tf) are
// indexed by table ID, for every scope; df == 0 means the term is not part
// of the scope.
//
// The open scope (base == nil) holds every term's neighbour list: the list
// of t is entries [off[t], off[t+1]) of the columns nb, k11, win and sup.
//
// A group scope holds only a delta against the open scope (base). own
// lists, in increasing ID order, the terms whose neighbour list (IDs, order
// and every stored count) differs from the open scope's; every other term
// has the open scope's list. The list of own[i] is ref[off[i]:off[i+1]]:
// an entry r < refOwn is the open scope's entry r (one of the same term's
// open entries, with equal counts), otherwise entry r-refOwn of the group's
// own columns nb, k11, win and sup. Scores are always computed with the
// group scope's passage frequencies and passage count and the neighbour is
// attributed to the group scope, exactly as if it stored the list in full
// (see Table.neighbour).
type scopeTable struct {
	name  string
	docs  uint32
	units uint64
	pairs uint64 // pairs that passed support and chance filters
	udf   []uint32
	df    []uint32
	tf    []uint32
	base  *scopeTable // the open scope, for a group scope; nil for the open scope
	own   []uint32    // group scope: terms with a list of their own, increasing
	off   []uint32    // list offsets: per term (open) or per own term into ref (group)
	ref   []uint32    // group scope: list entries, see refOwn
	nb    []uint32
	k11   []uint32
	win   []uint32
	sup   []uint32
}

// refOwn marks a group list entry stored in the group's own columns.
const refOwn = 1 << 31

// span is one term's neighbour list in a scope, as returned by entries.
type span struct {
	grp, src *scopeTable // the group scope (with ref), the scope of direct entries
	ref      []uint32    // nil: entries lo..hi-1 of src's columns
	lo, n    uint32
}

// entries returns term id's neighbour list in st.
func (st *scopeTable) entries(id uint32) span {
	if st.base == nil {
		return span{src: st, lo: st.off[id], n: st.off[id+1] - st.off[id]}
	}
	if i, ok := slices.BinarySearch(st.own, id); ok {
		return span{grp: st, src: st.base, ref: st.ref[st.off[i]:st.off[i+1]], n: st.off[i+1] - st.off[i]}
	}
	b := st.base
	return span{src: b, lo: b.off[id], n: b.off[id+1] - b.off[id]}
}

// at returns the scope holding the columns of the list's i-th entry and
// the entry's index in them.
func (s span) at(i uint32) (*scopeTable, uint32) {
	if s.ref == nil {
		return s.src, s.lo + i
	}
	if r := s.ref[i]; r < refOwn {
		return s.src, r
	}
	return s.grp, s.ref[i] - refOwn
}

// bytes is the memory held by the scope's arrays.
func (st *scopeTable) bytes() int64 {
	n := len(st.udf) + len(st.df) + len(st.tf) + len(st.own) + len(st.off) + len(st.ref) +
		len(st.nb) + len(st.k11) + len(st.win) + len(st.sup)
	return 4 * int64(n)
}

// numNeighbours counts the neighbour entries of every term of st, lists
// shared with the open scope included.
func (st *scopeTable) numNeighbours() int {
	if st.base == nil {
		return len(st.nb)
	}
	n := len(st.base.nb) + len(st.ref)
	for _, id := range st.own {
		n -= int(st.base.off[id+1] - st.base.off[id])
	}
	return n
}

// addDelta stores the group scope's ranked lists (best first, one per
// term) as a delta against the open scope: it sizes the delta exactly in a
// first pass, then fills it, dropping each term's candidates as it goes.
func (st *scopeTable) addDelta(lists [][]cand) {
	differs := make([]bool, len(lists))
	nOwn, nRef, nNew := 0, 0, 0
	for t, h := range lists {
		same, fresh := st.base.compare(uint32(t), h, nil)
		if same {
			lists[t] = nil
			continue
		}
		differs[t] = true
		nOwn, nRef, nNew = nOwn+1, nRef+len(h), nNew+fresh
	}
	st.own = make([]uint32, 0, nOwn)
	st.off = make([]uint32, 1, nOwn+1)
	st.ref = make([]uint32, 0, nRef)
	st.nb, st.k11 = make([]uint32, 0, nNew), make([]uint32, 0, nNew)
	st.win, st.sup = make([]uint32, 0, nNew), make([]uint32, 0, nNew)
	for t, h := range lists {
		if differs[t] {
			st.own = append(st.own, uint32(t))
			st.base.compare(uint32(t), h, st)
			st.off = append(st.off, uint32(len(st.ref)))
		}
		lists[t] = nil
	}
}

// compare compares the open scope's list of term t with the ranked
// candidates h. same reports an identical list (the same neighbours in the
// same order with the same passage, window and support counts); fresh
// counts the candidates that equal no entry of the open list. With grp
// set (and the lists differing) it appends h to grp's delta: a reference
// to the equal open entry where there is one, else an own entry.
func (st *scopeTable) compare(t uint32, h []cand, grp *scopeTable) (same bool, fresh int) {
	lo, hi := st.off[t], st.off[t+1]
	equal := func(e uint32, c cand) bool {
		return st.nb[e] == c.nb && st.k11[e] == c.k11 && st.win[e] == c.win && st.sup[e] == c.sp
	}
	if grp == nil && int(hi-lo) == len(h) {
		same = true
		for i, c := range h {
			if !equal(lo+uint32(i), c) {
				same = false
				break
			}
		}
		if same {
			return true, 0
		}
	}
next:
	for _, c := range h {
		for e := lo; e < hi; e++ {
			if st.nb[e] == c.nb {
				if equal(e, c) {
					if grp != nil {
						grp.ref = append(grp.ref, e)
					}
					continue next
				}
				break
			}
		}
		fresh++
		if grp != nil {
			grp.ref = append(grp.ref, refOwn+uint32(len(grp.nb)))
			grp.nb = append(grp.nb, c.nb)
			grp.k11 = append(grp.k11, c.k11)
			grp.win = append(grp.win, c.win)
			grp.sup = append(grp.sup, c.sp)
		}
	}
	return false, fresh
}

// decodeDelta reads a group scope's frequency and list deltas (see the
// artifact layout), expands the frequencies against the open scope and
// checks that every reference is an entry of the term's open list or of
// the group's own entries.
func (t *Table) decodeDelta(d *dec, st *scopeTable) error {
	n := uint64(t.numTerms())
	st.base = t.scopes[0]
	m := uint64(d.u32())
	if d.err == nil && (m > n || 16*m > uint64(len(d.b))) {
		return fmt.Errorf("%w: scope %q claims %d changed terms", ErrCorrupt, st.name, m)
	}
	ids := d.u32s(m)
	cols := [3][]uint32{d.u32s(m), d.u32s(m), d.u32s(m)}
	if d.err != nil {
		return d.err
	}
	if err := increasing(ids, n, st.name); err != nil {
		return err
	}
	st.udf, st.df, st.tf = slices.Clone(st.base.udf), slices.Clone(st.base.df), slices.Clone(st.base.tf)
	for i, id := range ids {
		st.udf[id], st.df[id], st.tf[id] = cols[0][i], cols[1][i], cols[2][i]
	}
	k := uint64(d.u32())
	if d.err == nil && (k > n || 8*k+4 > uint64(len(d.b))) {
		return fmt.Errorf("%w: scope %q claims %d own lists", ErrCorrupt, st.name, k)
	}
	st.own, st.off = d.u32s(k), d.u32s(k+1)
	if d.err != nil {
		return d.err
	}
	if err := increasing(st.own, n, st.name); err != nil {
		return err
	}
	if err := offsets(st.off, uint64(len(d.b))/4, "neighbour"); err != nil {
		return err
	}
	st.ref = d.u32s(uint64(st.off[k]))
	x := uint64(d.u32())
	if d.err == nil && 16*x > uint64(len(d.b)) {
		return fmt.Errorf("%w: scope %q claims %d own entries", ErrCorrupt, st.name, x)
	}
	st.nb, st.k11, st.win, st.sup = d.u32s(x), d.u32s(x), d.u32s(x), d.u32s(x)
	if d.err != nil {
		return d.err
	}
	b := st.base
	for i, id := range st.own {
		for _, r := range st.ref[st.off[i]:st.off[i+1]] {
			if (r >= refOwn && uint64(r-refOwn) >= x) || (r < refOwn && (r < b.off[id] || r >= b.off[id+1])) {
				return fmt.Errorf("%w: scope %q term %d has a bad entry reference", ErrCorrupt, st.name, id)
			}
		}
	}
	return nil
}

// increasing checks that ids are strictly increasing term IDs below n.
func increasing(ids []uint32, n uint64, scope string) error {
	for i, id := range ids {
		if uint64(id) >= n || (i > 0 && id <= ids[i-1]) {
			return fmt.Errorf("%w: scope %q term IDs not increasing at %d", ErrCorrupt, scope, i)
		}
	}
	return nil
}

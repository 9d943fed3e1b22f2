package assoc

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestTopKExact checks that a term's candidate heap never grows past K and
// keeps exactly the K best candidates (by worse), ties broken by ID. The
// expected set comes from sorting all candidates (a brute-force check,
// common practice), with a fixed seed.
func TestTopKExact(t *testing.T) {
	cases := []struct {
		name string
		k, n int
	}{
		{"fewer than k", 50, 7},
		{"exactly k", 50, 50},
		{"many more than k", 50, 1000},
		{"k not a power of two", 37, 500},
		{"k of one", 1, 100},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := rand.New(rand.NewPCG(1, uint64(tc.n)))
			tk := &topK{k: tc.k, heaps: make([][]cand, 1)}
			var all []cand
			for i := range tc.n {
				c := cand{score: float64(r.IntN(40)), nb: uint32(i + 1)}
				all = append(all, c)
				tk.offer(0, c)
			}
			h := tk.heaps[0]
			if cap(h) > tc.k {
				t.Errorf("heap capacity %d, want at most k = %d", cap(h), tc.k)
			}
			best := func(x, y cand) int {
				if worse(y, x) {
					return -1
				}
				if worse(x, y) {
					return 1
				}
				return 0
			}
			slices.SortFunc(all, best)
			want := all[:min(tc.k, len(all))]
			got := slices.Clone(h)
			slices.SortFunc(got, best)
			if !slices.Equal(got, want) {
				t.Errorf("kept %v, want %v", got, want)
			}
		})
	}
}

// TestGroupBudget checks the counting budget of a group scope: the budget
// less the base runs in memory and the held lists and heaps, floored at an
// eighth of the budget.
func TestGroupBudget(t *testing.T) {
	const mb = 1 << 20
	cases := []struct {
		name       string
		base       *baseRuns
		held, want int64
	}{
		{"open part (no base)", nil, 50 * mb, 100 * mb},
		{"nothing held", &baseRuns{}, 0, 100 * mb},
		{"base runs in memory", &baseRuns{bytes: 30 * mb}, 0, 70 * mb},
		{"lists and heaps held", &baseRuns{bytes: 10 * mb}, 40 * mb, 50 * mb},
		{"floor of an eighth", &baseRuns{bytes: 60 * mb}, 60 * mb, 100 * mb / 8},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := &miner{o: Options{MemoryBudget: 100 * mb}, held: tc.held}
			if got := m.budget(tc.base); got != tc.want {
				t.Errorf("budget = %d, want %d", got, tc.want)
			}
		})
	}
}

// TestHeldBytes checks heldBytes against a hand count: every array of
// every scope at 4 bytes an element, plus one 24-byte candidate per open
// neighbour entry.
func TestHeldBytes(t *testing.T) {
	open := &scopeTable{udf: make([]uint32, 3), df: make([]uint32, 3), tf: make([]uint32, 3),
		off: make([]uint32, 4), nb: make([]uint32, 5), k11: make([]uint32, 5), win: make([]uint32, 5), sup: make([]uint32, 5)}
	grp := &scopeTable{base: open, udf: make([]uint32, 3), df: make([]uint32, 3), tf: make([]uint32, 3),
		own: make([]uint32, 1), off: make([]uint32, 2), ref: make([]uint32, 2),
		nb: make([]uint32, 1), k11: make([]uint32, 1), win: make([]uint32, 1), sup: make([]uint32, 1)}
	cases := []struct {
		name   string
		scopes []*scopeTable
		want   int64
	}{
		{"open only", []*scopeTable{open}, 4*(9+4+20) + 24*5},
		{"open and a group", []*scopeTable{open, grp}, 4*(9+4+20) + 4*(9+1+2+2+4) + 24*5},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := heldBytes(tc.scopes); got != tc.want {
				t.Errorf("heldBytes = %d, want %d", got, tc.want)
			}
		})
	}
}

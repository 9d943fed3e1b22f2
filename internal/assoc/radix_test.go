package assoc

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSortSlots compares the radix sort with the standard library's sort.
func TestSortSlots(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	cases := []struct {
		name string
		n    int
		key  func() uint64
	}{
		{"empty", 0, r.Uint64},
		{"one", 1, r.Uint64},
		{"random 64-bit", 5000, r.Uint64},
		{"pair keys", 20000, func() uint64 { return pairKey(uint32(r.IntN(3000)), uint32(r.IntN(3000))) }},
		{"many duplicates", 3000, func() uint64 { return uint64(r.IntN(4)) << 40 }},
		{"all equal", 500, func() uint64 { return 7 }},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := make([]slot, tc.n)
			for i := range s {
				s[i] = slot{key: tc.key(), u: uint32(i)}
			}
			want := slices.Clone(s)
			slices.SortStableFunc(want, func(a, b slot) int {
				switch {
				case a.key < b.key:
					return -1
				case a.key > b.key:
					return 1
				}
				return 0
			})
			sortSlots(s)
			for i := range s {
				if s[i].key != want[i].key {
					t.Fatalf("position %d: key %x, want %x", i, s[i].key, want[i].key)
				}
			}
			// A permutation: the payloads are all still there.
			seen := make([]bool, tc.n)
			for _, x := range s {
				seen[x.u] = true
			}
			if slices.Contains(seen, false) {
				t.Fatal("lost an element")
			}
		})
	}
}

package assoc

import "math/bits"

// sortSlots sorts slots by key in place with an MSD radix sort over the key
// bytes (American flag sort: no scratch memory), starting at the highest
// byte in which keys differ.
func sortSlots(s []slot) {
	if len(s) < 2 {
		return
	}
	var diff uint64
	k0 := s[0].key
	for i := range s {
		diff |= s[i].key ^ k0
	}
	if diff == 0 {
		return
	}
	msdSort(s, uint(63-bits.LeadingZeros64(diff))/8*8)
}

func msdSort(s []slot, shift uint) {
	for {
		if len(s) <= 48 {
			insertionSort(s)
			return
		}
		var count [256]int
		for i := range s {
			count[byte(s[i].key>>shift)]++
		}
		if count[byte(s[0].key>>shift)] == len(s) { // digit constant here
			if shift == 0 {
				return
			}
			shift -= 8
			continue
		}
		var next, end [256]int
		sum := 0
		for b := range 256 {
			next[b] = sum
			sum += count[b]
			end[b] = sum
		}
		for b := range 256 {
			for next[b] < end[b] {
				d := byte(s[next[b]].key >> shift)
				if int(d) == b {
					next[b]++
					continue
				}
				s[next[b]], s[next[d]] = s[next[d]], s[next[b]]
				next[d]++
			}
		}
		if shift == 0 {
			return
		}
		start := 0
		for b := range 256 {
			if count[b] > 1 {
				msdSort(s[start:start+count[b]], shift-8)
			}
			start += count[b]
		}
		return
	}
}

func insertionSort(s []slot) {
	for i := 1; i < len(s); i++ {
		v := s[i]
		j := i
		for j > 0 && s[j-1].key > v.key {
			s[j] = s[j-1]
			j--
		}
		s[j] = v
	}
}

package assoc

// slot is one pair (or phrase candidate) count. The table stores key+1 so
// that the zero slot is free (real keys have both halves < 2^31, so key+1
// never overflows); sorted runs hold the real key again. u counts units (or
// occurrences), w window co-occurrences, d distinct documents; last is the
// last document that touched the slot, so d counts each document once.
type slot struct {
	key     uint64
	u, w, d uint32
	last    uint32
}

const slotBytes = 24

// pairKey packs an unordered pair, smaller ID in the high half.
func pairKey(a, b uint32) uint64 {
	if a > b {
		a, b = b, a
	}
	return uint64(a)<<32 | uint64(b)
}

// counter is an open-addressing (linear probing) hash table of slots. It
// grows by doubling up to the capacity its memory budget allows; beyond
// that, endDoc spills the table as a sorted run. Spills happen only between
// documents, so each document's contributions sit in exactly one run and
// the distinct-document counts add up exactly across runs.
type counter struct {
	slots  []slot
	shift  uint // 64 - log2(len(slots))
	n      int
	maxCap int
	store  *spillStore
	spills int
}

const minCap = 64

func newCounter(budget int64, store *spillStore) *counter {
	maxCap := minCap
	for int64(maxCap)*2*slotBytes*3/2 <= budget {
		maxCap *= 2
	}
	c := &counter{maxCap: maxCap, store: store}
	c.alloc(min(maxCap, 1<<12))
	return c
}

func (c *counter) alloc(capacity int) {
	c.slots = make([]slot, capacity)
	bits := uint(0)
	for 1<<bits < capacity {
		bits++
	}
	c.shift = 64 - bits
	c.n = 0
}

func (c *counter) index(key uint64) int {
	return int((key * 0x9E3779B97F4A7C15) >> c.shift)
}

// add records du units and dw window co-occurrences of key seen in doc.
func (c *counter) add(key uint64, doc, du, dw uint32) {
	key++
	mask := len(c.slots) - 1
	for i := c.index(key); ; i = (i + 1) & mask {
		s := &c.slots[i]
		if s.key == key {
			s.u += du
			s.w += dw
			if s.last != doc {
				s.last = doc
				s.d++
			}
			return
		}
		if s.key == 0 {
			*s = slot{key: key, u: du, w: dw, d: 1, last: doc}
			c.n++
			if c.n*4 > len(c.slots)*3 {
				c.grow()
			}
			return
		}
	}
}

func (c *counter) grow() {
	old := c.slots
	c.alloc(len(old) * 2)
	for _, s := range old {
		if s.key != 0 {
			c.insertSlot(s)
		}
	}
}

func (c *counter) insertSlot(s slot) {
	mask := len(c.slots) - 1
	i := c.index(s.key)
	for c.slots[i].key != 0 {
		i = (i + 1) & mask
	}
	c.slots[i] = s
	c.n++
}

// endDoc spills the table if it is near its budgeted capacity (or grew past
// it on a very large document).
func (c *counter) endDoc() error {
	if len(c.slots) < c.maxCap || c.n*8 < c.maxCap*5 {
		return nil
	}
	if err := c.store.writeRun(c.sorted()); err != nil {
		return err
	}
	c.spills++
	if len(c.slots) > c.maxCap {
		c.alloc(c.maxCap)
	} else {
		c.clear()
	}
	return nil
}

func (c *counter) clear() {
	clear(c.slots)
	c.n = 0
}

// sorted compacts the live slots to the front in place, restores their
// real keys and sorts them by key. The table must be cleared or dropped
// afterwards.
func (c *counter) sorted() []slot {
	j := 0
	for i := range c.slots {
		if c.slots[i].key != 0 {
			c.slots[j] = c.slots[i]
			c.slots[j].key--
			j++
		}
	}
	live := c.slots[:j]
	sortSlots(live)
	return live
}

// finish returns the remaining counts as a sorted in-memory run; the counter
// must not be used afterwards.
func (c *counter) finish() []slot {
	s := c.sorted()
	c.slots = nil
	return s
}

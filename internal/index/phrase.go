package index

import (
	"slices"
	"strings"
	"sync"
)

// phraseCacheBudget bounds the postings a snapshot keeps for phrases, in
// entries (8 bytes each: document and frequency), about 32 MiB. When a new
// list would pass it the cache starts again empty: simple, and popular
// phrases come back at once.
const phraseCacheBudget = 4 << 20

// phraseList is one phrase's postings over the whole snapshot.
type phraseList struct{ docs, tfs []uint32 }

// phraseCache memoises phrase postings for one immutable snapshot, so a
// phrase that suggestions or expanded queries ask for again costs a map
// lookup instead of a scan. Safe for concurrent use.
type phraseCache struct {
	mu   sync.Mutex
	m    map[string]phraseList
	size int
	// df holds each phrase's document count per document class, kept
	// apart from the postings (a few bytes per phrase) so that a viewer's
	// phrase DF stays a sum over classes after the postings are dropped.
	df map[string][]uint32
}

// phraseDFKeys bounds the phrases whose per-class counts are kept; past
// it the counts start again empty.
const phraseDFKeys = 1 << 18

func (c *phraseCache) getDF(key string) ([]uint32, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	d, ok := c.df[key]
	return d, ok
}

func (c *phraseCache) putDF(key string, d []uint32) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.df == nil || len(c.df) >= phraseDFKeys {
		c.df = make(map[string][]uint32)
	}
	c.df[key] = d
}

// phraseClassDF returns a phrase's document count per document class,
// memoised per snapshot.
func (w *View) phraseClassDF(parts []string) []uint32 {
	key := strings.Join(parts, " ")
	if d, ok := w.s.phrases.getDF(key); ok {
		return d
	}
	docs, _ := w.phrasePostings(parts)
	d := make([]uint32, len(w.s.classes))
	for _, doc := range docs {
		d[w.s.docClass[doc]]++
	}
	w.s.phrases.putDF(key, d)
	return d
}

func (c *phraseCache) get(key string) (phraseList, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	l, ok := c.m[key]
	return l, ok
}

func (c *phraseCache) put(key string, l phraseList) {
	n := len(l.docs)
	if n > phraseCacheBudget/4 {
		return // one huge list is not worth the space
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.m == nil || c.size+n > phraseCacheBudget {
		c.m, c.size = make(map[string]phraseList), 0
	}
	c.m[key] = l
	c.size += n
}

// phrasePostings finds documents where the parts occur as consecutive
// indexed tokens, with the number of occurrences. It intersects the words'
// posting lists first (rarest first, by binary search into the others) and
// scans the tokens only of documents holding every word; results are
// memoised per snapshot.
func (w *View) phrasePostings(parts []string) (docs, tfs []uint32) {
	key := strings.Join(parts, " ")
	if l, ok := w.s.phrases.get(key); ok {
		return l.docs, l.tfs
	}
	s := w.s
	s.postings()
	ids := make([]uint32, len(parts))
	for i, p := range parts {
		id, ok := s.termID[p]
		if !ok {
			return nil, nil
		}
		ids[i] = id
	}
	order := make([]uint32, len(ids))
	copy(order, ids)
	slices.SortFunc(order, func(a, b uint32) int {
		return int(s.off[a+1]-s.off[a]) - int(s.off[b+1]-s.off[b])
	})
	cand := s.pdocs[s.off[order[0]]:s.off[order[0]+1]]
	for _, id := range order[1:] {
		other := s.pdocs[s.off[id]:s.off[id+1]]
		var keep []uint32
		lo := 0
		for _, d := range cand {
			j, found := slices.BinarySearch(other[lo:], d)
			lo += j
			if found {
				keep = append(keep, d)
			}
			if lo >= len(other) {
				break
			}
		}
		cand = keep
		if len(cand) == 0 {
			break
		}
	}
	for _, d := range cand {
		if n := countRun(s.docs[d].Tokens, ids); n > 0 {
			docs = append(docs, d)
			tfs = append(tfs, n)
		}
	}
	s.phrases.put(key, phraseList{docs, tfs})
	return docs, tfs
}

// countRun counts the occurrences of ids as consecutive tokens.
func countRun(toks, ids []uint32) uint32 {
	n := uint32(0)
	for i := 0; i+len(ids) <= len(toks); i++ {
		if toks[i] != ids[0] {
			continue
		}
		match := true
		for j := 1; j < len(ids); j++ {
			if toks[i+j] != ids[j] {
				match = false
				break
			}
		}
		if match {
			n++
		}
	}
	return n
}

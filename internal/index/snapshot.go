package index

import (
	"sort"
	"strings"
	"sync"

	"kinword/internal/access"
	"kinword/internal/text"
)

// class is an access class: the documents that share one exact group set.
// Classes partition the collection, so a viewer's statistics are the sum over
// the classes it may read, with nothing counted twice.
type class struct {
	groups   []string // sorted; empty = open
	n        int      // documents
	totalLen int64    // tokens
	df, cf   []uint32 // per term ID
}

// snapshot is an immutable view of the collection: documents by number,
// per-class statistics and CSR postings. Searches pin one; writers build a
// new one and swap it in atomically.
type snapshot struct {
	gen      uint64
	docs     []*fwdDoc // by document number (sorted by ID)
	byID     map[string]uint32
	docClass []uint16
	docLen   []uint32
	terms    []string
	termID   map[string]uint32
	forms    []string
	classes  []class
	// Postings in compressed-sparse-row form: term t's documents are
	// pdocs[off[t]:off[t+1]] (ascending) with frequencies ptf[...].
	off      []uint32
	pdocs    []uint32
	ptf      []uint32
	postOnce sync.Once // postings are built on first use: mining and ingest never need them
	dfTotal  []uint32
	surf     map[string]*text.Surfaces

	scopes  sync.Map // access.Viewer groups key -> *scope
	accs    sync.Pool
	phrases phraseCache // phrase postings, computed on first use
}

// buildSnapshot derives a snapshot from the forward store.
func buildSnapshot(f *forward) *snapshot {
	s := &snapshot{gen: f.gen, byID: make(map[string]uint32, len(f.docs))}
	s.terms = f.terms[:len(f.terms):len(f.terms)]
	s.forms = f.forms[:len(f.forms):len(f.forms)]
	s.termID = make(map[string]uint32, len(f.termID))
	for k, v := range f.termID {
		s.termID[k] = v
	}
	s.surf = f.surf
	s.docs = make([]*fwdDoc, 0, len(f.docs))
	for _, d := range f.docs {
		s.docs = append(s.docs, d)
	}
	sort.Slice(s.docs, func(i, j int) bool { return s.docs[i].ID < s.docs[j].ID })
	nt := len(s.terms)
	classIdx := map[string]int{}
	s.docClass = make([]uint16, len(s.docs))
	s.docLen = make([]uint32, len(s.docs))
	dfTotal := make([]uint32, nt)
	seen := make([]uint32, nt) // last doc number+1 that counted the term
	for i, d := range s.docs {
		s.byID[d.ID] = uint32(i)
		key := strings.Join(d.Groups, ",")
		ci, ok := classIdx[key]
		if !ok {
			ci = len(s.classes)
			classIdx[key] = ci
			s.classes = append(s.classes, class{groups: d.Groups, df: make([]uint32, nt), cf: make([]uint32, nt)})
		}
		c := &s.classes[ci]
		s.docClass[i] = uint16(ci)
		s.docLen[i] = uint32(len(d.Tokens))
		c.n++
		c.totalLen += int64(len(d.Tokens))
		for _, t := range d.Tokens {
			c.cf[t]++
			if seen[t] != uint32(i)+1 {
				seen[t] = uint32(i) + 1
				c.df[t]++
				dfTotal[t]++
			}
		}
	}
	s.dfTotal = dfTotal
	s.accs.New = func() any { return newAccumulator(len(s.docs)) }
	return s
}

// postings builds the CSR postings once: offsets from total df, then fill
// in document order.
func (s *snapshot) postings() {
	s.postOnce.Do(s.buildPostings)
}

func (s *snapshot) buildPostings() {
	nt := len(s.terms)
	dfTotal := s.dfTotal
	s.off = make([]uint32, nt+1)
	for t := 0; t < nt; t++ {
		s.off[t+1] = s.off[t] + dfTotal[t]
	}
	total := s.off[nt]
	s.pdocs = make([]uint32, total)
	s.ptf = make([]uint32, total)
	fill := make([]uint32, nt)
	copy(fill, s.off[:nt])
	counts := make([]uint32, nt)
	for i, d := range s.docs {
		for _, t := range d.Tokens {
			counts[t]++
		}
		for _, t := range d.Tokens {
			if c := counts[t]; c > 0 {
				p := fill[t]
				s.pdocs[p] = uint32(i)
				s.ptf[p] = c
				fill[t]++
				counts[t] = 0
			}
		}
	}
	s.dfTotal = nil
}

// scope is the part of the collection one viewer may read, with its
// statistics.
type scope struct {
	visible  []bool // per class
	classes  []int  // visible class indexes
	n        int
	totalLen int64
}

func (s *snapshot) scopeFor(v access.Viewer) *scope {
	key := strings.Join(v.Groups, ",")
	if sc, ok := s.scopes.Load(key); ok {
		return sc.(*scope)
	}
	sc := &scope{visible: make([]bool, len(s.classes))}
	for i, c := range s.classes {
		if v.CanRead(c.groups) {
			sc.visible[i] = true
			sc.classes = append(sc.classes, i)
			sc.n += c.n
			sc.totalLen += c.totalLen
		}
	}
	actual, _ := s.scopes.LoadOrStore(key, sc)
	return actual.(*scope)
}

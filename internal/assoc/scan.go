package assoc

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"hash"
	"sort"
	"strings"

	"kinword/internal/access"
)

// OpenScope is the name of the scope of documents open to everyone; every
// other scope is named after its access group.
const OpenScope = ""

// scan is the result of the first pass over the corpus.
type scan struct {
	fingerprint [32]byte
	nDocs       int
	nTerms      int
	scopes      []string // scope names, OpenScope first, then groups sorted
	// own holds, per scope, the documents counted for that scope alone, in
	// ascending order: own[0] the open documents, own[g] (g > 0) the
	// restricted documents of group g. Scope g is own[0] plus own[g]; the
	// parts are disjoint, so counts over them add up.
	own    [][]int32
	spaced map[string]bool
}

// scanCorpus fingerprints the corpus, validates token IDs and sorts the
// documents into scopes. A document whose Groups are all blank is readable
// by nobody (access.Viewer.CanRead is false for every viewer) and joins no
// scope.
func scanCorpus(ctx context.Context, c Corpus, progressFn func(string, int, int)) (*scan, error) {
	s := &scan{nDocs: c.NumDocs(), nTerms: c.NumTerms(), spaced: map[string]bool{}}
	if s.nTerms >= 1<<31 {
		return nil, fmt.Errorf("%w: %d terms is too many", ErrBadCorpus, s.nTerms)
	}
	fw := &fpWriter{h: sha256.New(), buf: make([]byte, 0, 1<<16+64)}
	fw.str("kinword-assoc-corpus")
	fw.u64(uint64(s.nDocs))
	fw.u64(uint64(s.nTerms))
	for id := 0; id < s.nTerms; id++ {
		t := c.Term(uint32(id))
		fw.str(t)
		fw.str(c.Display(uint32(id)))
		if strings.Contains(t, " ") {
			s.spaced[t] = true
		}
	}
	setIndex := map[string]int{"": 0}
	setGroups := [][]string{nil}
	docSet := make([]int32, s.nDocs)
	pr := newProgress(progressFn, "scan", s.nDocs)
	for i := 0; i < s.nDocs; i++ {
		if i&255 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("assoc: scan: %w", err)
			}
		}
		d := c.Doc(i)
		fw.u32(uint32(len(d.Tokens)))
		for _, t := range d.Tokens {
			if int(t) >= s.nTerms {
				return nil, fmt.Errorf("%w: document %d has term id %d, dictionary has %d", ErrBadCorpus, i, t, s.nTerms)
			}
			fw.u32(t)
		}
		fw.u32(uint32(len(d.Breaks)))
		for _, b := range d.Breaks {
			fw.u32(uint32(b))
		}
		fw.u32(uint32(len(d.Groups)))
		for _, g := range d.Groups {
			fw.str(g)
		}
		groups := access.NormalizeGroups(d.Groups)
		switch {
		case len(d.Groups) == 0:
			docSet[i] = 0
		case len(groups) == 0:
			docSet[i] = -1
		default:
			key := strings.Join(groups, "\x00")
			k, ok := setIndex[key]
			if !ok {
				k = len(setGroups)
				setIndex[key] = k
				setGroups = append(setGroups, groups)
			}
			docSet[i] = int32(k)
		}
		pr.add(1)
	}
	copy(s.fingerprint[:], fw.sum())

	names := map[string]bool{}
	for _, gs := range setGroups {
		for _, g := range gs {
			names[g] = true
		}
	}
	s.scopes = []string{OpenScope}
	for g := range names {
		s.scopes = append(s.scopes, g)
	}
	sort.Strings(s.scopes[1:])
	scopeOf := map[string]int{}
	for i, g := range s.scopes {
		scopeOf[g] = i
	}
	s.own = make([][]int32, len(s.scopes))
	for i, k := range docSet {
		switch {
		case k < 0:
		case k == 0:
			s.own[0] = append(s.own[0], int32(i))
		default:
			for _, g := range setGroups[k] {
				sc := scopeOf[g]
				s.own[sc] = append(s.own[sc], int32(i))
			}
		}
	}
	return s, nil
}

// fpWriter feeds a canonical little-endian encoding into the hash through
// a buffer.
type fpWriter struct {
	h   hash.Hash
	buf []byte
}

func (w *fpWriter) flushIfFull() {
	if len(w.buf) >= 1<<16 {
		w.h.Write(w.buf)
		w.buf = w.buf[:0]
	}
}

func (w *fpWriter) u32(v uint32) {
	w.buf = binary.LittleEndian.AppendUint32(w.buf, v)
	w.flushIfFull()
}

func (w *fpWriter) u64(v uint64) {
	w.buf = binary.LittleEndian.AppendUint64(w.buf, v)
	w.flushIfFull()
}

func (w *fpWriter) str(s string) {
	w.u32(uint32(len(s)))
	w.buf = append(w.buf, s...)
	w.flushIfFull()
}

func (w *fpWriter) sum() []byte {
	w.h.Write(w.buf)
	w.buf = w.buf[:0]
	return w.h.Sum(nil)
}

// totalDocs is the number of document visits one counting pass makes: the
// open documents once, plus each group's own documents.
func (s *scan) totalDocs() int {
	n := 0
	for _, d := range s.own {
		n += len(d)
	}
	return n
}

// scopeDocs is the number of documents in scope sc.
func (s *scan) scopeDocs(sc int) int {
	if sc == 0 {
		return len(s.own[0])
	}
	return len(s.own[0]) + len(s.own[sc])
}

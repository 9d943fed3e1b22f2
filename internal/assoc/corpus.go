package assoc

import (
	"errors"
	"sort"
)

// Corpus is the index's per-document term data, as mining reads it. Mine
// calls it from one goroutine only.
type Corpus interface {
	// NumDocs is the number of documents, numbered 0..NumDocs()-1.
	NumDocs() int
	// Doc returns document i's data. Tokens are term IDs in document order
	// after the shared text pipeline (normalise, split, stopwords removed,
	// Snowball stem); Breaks are token offsets where a new paragraph starts;
	// Groups nil/empty = open to everyone. The returned slices may be reused
	// by the next call.
	Doc(i int) DocTerms
	// NumTerms is the dictionary size; term IDs are 0..NumTerms()-1.
	NumTerms() int
	// Term returns the stem of term id.
	Term(id uint32) string
	// Display returns the most common surface form of term id
	// ("breaks" -> "break").
	Display(id uint32) string
}

// Surfacer is an optional extension of Corpus: the written (folded) form of
// every token, so that a phrase displays as its words were written together
// ("axial compression") rather than as each stem's commonest form.
type Surfacer interface {
	// DocSurfaces returns surface IDs parallel to Doc(i).Tokens.
	DocSurfaces(i int) []uint32
	// Surface returns the written form of a surface ID.
	Surface(id uint32) string
}

// DocTerms is one document's term data.
type DocTerms struct {
	Tokens []uint32
	Breaks []int32
	// Gaps are token offsets preceded by removed words (stopwords): a
	// phrase never spans a gap, so "subjected to aerodynamic" does not
	// yield the phrase "subjected aerodynamic". Sorted; nil means none.
	Gaps   []int32
	Groups []string
}

// ErrBadCorpus is returned by Mine when the corpus yields inconsistent data
// (a token ID outside 0..NumTerms()-1).
var ErrBadCorpus = errors.New("assoc: bad corpus")

// MemCorpus is an in-memory Corpus built from pre-tokenised documents, for
// tests and small tools. The zero value is not usable; call NewMemCorpus.
type MemCorpus struct {
	stem     func(string) string
	ids      map[string]uint32
	terms    []string
	surfaces []map[string]int
	docs     []DocTerms
}

// NewMemCorpus returns an empty corpus whose terms are stem(word) for the
// words passed to AddDoc; a nil stem keeps words as they are.
func NewMemCorpus(stem func(string) string) *MemCorpus {
	if stem == nil {
		stem = func(s string) string { return s }
	}
	return &MemCorpus{stem: stem, ids: map[string]uint32{}}
}

// AddDoc appends a document made of paragraphs of already-normalised words
// (no empty words) restricted to groups (none = open) and returns its
// number.
func (m *MemCorpus) AddDoc(groups []string, paragraphs ...[]string) int {
	var d DocTerms
	for _, para := range paragraphs {
		if len(para) == 0 {
			continue
		}
		if len(d.Tokens) > 0 {
			d.Breaks = append(d.Breaks, int32(len(d.Tokens)))
		}
		for _, w := range para {
			d.Tokens = append(d.Tokens, m.intern(w))
		}
	}
	d.Groups = append([]string(nil), groups...)
	m.docs = append(m.docs, d)
	return len(m.docs) - 1
}

func (m *MemCorpus) intern(word string) uint32 {
	s := m.stem(word)
	id, ok := m.ids[s]
	if !ok {
		id = uint32(len(m.terms))
		m.ids[s] = id
		m.terms = append(m.terms, s)
		m.surfaces = append(m.surfaces, map[string]int{})
	}
	m.surfaces[id][word]++
	return id
}

// ID returns the term ID of a stem.
func (m *MemCorpus) ID(stem string) (uint32, bool) {
	id, ok := m.ids[stem]
	return id, ok
}

// NumDocs implements Corpus.
func (m *MemCorpus) NumDocs() int { return len(m.docs) }

// Doc implements Corpus.
func (m *MemCorpus) Doc(i int) DocTerms { return m.docs[i] }

// NumTerms implements Corpus.
func (m *MemCorpus) NumTerms() int { return len(m.terms) }

// Term implements Corpus.
func (m *MemCorpus) Term(id uint32) string { return m.terms[id] }

// Display implements Corpus: the most frequent surface form, ties broken by
// the lexically smallest.
func (m *MemCorpus) Display(id uint32) string {
	forms := make([]string, 0, len(m.surfaces[id]))
	for f := range m.surfaces[id] {
		forms = append(forms, f)
	}
	sort.Strings(forms)
	best, bestN := "", -1
	for _, f := range forms {
		if n := m.surfaces[id][f]; n > bestN {
			best, bestN = f, n
		}
	}
	return best
}

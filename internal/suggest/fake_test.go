package suggest

import (
	"context"
	"sort"
	"strings"
	"testing"

	"kinword/internal/access"
	"kinword/internal/assoc"
	"kinword/internal/text"
)

// pipe is the shared text pipeline; the fake stems with it so that keys
// look like the index's ("valves" -> "valv").
var pipe = func() *text.Pipeline {
	p, err := text.NewPipeline("")
	if err != nil {
		panic(err)
	}
	return p
}()

func stem(w string) string { return pipe.Stem(w, "") }

// key is the pipeline key of a word or phrase ("main breaks" -> "main break").
func key(s string) string {
	parts := strings.Fields(strings.ToLower(s))
	for i, p := range parts {
		parts[i] = stem(p)
	}
	return strings.Join(parts, " ")
}

// fakeCorpus is an in-memory collection: documents of already-split words
// (no stopword removal, so tests can plant stopwords), with access groups.
// Its view(v) implements Corpus as the index's View does: every count over
// the documents v may read.
type fakeCorpus struct {
	ids   map[string]uint32
	terms []string
	docs  []fakeDoc
}

type fakeDoc struct {
	groups []string
	words  []string
	toks   []uint32
}

func newFakeCorpus() *fakeCorpus { return &fakeCorpus{ids: map[string]uint32{}} }

// add appends a document of space-separated words and returns its number.
func (f *fakeCorpus) add(groups []string, textWords string) uint32 {
	d := fakeDoc{groups: groups, words: strings.Fields(strings.ToLower(textWords))}
	for _, w := range d.words {
		s := stem(w)
		id, ok := f.ids[s]
		if !ok {
			id = uint32(len(f.terms))
			f.ids[s] = id
			f.terms = append(f.terms, s)
		}
		d.toks = append(d.toks, id)
	}
	f.docs = append(f.docs, d)
	return uint32(len(f.docs) - 1)
}

// table mines the association table of the same documents, with their
// written forms (so phrases display as written, as with the index).
func (f *fakeCorpus) table(t testing.TB) *assoc.Table {
	t.Helper()
	tbl, err := f.mine()
	if err != nil {
		t.Fatal(err)
	}
	return tbl
}

func (f *fakeCorpus) mine() (*assoc.Table, error) {
	sc := &surfCorpus{MemCorpus: assoc.NewMemCorpus(stem), ids: map[string]uint32{}}
	for _, d := range f.docs {
		sc.AddDoc(d.groups, d.words)
		var surf []uint32
		for _, w := range d.words {
			id, ok := sc.ids[w]
			if !ok {
				id = uint32(len(sc.forms))
				sc.ids[w] = id
				sc.forms = append(sc.forms, w)
			}
			surf = append(surf, id)
		}
		sc.surf = append(sc.surf, surf)
	}
	return assoc.Mine(context.Background(), sc, assoc.Options{Workers: 1})
}

// surfCorpus adds assoc.Surfacer to a MemCorpus.
type surfCorpus struct {
	*assoc.MemCorpus
	ids   map[string]uint32
	forms []string
	surf  [][]uint32
}

func (s *surfCorpus) DocSurfaces(i int) []uint32 { return s.surf[i] }
func (s *surfCorpus) Surface(id uint32) string   { return s.forms[id] }

type fakeView struct {
	f     *fakeCorpus
	read  []bool
	n     int
	total int64
	df    []int
	cf    []int64
	forms map[string]map[string]int
}

func (f *fakeCorpus) view(v access.Viewer) *fakeView {
	w := &fakeView{f: f, read: make([]bool, len(f.docs)), df: make([]int, len(f.terms)),
		cf: make([]int64, len(f.terms)), forms: map[string]map[string]int{}}
	for i, d := range f.docs {
		if !v.CanRead(d.groups) {
			continue
		}
		w.read[i] = true
		w.n++
		w.total += int64(len(d.toks))
		seen := map[uint32]bool{}
		for j, id := range d.toks {
			w.cf[id]++
			if !seen[id] {
				seen[id] = true
				w.df[id]++
			}
			s := f.terms[id]
			if w.forms[s] == nil {
				w.forms[s] = map[string]int{}
			}
			w.forms[s][d.words[j]]++
		}
	}
	return w
}

func (w *fakeView) N() int          { return w.n }
func (w *fakeView) TotalLen() int64 { return w.total }
func (w *fakeView) AvgDL() float64 {
	if w.n == 0 {
		return 0
	}
	return float64(w.total) / float64(w.n)
}
func (w *fakeView) DF(id uint32) int   { return w.df[id] }
func (w *fakeView) CF(id uint32) int64 { return w.cf[id] }
func (w *fakeView) TermID(s string) (uint32, bool) {
	id, ok := w.f.ids[s]
	return id, ok
}
func (w *fakeView) Term(id uint32) string               { return w.f.terms[id] }
func (w *fakeView) CanRead(d uint32) bool               { return int(d) < len(w.read) && w.read[d] }
func (w *fakeView) DocLen(d uint32) int                 { return len(w.f.docs[d].toks) }
func (w *fakeView) Tokens(d uint32) ([]uint32, []int32) { return w.f.docs[d].toks, nil }
func (w *fakeView) KeyDF(k string) int                  { return len(w.docsWith(k)) }
func (w *fakeView) docsWith(k string) (out []uint32) {
	var ids []uint32
	for _, p := range strings.Fields(k) {
		id, ok := w.f.ids[p]
		if !ok {
			return nil
		}
		ids = append(ids, id)
	}
	for d := range w.f.docs {
		if w.read[d] && hasRun(w.f.docs[d].toks, ids) {
			out = append(out, uint32(d))
		}
	}
	return out
}

// Display is the commonest readable surface form of each word (ties: the
// smaller), or the key itself.
func (w *fakeView) Display(k string) string {
	parts := strings.Fields(k)
	for i, p := range parts {
		var forms []string
		for f := range w.forms[p] {
			forms = append(forms, f)
		}
		sort.Strings(forms)
		best := -1
		for _, f := range forms {
			if n := w.forms[p][f]; n > best {
				parts[i], best = f, n
			}
		}
	}
	return strings.Join(parts, " ")
}

// rank is a stand-in first pass: readable documents containing every
// query word, by summed term frequency (ties: lower number), top k.
func (w *fakeView) rank(query string, k int) []Hit {
	var ids []uint32
	for _, p := range strings.Fields(key(query)) {
		ids = append(ids, w.f.ids[p])
	}
	var hits []Hit
	for d, doc := range w.f.docs {
		if !w.read[d] {
			continue
		}
		tf := 0
		all := true
		for _, id := range ids {
			n := 0
			for _, t := range doc.toks {
				if t == id {
					n++
				}
			}
			tf += n
			all = all && n > 0
		}
		if all {
			hits = append(hits, Hit{Doc: uint32(d), Score: float64(tf) + 1/float64(d+2)})
		}
	}
	sort.Slice(hits, func(i, j int) bool { return hits[i].Score > hits[j].Score })
	return hits[:min(k, len(hits))]
}

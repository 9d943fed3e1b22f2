package index

import (
	"kinword/internal/access"
	"kinword/internal/prf"
	"kinword/internal/text"
)

// View is one viewer's read-only window on one snapshot: every statistic it
// reports counts only documents the viewer may read. A View is cheap; take
// one per request and use it for the whole request so that search,
// feedback and snippets agree.
type View struct {
	s      *snapshot
	sc     *scope
	viewer access.Viewer
}

// View returns the current snapshot as seen by v.
func (ix *Index) View(v access.Viewer) *View {
	s := ix.snap.Load()
	v = v.Normalize()
	return &View{s: s, sc: s.scopeFor(v), viewer: v}
}

// Viewer returns whom the view is for.
func (w *View) Viewer() access.Viewer { return w.viewer }

// Generation identifies the snapshot (it grows with every commit).
func (w *View) Generation() uint64 { return w.s.gen }

// N is the number of documents the viewer may read.
func (w *View) N() int { return w.sc.n }

// TotalLen is the number of indexed tokens in those documents.
func (w *View) TotalLen() int64 { return w.sc.totalLen }

// AvgDL is their mean length in tokens (0 for an empty scope).
func (w *View) AvgDL() float64 {
	if w.sc.n == 0 {
		return 0
	}
	return float64(w.sc.totalLen) / float64(w.sc.n)
}

// TermID returns the ID of a stem, if the collection has it.
func (w *View) TermID(stem string) (uint32, bool) {
	id, ok := w.s.termID[stem]
	return id, ok
}

// Term returns the stem of a term ID.
func (w *View) Term(id uint32) string { return w.s.terms[id] }

// NumTerms is the size of the term dictionary (IDs are 0..NumTerms-1).
func (w *View) NumTerms() int { return len(w.s.terms) }

// DF is the number of readable documents containing term id.
func (w *View) DF(id uint32) int {
	n := 0
	for _, c := range w.sc.classes {
		n += int(w.s.classes[c].df[id])
	}
	return n
}

// CF is the number of occurrences of term id in readable documents.
func (w *View) CF(id uint32) int64 {
	var n int64
	for _, c := range w.sc.classes {
		n += int64(w.s.classes[c].cf[id])
	}
	return n
}

// CanRead reports whether document number d is readable in this view.
func (w *View) CanRead(d uint32) bool {
	return int(d) < len(w.s.docClass) && w.sc.visible[w.s.docClass[d]]
}

// DocID returns the external ID of document number d.
func (w *View) DocID(d uint32) string { return w.s.docs[d].ID }

// DocNum returns the number of a readable document by ID.
func (w *View) DocNum(id string) (uint32, bool) {
	d, ok := w.s.byID[id]
	if !ok || !w.CanRead(d) {
		return 0, false
	}
	return d, true
}

// DocLen is the length in tokens of document d.
func (w *View) DocLen(d uint32) int { return int(w.s.docLen[d]) }

// DocDept is the department of document d.
func (w *View) DocDept(d uint32) string { return w.s.docs[d].Dept }

// Tokens returns the term IDs of document d in order (shared; do not
// modify) and its paragraph starts.
func (w *View) Tokens(d uint32) ([]uint32, []int32) {
	x := w.s.docs[d]
	return x.Tokens, x.Breaks
}

// TermFreq is a term with its frequency in one document: the feedback
// models' own type, so a term vector goes to them as it is.
type TermFreq = prf.TermFreq

// Display returns the most common surface form of a stem or phrase key
// among documents the viewer may read, or the key itself.
func (w *View) Display(key string) string {
	m := text.NewSurfaces()
	if s := w.s.surf[""]; s != nil {
		addForms(m, s, key)
	}
	for _, g := range w.viewer.Groups {
		if s := w.s.surf[g]; s != nil {
			addForms(m, s, key)
		}
	}
	return m.Display(key)
}

func addForms(dst, src *text.Surfaces, key string) {
	for _, part := range splitKey(key) {
		for _, f := range src.Forms(part) {
			dst.AddN(part, f.Surface, f.Count)
		}
	}
}

// Gaps returns the token offsets of document d that follow removed
// stopwords (phrases are not detected across them).
func (w *View) Gaps(d uint32) []int32 { return w.s.docs[d].Gaps }

// DocSurfaces returns the surface-form IDs of document d's tokens
// (parallel to Tokens; shared, do not modify).
func (w *View) DocSurfaces(d uint32) []uint32 { return w.s.docs[d].Surf }

// Surface returns the written (folded) form of a surface ID.
func (w *View) Surface(id uint32) string { return w.s.forms[id] }

// DocGroups returns the access groups of document d (nil = open).
func (w *View) DocGroups(d uint32) []string { return w.s.docs[d].Groups }

// NumDocs is the number of documents in the snapshot, readable or not; use
// CanRead to filter.
func (w *View) NumDocs() int { return len(w.s.docs) }

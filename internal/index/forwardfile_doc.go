package index

import (
	"fmt"

	"kinword/internal/text"
)

// NumDocs is the number of documents.
func (ff *ForwardFile) NumDocs() int { return len(ff.ids) }

// NumTerms is the dictionary size.
func (ff *ForwardFile) NumTerms() int { return len(ff.terms) }

// Term returns a term ID's stem.
func (ff *ForwardFile) Term(id uint32) string { return ff.terms[id] }

// Surface returns a surface-form ID's written form.
func (ff *ForwardFile) Surface(id uint32) string { return ff.forms[id] }

// OpenDisplay is a stem's most common surface form among open documents
// only, so a display never comes from restricted text.
func (ff *ForwardFile) OpenDisplay(stem string) string {
	if s := ff.surf[""]; s != nil {
		return s.Display(stem)
	}
	return stem
}

// ForwardDoc is one document's term data as read from the file; its slices
// are reused by the next Doc call.
type ForwardDoc struct {
	ID           string
	Tokens, Surf []uint32
	Breaks, Gaps []int32
	Groups       []string
}

// Doc reads document i (in ID order, as numbered by the index).
func (ff *ForwardFile) Doc(i int) (ForwardDoc, error) {
	if i != ff.cur {
		if err := ff.load(i); err != nil {
			ff.cur = -1
			return ForwardDoc{}, err
		}
	}
	d := &ff.doc
	return ForwardDoc{ID: d.ID, Tokens: d.Tokens, Surf: d.Surf, Breaks: d.Breaks, Gaps: d.Gaps, Groups: d.Groups}, nil
}

func (ff *ForwardFile) load(i int) error {
	if i < 0 || i >= len(ff.ids) {
		return fmt.Errorf("index: forward document %d out of range", i)
	}
	n := ff.off[i+1] - ff.off[i]
	if int64(cap(ff.buf)) < n {
		ff.buf = make([]byte, n)
	}
	ff.buf = ff.buf[:n]
	if _, err := ff.f.ReadAt(ff.buf, ff.off[i]); err != nil {
		return fmt.Errorf("index: read forward document %d: %w", i, err)
	}
	d := &dec{b: ff.buf}
	x := &ff.doc
	x.ID = d.str()
	for k := 0; k < 4; k++ {
		d.str()
	}
	x.Groups = x.Groups[:0]
	for j, ng := 0, d.count(); j < ng && d.err == nil; j++ {
		x.Groups = append(x.Groups, d.str())
	}
	ntok := d.count()
	x.Tokens = grow32(x.Tokens, ntok)
	for j := range x.Tokens {
		x.Tokens[j] = uint32(d.uvarint())
	}
	x.Surf = grow32(x.Surf, ntok)
	for j := range x.Surf {
		x.Surf[j] = uint32(d.uvarint())
	}
	for _, dst := range []*[]int32{&x.Breaks, &x.Gaps} {
		nb := d.count()
		*dst = (*dst)[:0]
		for j := 0; j < nb && d.err == nil; j++ {
			*dst = append(*dst, int32(d.uvarint()))
		}
	}
	if d.err != nil {
		return fmt.Errorf("index: forward document %d: %w", i, d.err)
	}
	for _, t := range x.Tokens {
		if int(t) >= len(ff.terms) {
			return fmt.Errorf("%w: document %d has term id %d", ErrCorrupt, i, t)
		}
	}
	ff.cur = i
	return nil
}

func grow32(s []uint32, n int) []uint32 {
	if cap(s) < n {
		return make([]uint32, n)
	}
	return s[:n]
}

// Surfaces returns the open-scope surface table (for tests and tools).
func (ff *ForwardFile) Surfaces() *text.Surfaces { return ff.surf[""] }

// Close releases the file.
func (ff *ForwardFile) Close() error { return ff.f.Close() }

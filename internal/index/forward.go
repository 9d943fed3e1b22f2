package index

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"os"
	"path/filepath"
	"sort"
	"sync/atomic"

	"kinword/internal/text"
)

// fwdMagic opens a forward file; the last byte is the format version.
var fwdMagic = []byte("KWFWD\x00\x00\x03")

// fwdDoc is what Kinword keeps per document beside bleve: enough to score
// BM25, run feedback and mine associations without re-reading sources.
type fwdDoc struct {
	ID, Source, Hash, Lang, Dept string
	Groups                       []string // sorted; empty = open
	Tokens                       []uint32 // term IDs in order, stopwords removed
	Breaks                       []int32  // token offsets where paragraphs start
	Gaps                         []int32  // token offsets preceded by removed stopwords
	Surf                         []uint32 // surface-form IDs, parallel to Tokens
	// order caches Tokens' positions in term order (see termOrder); the
	// record's tokens never change once built, so it is kept across
	// snapshots.
	order atomic.Pointer[[]uint16]
}

// forward is the mutable per-document store. Terms are append-only so IDs
// stay stable across ingests.
type forward struct {
	gen    uint64
	terms  []string
	termID map[string]uint32
	// forms and formID are the dictionary of surface forms (folded words
	// as written), append-only like terms.
	forms  []string
	formID map[string]uint32
	docs   map[string]*fwdDoc
	// surf holds surface-form counts per access scope: "" for open
	// documents, else the group name, so a display form never comes only
	// from documents a viewer cannot read.
	surf map[string]*text.Surfaces
}

func newForward() *forward {
	return &forward{termID: map[string]uint32{}, formID: map[string]uint32{}, docs: map[string]*fwdDoc{}, surf: map[string]*text.Surfaces{}}
}

// internIn returns s's ID in an append-only dictionary, adding it if new.
func internIn(list *[]string, ids map[string]uint32, s string) uint32 {
	if id, ok := ids[s]; ok {
		return id
	}
	id := uint32(len(*list))
	*list = append(*list, s)
	ids[s] = id
	return id
}

func (f *forward) intern(stem string) uint32 { return internIn(&f.terms, f.termID, stem) }

func (f *forward) internForm(w string) uint32 { return internIn(&f.forms, f.formID, w) }

func (f *forward) surfaces(scope string) *text.Surfaces {
	s := f.surf[scope]
	if s == nil {
		s = text.NewSurfaces()
		f.surf[scope] = s
	}
	return s
}

// save writes the store atomically: a temp file in the same folder, fsync,
// rename, fsync of the folder.
func (f *forward) save(path string) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), ".forward-*.tmp")
	if err != nil {
		return fmt.Errorf("index: save forward: %w", err)
	}
	defer os.Remove(tmp.Name())
	e := newEnc(tmp)
	e.raw(fwdMagic)
	e.uvarint(f.gen)
	e.uvarint(uint64(len(f.terms)))
	for _, t := range f.terms {
		e.str(t)
	}
	e.uvarint(uint64(len(f.forms)))
	for _, t := range f.forms {
		e.str(t)
	}
	scopes := make([]string, 0, len(f.surf))
	for s := range f.surf {
		scopes = append(scopes, s)
	}
	sort.Strings(scopes)
	e.uvarint(uint64(len(scopes)))
	for _, sc := range scopes {
		e.str(sc)
		var rows [][3]any
		f.surf[sc].Each(func(stem, surface string, n uint32) { rows = append(rows, [3]any{stem, surface, n}) })
		e.uvarint(uint64(len(rows)))
		for _, r := range rows {
			e.str(r[0].(string))
			e.str(r[1].(string))
			e.uvarint(uint64(r[2].(uint32)))
		}
	}
	ids := make([]string, 0, len(f.docs))
	for id := range f.docs {
		ids = append(ids, id)
	}
	sort.Strings(ids)
	e.uvarint(uint64(len(ids)))
	for _, id := range ids {
		d := f.docs[id]
		for _, s := range []string{d.ID, d.Source, d.Hash, d.Lang, d.Dept} {
			e.str(s)
		}
		e.uvarint(uint64(len(d.Groups)))
		for _, g := range d.Groups {
			e.str(g)
		}
		e.uvarint(uint64(len(d.Tokens)))
		for _, t := range d.Tokens {
			e.uvarint(uint64(t))
		}
		for i := range d.Tokens {
			e.uvarint(uint64(d.Surf[i]))
		}
		for _, offs := range [][]int32{d.Breaks, d.Gaps} {
			e.uvarint(uint64(len(offs)))
			for _, b := range offs {
				e.uvarint(uint64(b))
			}
		}
	}
	if err := e.finish(); err != nil {
		tmp.Close()
		return fmt.Errorf("index: save forward: %w", err)
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return fmt.Errorf("index: sync forward: %w", err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("index: close forward: %w", err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("index: install forward: %w", err)
	}
	return syncDir(filepath.Dir(path))
}

func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return fmt.Errorf("index: sync dir: %w", err)
	}
	defer d.Close()
	if err := d.Sync(); err != nil {
		return fmt.Errorf("index: sync dir: %w", err)
	}
	return nil
}

// loadForward reads a forward file, checking magic, checksum and structure.
func loadForward(path string) (*forward, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("index: read forward: %w", err)
	}
	if len(b) < len(fwdMagic)+4 || !bytes.Equal(b[:len(fwdMagic)], fwdMagic) {
		return nil, fmt.Errorf("%w: %s: bad magic or version", ErrCorrupt, path)
	}
	body, trailer := b[:len(b)-4], b[len(b)-4:]
	if crc32.Checksum(body, castagnoli) != binary.LittleEndian.Uint32(trailer) {
		return nil, fmt.Errorf("%w: %s: checksum mismatch", ErrCorrupt, path)
	}
	d := &dec{b: body, off: len(fwdMagic)}
	f := newForward()
	f.gen = d.uvarint()
	nt := d.count()
	f.terms = make([]string, 0, nt)
	for i := 0; i < nt && d.err == nil; i++ {
		t := d.str()
		f.termID[t] = uint32(len(f.terms))
		f.terms = append(f.terms, t)
	}
	nf := d.count()
	f.forms = make([]string, 0, nf)
	for i := 0; i < nf && d.err == nil; i++ {
		w := d.str()
		f.formID[w] = uint32(len(f.forms))
		f.forms = append(f.forms, w)
	}
	ns := d.count()
	for i := 0; i < ns && d.err == nil; i++ {
		sc := f.surfaces(d.str())
		nr := d.count()
		for j := 0; j < nr && d.err == nil; j++ {
			stem, surface := d.str(), d.str()
			sc.AddN(stem, surface, uint32(d.uvarint()))
		}
	}
	nd := d.count()
	for i := 0; i < nd && d.err == nil; i++ {
		x := &fwdDoc{ID: d.str(), Source: d.str(), Hash: d.str(), Lang: d.str(), Dept: d.str()}
		ng := d.count()
		for j := 0; j < ng && d.err == nil; j++ {
			x.Groups = append(x.Groups, d.str())
		}
		ntok := d.count()
		x.Tokens = make([]uint32, ntok)
		for j := range x.Tokens {
			v := d.uvarint()
			if v >= uint64(len(f.terms)) && d.err == nil {
				d.err = fmt.Errorf("%w: term id %d out of range", ErrCorrupt, v)
			}
			x.Tokens[j] = uint32(v)
		}
		x.Surf = make([]uint32, ntok)
		for j := range x.Surf {
			v := d.uvarint()
			if v >= uint64(len(f.forms)) && d.err == nil {
				d.err = fmt.Errorf("%w: surface id %d out of range", ErrCorrupt, v)
			}
			x.Surf[j] = uint32(v)
		}
		for _, dst := range []*[]int32{&x.Breaks, &x.Gaps} {
			nb := d.count()
			*dst = make([]int32, nb)
			for j := range *dst {
				(*dst)[j] = int32(d.uvarint())
			}
		}
		f.docs[x.ID] = x
	}
	if d.err != nil {
		return nil, fmt.Errorf("index: load %s: %w", path, d.err)
	}
	if d.off != len(body) {
		return nil, fmt.Errorf("%w: %s: %d trailing bytes", ErrCorrupt, path, len(body)-d.off)
	}
	return f, nil
}

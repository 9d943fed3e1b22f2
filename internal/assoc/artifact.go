package assoc

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"math"
	"os"
	"path/filepath"
	"slices"
)

// Artifact layout (all integers little-endian):
//
//	header:  magic "KWASSOC\x00" | version u32 | section count u32 | CRC32C u32 of the 16 bytes before it
//	section: tag [4]byte | payload length u64 | CRC32C u32 of tag, length and payload | payload
//
// Sections, in order: "PARM" (build parameters, corpus fingerprint),
// "DICT" (term keys, displays, word counts), "SCOP" (scope names), then one
// "NBRS" per scope. Measures are not stored: they are recomputed exactly
// from the stored counts. Every NBRS payload starts with the scope index
// u32, documents u32, passages u64 and pairs u64. The open scope's (index
// 0) continues with its per-term passage, document and term frequencies,
// the n+1 list offsets and the neighbour columns (nb, k11, win, sup), all
// uint32. A group scope's continues with a delta against the open scope:
//
//	m u32 | term IDs [m] | udf [m] | df [m] | tf [m]   terms whose frequencies differ from the open scope's
//	d u32 | term IDs [d] | offsets [d+1] | refs [offsets[d]]   terms whose neighbour list differs
//	x u32 | nb [x] | k11 [x] | win [x] | sup [x]   the group's own entries
//
// Term IDs are strictly increasing; every other term has the open scope's
// frequencies and list. A ref below 2^31 is the index of an open entry of
// the same term with equal counts, else 2^31 plus an own entry's index.
// Version 1 stored every scope in full.
const (
	magic         = "KWASSOC\x00"
	formatVersion = 2
	headerBytes   = 20
	secHeadBytes  = 16
)

var crcTable = crc32.MakeTable(crc32.Castagnoli)

// Sentinel errors of Load.
var (
	ErrBadMagic  = errors.New("assoc: not an association table (bad magic)")
	ErrVersion   = errors.New("assoc: unsupported format version")
	ErrChecksum  = errors.New("assoc: checksum mismatch")
	ErrTruncated = errors.New("assoc: file truncated")
	ErrCorrupt   = errors.New("assoc: malformed content")
)

// numSections is the number of sections of the artifact: three plus one
// per scope.
func (t *Table) numSections() int { return 3 + len(t.scopes) }

// section returns the tag and payload of section i. Write builds one
// payload at a time, so the artifact never sits in memory whole.
func (t *Table) section(i int) (string, []byte) {
	switch i {
	case 0:
		var p enc
		p.u32(uint32(t.params.Window))
		p.u32(uint32(t.params.PassageLen))
		p.u32(uint32(t.params.MinDF))
		p.u32(uint32(int32(t.params.MinPhraseCount)))
		p.u64(math.Float64bits(t.params.MinPhraseLLR))
		p.u32(uint32(t.params.MinSupportDocs))
		p.u32(uint32(t.params.TopK))
		p.u32(uint32(t.params.Measure))
		p.b = append(p.b, t.fingerprint[:]...)
		p.u64(uint64(t.nDocs))
		p.u64(uint64(t.corpusTerms))
		return "PARM", p.b
	case 1:
		var d enc
		d.u32(uint32(t.numTerms()))
		d.u32s(t.keyOff)
		d.b = append(d.b, t.keys...)
		d.u32s(t.dispOff)
		d.b = append(d.b, t.disp...)
		d.b = append(d.b, t.words...)
		return "DICT", d.b
	case 2:
		var s enc
		s.u32(uint32(len(t.scopes)))
		for _, st := range t.scopes {
			s.str(st.name)
		}
		return "SCOP", s.b
	}
	return "NBRS", t.scopes[i-3].encode(uint32(i - 3))
}

// encode returns the scope's NBRS payload: in full for the open scope, as
// a delta against it for a group scope.
func (st *scopeTable) encode(idx uint32) []byte {
	var n enc
	n.u32(idx)
	n.u32(st.docs)
	n.u64(st.units)
	n.u64(st.pairs)
	if st.base == nil {
		n.b = slices.Grow(n.b, 4*(3*len(st.df)+len(st.off)+4*len(st.nb)))
		n.u32s(st.udf)
		n.u32s(st.df)
		n.u32s(st.tf)
		n.u32s(st.off)
	} else {
		var diff []uint32
		for id := range st.df {
			if st.udf[id] != st.base.udf[id] || st.df[id] != st.base.df[id] || st.tf[id] != st.base.tf[id] {
				diff = append(diff, uint32(id))
			}
		}
		n.b = slices.Grow(n.b, 4*(3+4*len(diff)+len(st.own)+len(st.off)+len(st.ref)+4*len(st.nb)))
		n.u32(uint32(len(diff)))
		n.u32s(diff)
		for _, col := range [][]uint32{st.udf, st.df, st.tf} {
			for _, id := range diff {
				n.u32(col[id])
			}
		}
		n.u32(uint32(len(st.own)))
		n.u32s(st.own)
		n.u32s(st.off)
		n.u32s(st.ref)
		n.u32(uint32(len(st.nb)))
	}
	n.u32s(st.nb)
	n.u32s(st.k11)
	n.u32s(st.win)
	n.u32s(st.sup)
	return n.b
}

func sectionCRC(tag string, payload []byte) uint32 {
	var h [12]byte
	copy(h[:4], tag)
	binary.LittleEndian.PutUint64(h[4:], uint64(len(payload)))
	return crc32.Update(crc32.Checksum(h[:], crcTable), crcTable, payload)
}

// Write stores the table at path atomically: it writes a temporary file in
// the same folder, syncs it, renames it over path and syncs the folder. An
// existing file at path is replaced only by a complete new one.
func (t *Table) Write(path string) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("assoc: write: %w", err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriterSize(f, 1<<20)
	var hdr [headerBytes]byte
	copy(hdr[:], magic)
	binary.LittleEndian.PutUint32(hdr[8:], formatVersion)
	binary.LittleEndian.PutUint32(hdr[12:], uint32(t.numSections()))
	binary.LittleEndian.PutUint32(hdr[16:], crc32.Checksum(hdr[:16], crcTable))
	bw.Write(hdr[:])
	for i := range t.numSections() {
		tag, payload := t.section(i)
		var sh [secHeadBytes]byte
		copy(sh[:4], tag)
		binary.LittleEndian.PutUint64(sh[4:], uint64(len(payload)))
		binary.LittleEndian.PutUint32(sh[12:], sectionCRC(tag, payload))
		bw.Write(sh[:])
		bw.Write(payload)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("assoc: write %s: %w", path, err)
	}
	if err = f.Chmod(0o640); err != nil {
		return fmt.Errorf("assoc: write %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("assoc: write %s: sync: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("assoc: write %s: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("assoc: write %s: %w", path, err)
	}
	if d, derr := os.Open(dir); derr == nil {
		serr := d.Sync()
		d.Close()
		if serr != nil {
			return fmt.Errorf("assoc: write %s: sync folder: %w", path, serr)
		}
	}
	return nil
}

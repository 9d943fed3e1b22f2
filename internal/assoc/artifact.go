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
)

// Artifact layout (all integers little-endian):
//
//	header:  magic "KWASSOC\x00" | version u32 | section count u32 | CRC32C u32 of the 16 bytes before it
//	section: tag [4]byte | payload length u64 | CRC32C u32 of tag, length and payload | payload
//
// Sections, in order: "PARM" (build parameters, corpus fingerprint),
// "DICT" (term keys, displays, word counts), "SCOP" (scope names), then one
// "NBRS" per scope (per-term passage, document and term frequencies and the
// neighbour lists as columns of uint32). Measures are not stored: they are
// recomputed exactly from the stored counts.
const (
	magic         = "KWASSOC\x00"
	formatVersion = 1
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

// sections returns the artifact's section tags and payloads.
func (t *Table) sections() ([]string, [][]byte) {
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

	var d enc
	d.u32(uint32(t.numTerms()))
	d.u32s(t.keyOff)
	d.b = append(d.b, t.keys...)
	d.u32s(t.dispOff)
	d.b = append(d.b, t.disp...)
	d.b = append(d.b, t.words...)

	var s enc
	s.u32(uint32(len(t.scopes)))
	for _, st := range t.scopes {
		s.str(st.name)
	}
	tags := []string{"PARM", "DICT", "SCOP"}
	payloads := [][]byte{p.b, d.b, s.b}
	for i, st := range t.scopes {
		var n enc
		n.b = make([]byte, 0, 24+4*(3*len(st.df)+len(st.off)+4*len(st.nb)))
		n.u32(uint32(i))
		n.u32(st.docs)
		n.u64(st.units)
		n.u64(st.pairs)
		n.u32s(st.udf)
		n.u32s(st.df)
		n.u32s(st.tf)
		n.u32s(st.off)
		n.u32s(st.nb)
		n.u32s(st.k11)
		n.u32s(st.win)
		n.u32s(st.sup)
		tags = append(tags, "NBRS")
		payloads = append(payloads, n.b)
	}
	return tags, payloads
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
	tags, payloads := t.sections()
	var hdr [headerBytes]byte
	copy(hdr[:], magic)
	binary.LittleEndian.PutUint32(hdr[8:], formatVersion)
	binary.LittleEndian.PutUint32(hdr[12:], uint32(len(tags)))
	binary.LittleEndian.PutUint32(hdr[16:], crc32.Checksum(hdr[:16], crcTable))
	bw.Write(hdr[:])
	for i, tag := range tags {
		var sh [secHeadBytes]byte
		copy(sh[:4], tag)
		binary.LittleEndian.PutUint64(sh[4:], uint64(len(payloads[i])))
		binary.LittleEndian.PutUint32(sh[12:], sectionCRC(tag, payloads[i]))
		bw.Write(sh[:])
		bw.Write(payloads[i])
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

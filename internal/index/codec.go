package index

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"hash"
	"hash/crc32"
	"io"
)

// ErrCorrupt reports a forward file that fails its checks.
var ErrCorrupt = errors.New("index: corrupt forward file")

var castagnoli = crc32.MakeTable(crc32.Castagnoli)

// enc writes uvarints and strings through a running CRC-32C.
type enc struct {
	w     *bufio.Writer
	under io.Writer
	crc   hash.Hash32
	buf   [binary.MaxVarintLen64]byte
	err   error
}

func newEnc(w io.Writer) *enc {
	crc := crc32.New(castagnoli)
	return &enc{w: bufio.NewWriterSize(io.MultiWriter(w, crc), 1<<20), under: w, crc: crc}
}

func (e *enc) uvarint(v uint64) {
	if e.err != nil {
		return
	}
	n := binary.PutUvarint(e.buf[:], v)
	_, e.err = e.w.Write(e.buf[:n])
}

func (e *enc) str(s string) {
	e.uvarint(uint64(len(s)))
	if e.err == nil {
		_, e.err = e.w.WriteString(s)
	}
}

func (e *enc) raw(b []byte) {
	if e.err == nil {
		_, e.err = e.w.Write(b)
	}
}

// finish flushes and appends the checksum of everything written.
func (e *enc) finish() error {
	if e.err != nil {
		return e.err
	}
	if err := e.w.Flush(); err != nil {
		return err
	}
	var sum [4]byte
	binary.LittleEndian.PutUint32(sum[:], e.crc.Sum32())
	// The trailer goes straight to the file, outside the checksum.
	_, err := e.under.Write(sum[:])
	return err
}

// dec reads what enc wrote from a byte slice.
type dec struct {
	b   []byte
	off int
	err error
}

func (d *dec) uvarint() uint64 {
	if d.err != nil {
		return 0
	}
	v, n := binary.Uvarint(d.b[d.off:])
	if n <= 0 {
		d.err = fmt.Errorf("%w: bad varint at byte %d", ErrCorrupt, d.off)
		return 0
	}
	d.off += n
	return v
}

// count reads a length and checks it against the bytes left (each element
// takes at least one byte), so a corrupt length cannot force a huge
// allocation.
func (d *dec) count() int {
	v := d.uvarint()
	if d.err == nil && v > uint64(len(d.b)-d.off) {
		d.err = fmt.Errorf("%w: length %d exceeds remaining %d bytes at byte %d", ErrCorrupt, v, len(d.b)-d.off, d.off)
		return 0
	}
	return int(v)
}

func (d *dec) str() string {
	n := d.count()
	if d.err != nil {
		return ""
	}
	s := string(d.b[d.off : d.off+n])
	d.off += n
	return s
}

func (d *dec) rawN(n int) []byte {
	if d.err != nil {
		return nil
	}
	if n > len(d.b)-d.off {
		d.err = fmt.Errorf("%w: truncated at byte %d", ErrCorrupt, d.off)
		return nil
	}
	b := d.b[d.off : d.off+n]
	d.off += n
	return b
}

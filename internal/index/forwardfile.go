package index

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"io"
	"os"

	"kinword/internal/text"
)

// ForwardFile reads a committed forward store from disk one document at a
// time, for offline work over large collections (mining) that must not hold
// every document in memory. Only the dictionaries and per-document offsets
// are kept; each Doc call reads and decodes one document. It is not safe
// for concurrent use.
type ForwardFile struct {
	f       *os.File
	terms   []string
	forms   []string
	surf    map[string]*text.Surfaces
	off     []int64 // start of each document record, plus the end
	ids     []string
	buf     []byte
	cur     int // document decoded in the fields below, -1 for none
	doc     fwdDoc
	dataEnd int64
}

// OpenForward opens the forward store of an index folder (dir/forward.kwf),
// verifying its checksum and structure in two streaming passes.
func OpenForward(dir string) (*ForwardFile, error) {
	path := dir + "/forward.kwf"
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("index: open forward: %w", err)
	}
	ff := &ForwardFile{f: f, cur: -1, surf: map[string]*text.Surfaces{}}
	if err := ff.check(path); err != nil {
		f.Close()
		return nil, err
	}
	if err := ff.scan(path); err != nil {
		f.Close()
		return nil, err
	}
	return ff, nil
}

// check verifies the trailing CRC-32C over the whole file.
func (ff *ForwardFile) check(path string) error {
	st, err := ff.f.Stat()
	if err != nil {
		return fmt.Errorf("index: forward: %w", err)
	}
	size := st.Size()
	if size < int64(len(fwdMagic))+4 {
		return fmt.Errorf("%w: %s: truncated", ErrCorrupt, path)
	}
	ff.dataEnd = size - 4
	h := crc32.New(castagnoli)
	if _, err := io.Copy(h, io.NewSectionReader(ff.f, 0, ff.dataEnd)); err != nil {
		return fmt.Errorf("index: forward: %w", err)
	}
	var trailer [4]byte
	if _, err := ff.f.ReadAt(trailer[:], ff.dataEnd); err != nil {
		return fmt.Errorf("index: forward: %w", err)
	}
	if h.Sum32() != binary.LittleEndian.Uint32(trailer[:]) {
		return fmt.Errorf("%w: %s: checksum mismatch", ErrCorrupt, path)
	}
	return nil
}

// countingReader tracks the offset of a buffered reader.
type countingReader struct {
	r   *bufio.Reader
	off int64
	err error
}

func (c *countingReader) ReadByte() (byte, error) {
	b, err := c.r.ReadByte()
	if err == nil {
		c.off++
	}
	return b, err
}

func (c *countingReader) uvarint() uint64 {
	if c.err != nil {
		return 0
	}
	v, err := binary.ReadUvarint(c)
	if err != nil {
		c.err = fmt.Errorf("%w: bad varint at byte %d", ErrCorrupt, c.off)
	}
	return v
}

func (c *countingReader) str() string {
	n := c.uvarint()
	if c.err != nil || n > 1<<24 {
		if c.err == nil {
			c.err = fmt.Errorf("%w: string length %d at byte %d", ErrCorrupt, n, c.off)
		}
		return ""
	}
	b := make([]byte, n)
	if _, err := io.ReadFull(c.r, b); err != nil {
		c.err = fmt.Errorf("%w: truncated at byte %d", ErrCorrupt, c.off)
		return ""
	}
	c.off += int64(n)
	return string(b)
}

// scan reads the dictionaries and records where each document starts.
func (ff *ForwardFile) scan(path string) error {
	c := &countingReader{r: bufio.NewReaderSize(io.NewSectionReader(ff.f, 0, ff.dataEnd), 1<<20)}
	magic := make([]byte, len(fwdMagic))
	if _, err := io.ReadFull(c.r, magic); err != nil || !bytes.Equal(magic, fwdMagic) {
		return fmt.Errorf("%w: %s: bad magic or version", ErrCorrupt, path)
	}
	c.off = int64(len(fwdMagic))
	c.uvarint() // generation
	for i, n := 0, int(c.uvarint()); i < n && c.err == nil; i++ {
		ff.terms = append(ff.terms, c.str())
	}
	for i, n := 0, int(c.uvarint()); i < n && c.err == nil; i++ {
		ff.forms = append(ff.forms, c.str())
	}
	for i, n := 0, int(c.uvarint()); i < n && c.err == nil; i++ {
		sc := text.NewSurfaces()
		ff.surf[c.str()] = sc
		for j, m := 0, int(c.uvarint()); j < m && c.err == nil; j++ {
			stem, surface := c.str(), c.str()
			sc.AddN(stem, surface, uint32(c.uvarint()))
		}
	}
	nd := int(c.uvarint())
	for i := 0; i < nd && c.err == nil; i++ {
		ff.off = append(ff.off, c.off)
		ff.ids = append(ff.ids, c.str())
		for k := 0; k < 4; k++ {
			c.str()
		}
		for j, n := 0, int(c.uvarint()); j < n && c.err == nil; j++ {
			c.str()
		}
		ntok := int(c.uvarint())
		for j := 0; j < 2*ntok && c.err == nil; j++ {
			c.uvarint()
		}
		for k := 0; k < 2; k++ {
			for j, n := 0, int(c.uvarint()); j < n && c.err == nil; j++ {
				c.uvarint()
			}
		}
	}
	if c.err != nil {
		return fmt.Errorf("index: scan %s: %w", path, c.err)
	}
	if c.off != ff.dataEnd {
		return fmt.Errorf("%w: %s: %d trailing bytes", ErrCorrupt, path, ff.dataEnd-c.off)
	}
	ff.off = append(ff.off, c.off)
	return nil
}

package assoc

import (
	"encoding/binary"
	"fmt"
)

// enc appends little-endian fields to a payload.
type enc struct{ b []byte }

func (e *enc) u32(v uint32) { e.b = binary.LittleEndian.AppendUint32(e.b, v) }
func (e *enc) u64(v uint64) { e.b = binary.LittleEndian.AppendUint64(e.b, v) }
func (e *enc) str(s string) { e.u32(uint32(len(s))); e.b = append(e.b, s...) }
func (e *enc) u32s(vs []uint32) {
	for _, v := range vs {
		e.u32(v)
	}
}

// dec reads a verified payload; overruns are structural corruption.
type dec struct {
	b   []byte
	err error
}

func (d *dec) take(n uint64) []byte {
	if d.err != nil {
		return nil
	}
	if n > uint64(len(d.b)) {
		d.err = fmt.Errorf("%w: field runs past its section", ErrCorrupt)
		return nil
	}
	v := d.b[:n]
	d.b = d.b[n:]
	return v
}

func (d *dec) u32() uint32 {
	if b := d.take(4); b != nil {
		return binary.LittleEndian.Uint32(b)
	}
	return 0
}

func (d *dec) u64() uint64 {
	if b := d.take(8); b != nil {
		return binary.LittleEndian.Uint64(b)
	}
	return 0
}

func (d *dec) u32s(n uint64) []uint32 {
	b := d.take(4 * n)
	if b == nil {
		return nil
	}
	out := make([]uint32, n)
	for i := range out {
		out[i] = binary.LittleEndian.Uint32(b[4*i:])
	}
	return out
}

func (d *dec) end(what string) error {
	if d.err == nil && len(d.b) != 0 {
		d.err = fmt.Errorf("%w: %d bytes left over in %s", ErrCorrupt, len(d.b), what)
	}
	return d.err
}

// offsets checks that off starts at 0, never decreases and ends at most
// at limit.
func offsets(off []uint32, limit uint64, what string) error {
	if len(off) == 0 || off[0] != 0 {
		return fmt.Errorf("%w: %s offsets do not start at 0", ErrCorrupt, what)
	}
	for i := 1; i < len(off); i++ {
		if off[i] < off[i-1] {
			return fmt.Errorf("%w: %s offsets decrease at %d", ErrCorrupt, what, i)
		}
	}
	if uint64(off[len(off)-1]) > limit {
		return fmt.Errorf("%w: %s offsets exceed the data", ErrCorrupt, what)
	}
	return nil
}

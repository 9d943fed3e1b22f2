package assoc

import (
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"math"
	"os"
	"strings"
)

// Load reads a table written by Write. It checks the magic, the version,
// every length and every checksum, then the structure, and fails with an
// error wrapping ErrBadMagic, ErrVersion, ErrTruncated, ErrChecksum or
// ErrCorrupt.
func Load(path string) (*Table, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("assoc: load: %w", err)
	}
	t, err := decode(data)
	if err != nil {
		return nil, fmt.Errorf("assoc: load %s: %w", path, err)
	}
	return t, nil
}

func decode(data []byte) (*Table, error) {
	if len(data) < len(magic) {
		if strings.HasPrefix(magic, string(data)) {
			return nil, fmt.Errorf("%w: %d bytes, header needs %d", ErrTruncated, len(data), headerBytes)
		}
		return nil, ErrBadMagic
	}
	if string(data[:len(magic)]) != magic {
		return nil, ErrBadMagic
	}
	if len(data) < headerBytes {
		return nil, fmt.Errorf("%w: %d bytes, header needs %d", ErrTruncated, len(data), headerBytes)
	}
	if v := binary.LittleEndian.Uint32(data[8:]); v != formatVersion {
		return nil, fmt.Errorf("%w: file has version %d, this build reads %d", ErrVersion, v, formatVersion)
	}
	if got, want := crc32.Checksum(data[:16], crcTable), binary.LittleEndian.Uint32(data[16:]); got != want {
		return nil, fmt.Errorf("%w: header (stored %08x, computed %08x)", ErrChecksum, want, got)
	}
	nsec := binary.LittleEndian.Uint32(data[12:])
	if nsec < 4 {
		return nil, fmt.Errorf("%w: %d sections, need at least 4", ErrCorrupt, nsec)
	}
	rest := data[headerBytes:]
	var payloads [][]byte
	for i := uint32(0); i < nsec; i++ {
		if len(rest) < secHeadBytes {
			return nil, fmt.Errorf("%w: section %d of %d missing", ErrTruncated, i+1, nsec)
		}
		tag := string(rest[:4])
		n := binary.LittleEndian.Uint64(rest[4:])
		sum := binary.LittleEndian.Uint32(rest[12:])
		rest = rest[secHeadBytes:]
		if n > uint64(len(rest)) {
			return nil, fmt.Errorf("%w: section %d (%q) declares %d bytes, %d remain", ErrTruncated, i+1, tag, n, len(rest))
		}
		payload := rest[:n]
		rest = rest[n:]
		if got := sectionCRC(tag, payload); got != sum {
			return nil, fmt.Errorf("%w: section %d (%q) (stored %08x, computed %08x)", ErrChecksum, i+1, tag, sum, got)
		}
		want := "NBRS"
		if i < 3 {
			want = [3]string{"PARM", "DICT", "SCOP"}[i]
		}
		if tag != want {
			return nil, fmt.Errorf("%w: section %d is %q, want %q", ErrCorrupt, i+1, tag, want)
		}
		payloads = append(payloads, payload)
	}
	if len(rest) != 0 {
		return nil, fmt.Errorf("%w: %d bytes after the last section", ErrCorrupt, len(rest))
	}
	t := &Table{}
	if err := t.decodeParams(payloads[0]); err != nil {
		return nil, err
	}
	if err := t.decodeDict(payloads[1]); err != nil {
		return nil, err
	}
	names, err := decodeScopes(payloads[2])
	if err != nil {
		return nil, err
	}
	if int(nsec)-3 != len(names) {
		return nil, fmt.Errorf("%w: %d scopes named, %d scope sections", ErrCorrupt, len(names), nsec-3)
	}
	for i, name := range names {
		st, err := t.decodeScope(payloads[3+i], i, name)
		if err != nil {
			return nil, err
		}
		t.scopes = append(t.scopes, st)
	}
	return t, nil
}

func (t *Table) decodeParams(b []byte) error {
	d := &dec{b: b}
	p := &t.params
	p.Window = int(d.u32())
	p.PassageLen = int(d.u32())
	p.MinDF = int(d.u32())
	p.MinPhraseCount = int(int32(d.u32()))
	p.MinPhraseLLR = math.Float64frombits(d.u64())
	p.MinSupportDocs = int(d.u32())
	p.TopK = int(d.u32())
	m := d.u32()
	p.Measure = Measure(m)
	copy(t.fingerprint[:], d.take(32))
	nDocs, nTerms := d.u64(), d.u64()
	if err := d.end("parameters"); err != nil {
		return err
	}
	if nDocs > math.MaxInt32 || nTerms > math.MaxInt32 {
		return fmt.Errorf("%w: corpus size %d documents, %d terms", ErrCorrupt, nDocs, nTerms)
	}
	t.nDocs, t.corpusTerms = int(nDocs), int(nTerms)
	if m >= uint32(numMeasures) {
		return fmt.Errorf("%w: measure %d", ErrCorrupt, m)
	}
	return nil
}

func (t *Table) decodeDict(b []byte) error {
	d := &dec{b: b}
	n := uint64(d.u32())
	if n > uint64(len(b))/9 { // each term needs >= 9 bytes of offsets and word count
		return fmt.Errorf("%w: dictionary claims %d terms in %d bytes", ErrCorrupt, n, len(b))
	}
	t.keyOff = d.u32s(n + 1)
	if d.err != nil {
		return d.err
	}
	if err := offsets(t.keyOff, uint64(len(d.b)), "key"); err != nil {
		return err
	}
	t.keys = string(d.take(uint64(t.keyOff[n])))
	t.dispOff = d.u32s(n + 1)
	if d.err != nil {
		return d.err
	}
	if err := offsets(t.dispOff, uint64(len(d.b)), "display"); err != nil {
		return err
	}
	t.disp = string(d.take(uint64(t.dispOff[n])))
	t.words = append([]uint8(nil), d.take(n)...)
	if err := d.end("dictionary"); err != nil {
		return err
	}
	for i := uint32(0); i < uint32(n); i++ {
		if w := t.words[i]; w < 1 || w > 3 {
			return fmt.Errorf("%w: term %d has %d words", ErrCorrupt, i, w)
		}
		if i > 0 && t.term(i-1) >= t.term(i) {
			return fmt.Errorf("%w: dictionary not in strict key order at %d", ErrCorrupt, i)
		}
	}
	return nil
}

func decodeScopes(b []byte) ([]string, error) {
	d := &dec{b: b}
	n := uint64(d.u32())
	if n == 0 || n > uint64(len(b))/4 {
		return nil, fmt.Errorf("%w: %d scopes", ErrCorrupt, n)
	}
	names := make([]string, 0, n)
	for i := uint64(0); i < n && d.err == nil; i++ {
		names = append(names, string(d.take(uint64(d.u32()))))
	}
	if err := d.end("scopes"); err != nil {
		return nil, err
	}
	if names[0] != OpenScope {
		return nil, fmt.Errorf("%w: first scope is %q, want the open scope", ErrCorrupt, names[0])
	}
	for i := 2; i < len(names); i++ {
		if names[i-1] >= names[i] {
			return nil, fmt.Errorf("%w: scope names not in strict order at %d", ErrCorrupt, i)
		}
	}
	if len(names) > 1 && names[1] == "" {
		return nil, fmt.Errorf("%w: empty group scope name", ErrCorrupt)
	}
	return names, nil
}

func (t *Table) decodeScope(b []byte, idx int, name string) (*scopeTable, error) {
	d := &dec{b: b}
	if got := d.u32(); d.err == nil && int(got) != idx {
		return nil, fmt.Errorf("%w: scope section %d says it is scope %d", ErrCorrupt, idx, got)
	}
	st := &scopeTable{name: name, docs: d.u32(), units: d.u64(), pairs: d.u64()}
	n := uint64(t.numTerms())
	if idx == 0 {
		if 4*(4*n+1) > uint64(len(d.b)) {
			return nil, fmt.Errorf("%w: scope %q too short for %d terms", ErrCorrupt, name, n)
		}
		st.udf, st.df, st.tf, st.off = d.u32s(n), d.u32s(n), d.u32s(n), d.u32s(n+1)
		if d.err != nil {
			return nil, d.err
		}
		if err := offsets(st.off, uint64(len(d.b))/16, "neighbour"); err != nil {
			return nil, err
		}
		m := uint64(st.off[n])
		st.nb, st.k11, st.win, st.sup = d.u32s(m), d.u32s(m), d.u32s(m), d.u32s(m)
	} else if err := t.decodeDelta(d, st); err != nil {
		return nil, err
	}
	if err := d.end("scope " + name); err != nil {
		return nil, err
	}
	for a := uint32(0); a < uint32(n); a++ {
		sp := st.entries(a)
		if uint64(st.udf[a]) > st.units || (st.df[a] == 0 && (st.udf[a] != 0 || sp.n != 0)) {
			return nil, fmt.Errorf("%w: scope %q term %d has inconsistent counts", ErrCorrupt, name, a)
		}
		for i := range sp.n {
			src, e := sp.at(i)
			b := src.nb[e]
			if uint64(b) >= n || b == a || st.df[b] == 0 {
				return nil, fmt.Errorf("%w: scope %q term %d has a neighbour outside the scope", ErrCorrupt, name, a)
			}
			k, ua, ub := uint64(src.k11[e]), uint64(st.udf[a]), uint64(st.udf[b])
			if k == 0 || k > ua || k > ub || ua+ub-k > st.units {
				return nil, fmt.Errorf("%w: scope %q pair (%d, %d) has impossible counts", ErrCorrupt, name, a, b)
			}
		}
	}
	return st, nil
}

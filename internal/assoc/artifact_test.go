package assoc

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"kinword/internal/access"
)

func scopedTable(t testing.TB) *Table {
	t.Helper()
	tb, err := Mine(context.Background(), scopedCorpus(true), Options{MinPhraseCount: 3})
	if err != nil {
		t.Fatal(err)
	}
	return tb
}

func TestArtifactRoundTrip(t *testing.T) {
	tb := scopedTable(t)
	path := filepath.Join(t.TempDir(), "a.kwassoc")
	if err := tb.Write(path); err != nil {
		t.Fatal(err)
	}
	got, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got.Info(), tb.Info()) {
		t.Errorf("info differs:\n%+v\n%+v", got.Info(), tb.Info())
	}
	v := access.Viewer{Groups: []string{"hr", "ops"}}
	for id := range uint32(tb.numTerms()) {
		for _, m := range allMeasures {
			if a, b := tb.Neighbours(v, id, m, 0), got.Neighbours(v, id, m, 0); !reflect.DeepEqual(a, b) {
				t.Fatalf("term %q %v: neighbours differ", tb.term(id), m)
			}
		}
	}
	if !reflect.DeepEqual(got.PhrasesFor(v), tb.PhrasesFor(v)) {
		t.Error("phrases differ")
	}
	// Writing the loaded table gives the same bytes.
	a, _ := os.ReadFile(path)
	if b := writeBytes(t, got); !bytes.Equal(a, b) {
		t.Error("rewrite differs")
	}
	if fi, _ := os.Stat(path); fi.Mode().Perm() != 0o640 {
		t.Errorf("mode %v", fi.Mode().Perm())
	}
	if entries, _ := os.ReadDir(filepath.Dir(path)); len(entries) != 1 {
		t.Errorf("temporary files left: %v", entries)
	}
}

// sectionBounds returns [start, end) of each section's payload.
func sectionBounds(data []byte) [][2]int {
	var out [][2]int
	pos := headerBytes
	for pos < len(data) {
		n := int(binary.LittleEndian.Uint64(data[pos+4:]))
		out = append(out, [2]int{pos + secHeadBytes, pos + secHeadBytes + n})
		pos += secHeadBytes + n
	}
	return out
}

func TestArtifactCorruption(t *testing.T) {
	tb := scopedTable(t)
	good := writeBytes(t, tb)
	type tc struct {
		name   string
		mutate func([]byte) []byte
		want   error
	}
	flip := func(i int) func([]byte) []byte {
		return func(b []byte) []byte { b[i] ^= 0x40; return b }
	}
	cases := []tc{
		{"magic", flip(0), ErrBadMagic},
		{"not ours", func([]byte) []byte { return []byte("PK\x03\x04 zip file") }, ErrBadMagic},
		{"version", flip(8), ErrVersion},
		{"section count", flip(12), ErrChecksum},
		{"header checksum", flip(17), ErrChecksum},
		{"empty", func([]byte) []byte { return nil }, ErrTruncated},
		{"half magic", func(b []byte) []byte { return b[:4] }, ErrTruncated},
		{"header only", func(b []byte) []byte { return b[:headerBytes] }, ErrTruncated},
		{"trailing bytes", func(b []byte) []byte { return append(b, 0) }, ErrCorrupt},
	}
	for i, sb := range sectionBounds(good) {
		tag := string(good[sb[0]-secHeadBytes : sb[0]-secHeadBytes+4])
		name := tag + "#" + string(rune('0'+i))
		cases = append(cases,
			tc{name + " first payload byte", flip(sb[0]), ErrChecksum},
			tc{name + " middle payload byte", flip((sb[0] + sb[1]) / 2), ErrChecksum},
			tc{name + " last payload byte", flip(sb[1] - 1), ErrChecksum},
			tc{name + " tag", flip(sb[0] - secHeadBytes), ErrChecksum},
			tc{name + " stored checksum", flip(sb[0] - 2), ErrChecksum},
			tc{name + " length grown", flip(sb[0] - secHeadBytes + 4 + 5), ErrTruncated},
			tc{name + " truncated mid-payload", func(b []byte) []byte { return b[:(sb[0]+sb[1])/2] }, ErrTruncated},
			tc{name + " truncated before section", func(b []byte) []byte { return b[:sb[0]-secHeadBytes] }, ErrTruncated},
		)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			data := c.mutate(bytes.Clone(good))
			path := filepath.Join(t.TempDir(), "bad.kwassoc")
			if err := os.WriteFile(path, data, 0o600); err != nil {
				t.Fatal(err)
			}
			got, err := Load(path)
			if !errors.Is(err, c.want) || got != nil {
				t.Fatalf("Load = %v, %v; want %v", got, err, c.want)
			}
			t.Log(err)
		})
	}
}

// TestLoadRejectsCraftedContent: a file with valid checksums but a
// neighbour pointing outside its scope (an attempt to leak a term) fails.
func TestLoadRejectsCraftedContent(t *testing.T) {
	tb := scopedTable(t)
	canary, ok := tb.LookupFor(access.Viewer{Groups: []string{"hr"}}, "zyxcanary")
	if !ok {
		t.Fatal("canary missing")
	}
	open := tb.scopes[0]
	for e := range open.nb {
		open.nb[e] = canary
		break
	}
	data := writeBytes(t, tb)
	if _, err := decode(data); !errors.Is(err, ErrCorrupt) {
		t.Fatalf("decode = %v, want ErrCorrupt", err)
	}
}

// sections returns every section's tag and payload, in file order.
func (t *Table) sections() ([]string, [][]byte) {
	var tags []string
	var payloads [][]byte
	for i := range t.numSections() {
		tag, p := t.section(i)
		tags, payloads = append(tags, tag), append(payloads, p)
	}
	return tags, payloads
}

func fuzzSeedTable(f *testing.F) *Table {
	tb, err := Mine(context.Background(), scopedCorpus(true), Options{TopK: 3, MinPhraseCount: 3})
	if err != nil {
		f.Fatal(err)
	}
	return tb
}

// FuzzLoad: arbitrary bytes never panic Load's decoder.
func FuzzLoad(f *testing.F) {
	tb := fuzzSeedTable(f)
	p := filepath.Join(f.TempDir(), "seed.kwassoc")
	if err := tb.Write(p); err != nil {
		f.Fatal(err)
	}
	good, _ := os.ReadFile(p)
	f.Add(good)
	f.Add(good[:len(good)/2])
	f.Add([]byte(magic))
	f.Add([]byte{})
	f.Fuzz(func(t *testing.T, data []byte) { exercise(t, data) })
}

// FuzzLoadSections fuzzes section payloads behind valid checksums, so that
// the structural checks (not just the CRCs) meet hostile input.
func FuzzLoadSections(f *testing.F) {
	tags, payloads := fuzzSeedTable(f).sections()
	f.Add(payloads[0], payloads[1], payloads[2], payloads[3], payloads[4], payloads[5])
	f.Add(payloads[0], payloads[1], []byte{1, 0, 0, 0, 0, 0, 0, 0}, payloads[3], payloads[4], payloads[5])
	f.Fuzz(func(t *testing.T, parm, dict, scop, n0, n1, n2 []byte) {
		parts := [][]byte{parm, dict, scop, n0, n1, n2}
		var hdr [headerBytes]byte
		copy(hdr[:], magic)
		binary.LittleEndian.PutUint32(hdr[8:], formatVersion)
		binary.LittleEndian.PutUint32(hdr[12:], uint32(len(parts)))
		binary.LittleEndian.PutUint32(hdr[16:], crc32.Checksum(hdr[:16], crcTable))
		data := hdr[:]
		for i, pl := range parts {
			var sh [secHeadBytes]byte
			copy(sh[:4], tags[min(i, len(tags)-1)])
			binary.LittleEndian.PutUint64(sh[4:], uint64(len(pl)))
			binary.LittleEndian.PutUint32(sh[12:], sectionCRC(tags[min(i, len(tags)-1)], pl))
			data = append(append(data, sh[:]...), pl...)
		}
		exercise(t, data)
	})
}

func exercise(t *testing.T, data []byte) {
	tb, err := decode(data)
	if (tb == nil) == (err == nil) {
		t.Fatalf("decode returned table %v and error %v", tb != nil, err)
	}
	if tb == nil {
		return
	}
	tb.Info()
	v := access.Viewer{Groups: []string{"hr", "ops"}}
	tb.PhrasesFor(v)
	for id := range uint32(tb.numTerms()) {
		for _, n := range tb.Neighbours(v, id, MeasureNPMI, 0) {
			if n.K11 <= 0 || n.K12 < 0 || n.K21 < 0 || n.K22 < 0 {
				t.Fatalf("impossible contingency %+v", n)
			}
		}
	}
}

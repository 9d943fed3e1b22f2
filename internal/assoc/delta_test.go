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
	"strings"
	"testing"

	"kinword/internal/access"
)

// deltaViewers covers no group, each group alone, overlapping sets, a
// group no document has and one that only blank-group documents name.
var deltaViewers = []access.Viewer{
	access.Anonymous,
	{Groups: []string{"hr"}},
	{Groups: []string{"ops"}},
	{Groups: []string{"fin"}},
	{Groups: []string{"hr", "ops"}},
	{Groups: []string{"fin", "hr", "ops"}},
	{Groups: []string{"nosuchgroup"}},
	{Groups: []string{" "}},
}

// sameAnswers fails unless got answers every (viewer, term, measure)
// query exactly like want: Visible, LookupFor, Neighbours, Related,
// PhrasesFor and PhrasesWith, neighbour Scope attribution included. Both
// tables must share one dictionary (mined from the same corpus).
func sameAnswers(t *testing.T, want, got *Table, measures []Measure) {
	t.Helper()
	if !reflect.DeepEqual(got.Info(), want.Info()) {
		t.Fatalf("info differs:\n got %+v\nwant %+v", got.Info(), want.Info())
	}
	stems := map[string]bool{}
	for id := range uint32(want.numTerms()) {
		for _, w := range strings.Fields(want.term(id)) {
			stems[w] = true
		}
	}
	for _, v := range deltaViewers {
		if a, b := got.PhrasesFor(v), want.PhrasesFor(v); !reflect.DeepEqual(a, b) {
			t.Fatalf("viewer %v: PhrasesFor differs", v.Groups)
		}
		for s := range stems {
			if a, b := got.PhrasesWith(v, s), want.PhrasesWith(v, s); !reflect.DeepEqual(a, b) {
				t.Fatalf("viewer %v: PhrasesWith(%q) differs", v.Groups, s)
			}
		}
		for id := range uint32(want.numTerms()) {
			term := want.term(id)
			if a, b := got.Visible(v, id), want.Visible(v, id); a != b {
				t.Fatalf("viewer %v term %q: visible %v, want %v", v.Groups, term, a, b)
			}
			for _, m := range measures {
				a, b := got.Neighbours(v, id, m, 0), want.Neighbours(v, id, m, 0)
				if !reflect.DeepEqual(a, b) {
					t.Fatalf("viewer %v term %q %v: neighbours differ\n got %+v\nwant %+v", v.Groups, term, m, a, b)
				}
			}
			m := measures[id%uint32(len(measures))]
			if a, b := got.Related(v, term, m, 5), want.Related(v, term, m, 5); !reflect.DeepEqual(a, b) {
				t.Fatalf("viewer %v term %q %v: related differs", v.Groups, term, m)
			}
		}
	}
}

// TestDeltaScopesAnswerLikeFullScopes: group scopes stored as deltas
// against the open scope answer every query exactly like group scopes
// stored in full (the uncompressed representation, built by mine with
// full set), before and after a round trip through the artifact.
// Differential testing against the uncompressed form is common practice.
func TestDeltaScopesAnswerLikeFullScopes(t *testing.T) {
	cases := []struct {
		name     string
		c        *MemCorpus
		opts     Options
		measures []Measure
	}{
		{"canary corpus", scopedCorpus(true), Options{MinPhraseCount: 3}, allMeasures},
		{"canary corpus top3", scopedCorpus(true), Options{TopK: 3, MinPhraseCount: 3}, allMeasures},
		{"grouped synthetic", synthCorpus(groupedSpec()), Options{}, []Measure{MeasureLLR, MeasureCondProb}},
		{"grouped synthetic no phrases", synthCorpus(groupedSpec()),
			Options{MinPhraseCount: -1, Measure: MeasureCondProb, TopK: 10}, []Measure{MeasureCondProb, MeasureNPMI}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ctx := context.Background()
			full, err := mine(ctx, c.c, c.opts, true)
			if err != nil {
				t.Fatal(err)
			}
			delta, err := mine(ctx, c.c, c.opts, false)
			if err != nil {
				t.Fatal(err)
			}
			if len(delta.scopes) < 2 {
				t.Fatalf("%d scopes; the test needs groups", len(delta.scopes))
			}
			shared := 0
			for _, st := range delta.scopes[1:] {
				if st.base != delta.scopes[0] {
					t.Fatalf("scope %q is not a delta", st.name)
				}
				shared += delta.numTerms() - len(st.own)
			}
			if shared == 0 {
				t.Fatal("no group term shares the open list; the test is weak")
			}
			sameAnswers(t, full, delta, c.measures)

			path := filepath.Join(t.TempDir(), "d.kwassoc")
			if err := delta.Write(path); err != nil {
				t.Fatal(err)
			}
			loaded, err := Load(path)
			if err != nil {
				t.Fatal(err)
			}
			sameAnswers(t, full, loaded, c.measures)
			a, _ := os.ReadFile(path)
			if b := writeBytes(t, loaded); !bytes.Equal(a, b) {
				t.Error("rewrite of the loaded table differs")
			}
		})
	}
}

// TestLoadRejectsVersion1: files of the full-scope format 1 are refused
// with ErrVersion, not misread as deltas.
func TestLoadRejectsVersion1(t *testing.T) {
	data := writeBytes(t, scopedTable(t))
	binary.LittleEndian.PutUint32(data[8:], 1)
	binary.LittleEndian.PutUint32(data[16:], crc32.Checksum(data[:16], crcTable))
	if _, err := decode(data); !errors.Is(err, ErrVersion) {
		t.Fatalf("decode = %v, want ErrVersion", err)
	}
}

// TestLoadRejectsCraftedDelta: a group delta whose inherited open list
// would point at a term the group does not have fails the structural
// checks even with valid checksums.
func TestLoadRejectsCraftedDelta(t *testing.T) {
	cases := []struct {
		name   string
		mutate func(tb *Table)
	}{
		{"own list IDs out of order", func(tb *Table) {
			st := tb.scopes[1]
			if len(st.own) < 2 {
				t.Skip("too few own lists")
			}
			st.own[0], st.own[1] = st.own[1], st.own[0]
		}},
		{"own list ID past the dictionary", func(tb *Table) {
			st := tb.scopes[1]
			st.own[len(st.own)-1] = uint32(tb.numTerms())
		}},
		{"reference past the own entries", func(tb *Table) {
			st := tb.scopes[1]
			st.ref[0] = refOwn + uint32(len(st.nb))
		}},
		{"reference to another term's open entry", func(tb *Table) {
			st := tb.scopes[1]
			for i, id := range st.own {
				for j := st.off[i]; j < st.off[i+1]; j++ {
					if st.ref[j] < refOwn && int(st.base.off[id+1]) < len(st.base.nb) {
						st.ref[j] = st.base.off[id+1]
						return
					}
				}
			}
			t.Skip("no reference to an open entry")
		}},
		{"inherited neighbour outside the group", func(tb *Table) {
			st := tb.scopes[1]
			for id := range uint32(tb.numTerms()) {
				if sp := st.entries(id); sp.src != st && sp.ref == nil && sp.n > 0 {
					b := sp.src.nb[sp.lo]
					st.df[b], st.udf[b], st.tf[b] = 0, 0, 0
					return
				}
			}
			t.Skip("no inherited list")
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tb := scopedTable(t)
			c.mutate(tb)
			if _, err := decode(writeBytes(t, tb)); !errors.Is(err, ErrCorrupt) {
				t.Fatalf("decode = %v, want ErrCorrupt", err)
			}
		})
	}
}

// TestNeighboursCacheMatchesReference: the cached, reference-based
// Neighbours list equals the straightforward build (neighboursRef) for
// every term, viewer, measure and cut, on the first call and on a cache hit.
func TestNeighboursCacheMatchesReference(t *testing.T) {
	tb, err := Mine(context.Background(), synthCorpus(groupedSpec()), Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range deltaViewers {
		scopes := tb.viewerScopes(v)
		for id := range uint32(tb.numTerms()) {
			if !tb.Visible(v, id) {
				continue
			}
			for _, m := range []Measure{MeasureLLR, MeasureNPMI, MeasureCondProb} {
				for _, k := range []int{0, 3, 20} {
					want := neighboursRef(tb, scopes, id, m, k)
					for call := range 2 {
						if got := tb.Neighbours(v, id, m, k); !reflect.DeepEqual(got, want) {
							t.Fatalf("viewer %v term %q measure %v k %d call %d:\n got %+v\nwant %+v", v.Groups, tb.term(id), m, k, call, got, want)
						}
					}
				}
			}
		}
	}
}

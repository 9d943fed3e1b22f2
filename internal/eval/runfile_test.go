package eval

import (
	"bytes"
	"errors"
	"math"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// Run-file layout "qid Q0 docno rank sim tag" and the tie-break below are
// trec_eval's (NIST trec_eval README and its result sorting, which orders by
// sim descending then docno descending and ignores the rank column; from
// memory).

func TestSortRunTrecEvalTies(t *testing.T) {
	s := []Scored{
		{"d10", 1.5}, {"d9", 1.5}, {"a", 2}, {"z", 0.5}, {"d2", 1.5}, {"n", math.NaN()},
	}
	SortRun(s)
	want := []string{"a", "d9", "d2", "d10", "z", "n"}
	if got := DocIDs(s); !slices.Equal(got, want) {
		t.Errorf("SortRun order = %v, want %v (score desc, then docid desc bytewise, NaN last)", got, want)
	}
}

func TestWriteRun(t *testing.T) {
	runs := map[string][]Scored{
		"10": {{"d3", 0.25}},
		"2":  {{"d1", 12.5}, {"d7", 1e-7}},
	}
	var b bytes.Buffer
	if err := WriteRun(&b, "bm25", runs); err != nil {
		t.Fatal(err)
	}
	want := "2 Q0 d1 1 12.5 bm25\n2 Q0 d7 2 1e-07 bm25\n10 Q0 d3 1 0.25 bm25\n"
	if b.String() != want {
		t.Errorf("WriteRun =\n%s\nwant\n%s", b.String(), want)
	}
}

func TestWriteRunInvalid(t *testing.T) {
	tests := []struct {
		name string
		tag  string
		runs map[string][]Scored
	}{
		{"empty tag", "", map[string][]Scored{"1": {{"d", 1}}}},
		{"tag with space", "bm 25", map[string][]Scored{"1": {{"d", 1}}}},
		{"qid with tab", "t", map[string][]Scored{"1\t2": {{"d", 1}}}},
		{"empty docid", "t", map[string][]Scored{"1": {{"", 1}}}},
		{"nan score", "t", map[string][]Scored{"1": {{"d", math.NaN()}}}},
		{"inf score", "t", map[string][]Scored{"1": {{"d", math.Inf(-1)}}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var b bytes.Buffer
			err := WriteRun(&b, tc.tag, tc.runs)
			if !errors.Is(err, ErrInvalid) {
				t.Fatalf("err = %v, want ErrInvalid", err)
			}
			if b.Len() != 0 {
				t.Errorf("wrote %q before failing", b.String())
			}
		})
	}
}

func TestRunRoundTrip(t *testing.T) {
	runs := map[string][]Scored{
		"1": {{"d5", 3.75}, {"d4", 3.75}, {"d1", -0.1}},
		"7": {{"x", 1.0 / 3}},
	}
	var b bytes.Buffer
	if err := WriteRun(&b, "rm3", runs); err != nil {
		t.Fatal(err)
	}
	got, tag, err := ReadRun(&b)
	if err != nil {
		t.Fatal(err)
	}
	if tag != "rm3" || !reflect.DeepEqual(got, runs) {
		t.Errorf("round trip = %v %v, want rm3 %v", tag, got, runs)
	}
}

func TestReadRunResorts(t *testing.T) {
	// The rank column says d1 first, but trec_eval ranks by score.
	in := "1 Q0 d1 1 0.5 t\n1\tQ0\td2\t2\t0.9\tt\n1 Q0 d3 3 0.9 t\n"
	got, _, err := ReadRun(strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	if ids := DocIDs(got["1"]); !slices.Equal(ids, []string{"d3", "d2", "d1"}) {
		t.Errorf("order = %v, want [d3 d2 d1]", ids)
	}
}

func TestReadRunMalformed(t *testing.T) {
	tests := []struct {
		name string
		in   string
		line int
		msg  string
	}{
		{"five fields", "1 Q0 d1 1 0.5\n", 1, "got 5"},
		{"bad rank", "1 Q0 d1 one 0.5 t\n", 1, `rank "one"`},
		{"bad score", "1 Q0 d1 1 high t\n", 1, `score "high"`},
		{"nan score", "1 Q0 d1 1 NaN t\n", 1, "finite"},
		{"tag change", "1 Q0 d1 1 1 a\n1 Q0 d2 2 0 b\n", 2, `"b" differs`},
		{"repeated doc", "1 Q0 d1 1 1 a\n2 Q0 d1 1 1 a\n\n1 Q0 d1 2 0 a\n", 4, "first on line 1"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := ReadRun(strings.NewReader(tc.in))
			checkParseError(t, err, "run", tc.line, tc.msg)
		})
	}
}

func TestReadRunEmpty(t *testing.T) {
	got, tag, err := ReadRun(strings.NewReader("\n\n"))
	if err != nil || tag != "" || len(got) != 0 {
		t.Errorf("ReadRun(blank) = %v %q %v, want empty", got, tag, err)
	}
}

package eval

import (
	"errors"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// The topics layout (qid<TAB>query, optional department column) is the one
// described in the shared collections README; the qrels layout
// "qid iter docno rel" is the TREC relevance-judgment format documented
// with NIST trec_eval (from memory).

func TestReadTopics(t *testing.T) {
	tests := []struct {
		name string
		in   string
		want []Topic
	}{
		{"two columns", "1\twhat is heat transfer .\n2\tboundary layers\n",
			[]Topic{{ID: "1", Text: "what is heat transfer ."}, {ID: "2", Text: "boundary layers"}}},
		{"three columns", "T7\tfield-operations\tmain valve shutoff\n",
			[]Topic{{ID: "T7", Department: "field-operations", Text: "main valve shutoff"}}},
		{"mixed forms", "1\tpump curves\n2\tbilling\ttariff codes\n",
			[]Topic{{ID: "1", Text: "pump curves"}, {ID: "2", Department: "billing", Text: "tariff codes"}}},
		{"bom crlf blanks and padding", "\ufeff1\t pump curves \r\n\r\n   \n2\tmeters\r\n",
			[]Topic{{ID: "1", Text: "pump curves"}, {ID: "2", Text: "meters"}}},
		{"no trailing newline", "9\tlast line", []Topic{{ID: "9", Text: "last line"}}},
		{"empty input", "", nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ReadTopics(strings.NewReader(tc.in))
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("got %+v, want %+v", got, tc.want)
			}
		})
	}
}

func TestReadTopicsMalformed(t *testing.T) {
	tests := []struct {
		name string
		in   string
		line int
		msg  string
	}{
		{"one field", "1\tok\n2 no tab here\n", 2, "got 1"},
		{"four fields", "1\ta\tb\tc\n", 1, "got 4"},
		{"empty id", "\tquery\n", 1, "empty topic id"},
		{"id with space", "1 2\tquery\n", 1, "whitespace"},
		{"empty text", "1\t  \n", 1, "empty query text"},
		{"repeat after blank", "1\ta\n\n1\tb\n", 3, "first on line 1"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadTopics(strings.NewReader(tc.in))
			checkParseError(t, err, "topics", tc.line, tc.msg)
		})
	}
}

func TestReadQrels(t *testing.T) {
	in := "1 0 12 2\n1\t0\t13\t0\n2 Q0 d9 -1\n\n10 0 5 4\r\n"
	q, err := ReadQrels(strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	want := Qrels{"1": {"12": 2, "13": 0}, "2": {"d9": -1}, "10": {"5": 4}}
	if !reflect.DeepEqual(q, want) {
		t.Fatalf("got %v, want %v", q, want)
	}
	if got := q.Topics(); !slices.Equal(got, []string{"1", "2", "10"}) {
		t.Errorf("Topics() = %v, want numeric order [1 2 10]", got)
	}
	if got := q.RelevantPairs(); got != 2 {
		t.Errorf("RelevantPairs = %d, want 2 (grades 2 and 4; 0 and -1 are judged non-relevant)", got)
	}
	if got := q.JudgedPairs(); got != 4 {
		t.Errorf("JudgedPairs = %d, want 4", got)
	}
	if got := q.NumRelevant("1"); got != 1 {
		t.Errorf("NumRelevant(1) = %d, want 1", got)
	}
}

func TestReadQrelsMalformed(t *testing.T) {
	tests := []struct {
		name string
		in   string
		line int
		msg  string
	}{
		{"three fields", "1 0 12 1\n1 0 13\n", 2, "got 3"},
		{"five fields", "1 0 12 1 x\n", 1, "got 5"},
		{"grade not integer", "1 0 12 1.5\n", 1, `"1.5"`},
		{"repeated pair", "1 0 12 1\n2 0 12 1\n1 0 12 0\n", 3, "repeated judgment"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadQrels(strings.NewReader(tc.in))
			checkParseError(t, err, "qrels", tc.line, tc.msg)
		})
	}
}

func TestReadLineTooLong(t *testing.T) {
	in := "1\t" + strings.Repeat("a", maxLineBytes+10) + "\n"
	_, err := ReadTopics(strings.NewReader(in))
	if err == nil || !strings.Contains(err.Error(), "topics line 1") {
		t.Fatalf("err = %v, want an error naming topics line 1", err)
	}
}

func TestCompareQID(t *testing.T) {
	ids := []string{"b", "10", "2", "a10", "002", "1", "a9"}
	slices.SortFunc(ids, compareQID)
	want := []string{"1", "002", "2", "10", "a10", "a9", "b"}
	if !slices.Equal(ids, want) {
		t.Errorf("sorted = %v, want %v", ids, want)
	}
}

func checkParseError(t *testing.T, err error, kind string, line int, msg string) {
	t.Helper()
	if !errors.Is(err, ErrMalformed) {
		t.Fatalf("err = %v, want ErrMalformed", err)
	}
	var pe *ParseError
	if !errors.As(err, &pe) {
		t.Fatalf("err = %T, want *ParseError", err)
	}
	if pe.Kind != kind || pe.Line != line {
		t.Errorf("error at %s line %d, want %s line %d (%v)", pe.Kind, pe.Line, kind, line, err)
	}
	if !strings.Contains(err.Error(), msg) {
		t.Errorf("error %q does not mention %q", err, msg)
	}
}

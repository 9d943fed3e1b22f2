package eval

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"unicode"
)

// ErrMalformed is matched (errors.Is) by every error a reader returns for
// input that does not follow the file format. The concrete error is a
// *ParseError that names the file kind and the line number.
var ErrMalformed = errors.New("eval: malformed input")

// ErrInvalid is returned by writers and report helpers for values that
// cannot be represented, such as a document id containing whitespace or a
// NaN score.
var ErrInvalid = errors.New("eval: invalid value")

// ErrUnknownMethod is returned by report helpers asked for a method that the
// report does not hold.
var ErrUnknownMethod = errors.New("eval: unknown method")

// ParseError describes one malformed line. It matches ErrMalformed.
type ParseError struct {
	// Kind is the file kind: "topics", "qrels" or "run".
	Kind string
	// Line is the 1-based line number in the input.
	Line int
	// Msg says what is wrong with the line.
	Msg string
}

// Error implements error.
func (e *ParseError) Error() string {
	return fmt.Sprintf("eval: %s line %d: %s", e.Kind, e.Line, e.Msg)
}

// Unwrap lets errors.Is(err, ErrMalformed) succeed.
func (e *ParseError) Unwrap() error { return ErrMalformed }

func malformed(kind string, line int, format string, args ...any) error {
	return &ParseError{Kind: kind, Line: line, Msg: fmt.Sprintf(format, args...)}
}

// maxLineBytes bounds one input line (1 MiB); longer lines are an error.
const maxLineBytes = 1 << 20

// Topic is one query of a test collection.
type Topic struct {
	// ID is the topic id as written in the file (no whitespace).
	ID string `json:"id"`
	// Department is the optional owning department of the 3-column form;
	// empty in the 2-column form.
	Department string `json:"department,omitempty"`
	// Text is the query text.
	Text string `json:"text"`
}

// Qrels holds relevance judgments: qid -> docid -> grade. A grade of at
// least RelevanceLevel is relevant; lower grades are judged non-relevant.
type Qrels map[string]map[string]int

// Topics returns the judged topic ids in qid order.
func (q Qrels) Topics() []string {
	ids := make([]string, 0, len(q))
	for id := range q {
		ids = append(ids, id)
	}
	slices.SortFunc(ids, compareQID)
	return ids
}

// NumRelevant returns the number of relevant documents judged for qid.
func (q Qrels) NumRelevant(qid string) int { return NumRelevant(q[qid]) }

// RelevantPairs returns the number of (topic, document) pairs judged
// relevant over all topics.
func (q Qrels) RelevantPairs() int {
	n := 0
	for _, j := range q {
		n += NumRelevant(j)
	}
	return n
}

// JudgedPairs returns the number of judgment lines kept, relevant or not.
func (q Qrels) JudgedPairs() int {
	n := 0
	for _, j := range q {
		n += len(j)
	}
	return n
}

// ReadTopics reads a topics file: one topic a line, either
// "qid<TAB>query" or "qid<TAB>department<TAB>query". Blank lines are
// skipped, a UTF-8 byte-order mark and CR line ends are tolerated, and
// fields are trimmed of surrounding spaces. Topics are returned in file
// order; a repeated qid is an error.
func ReadTopics(r io.Reader) ([]Topic, error) {
	var topics []Topic
	seen := map[string]int{}
	err := scanLines(r, "topics", func(n int, line string) error {
		f := strings.Split(line, "\t")
		for i := range f {
			f[i] = strings.TrimSpace(f[i])
		}
		var t Topic
		switch len(f) {
		case 2:
			t = Topic{ID: f[0], Text: f[1]}
		case 3:
			t = Topic{ID: f[0], Department: f[1], Text: f[2]}
		default:
			return malformed("topics", n, "want 2 or 3 tab-separated fields, got %d", len(f))
		}
		switch {
		case t.ID == "":
			return malformed("topics", n, "empty topic id")
		case strings.ContainsFunc(t.ID, unicode.IsSpace):
			return malformed("topics", n, "topic id %q contains whitespace", t.ID)
		case t.Text == "":
			return malformed("topics", n, "topic %s has empty query text", t.ID)
		}
		if first, dup := seen[t.ID]; dup {
			return malformed("topics", n, "topic %s repeated (first on line %d)", t.ID, first)
		}
		seen[t.ID] = n
		topics = append(topics, t)
		return nil
	})
	return topics, err
}

// ReadQrels reads TREC relevance judgments, one "qid iter docid grade" a
// line separated by spaces or tabs. The iteration field is ignored, as in
// trec_eval. Grades are integers; grade-0 (and negative) lines are kept as
// judged non-relevant. A repeated (qid, docid) pair is an error.
func ReadQrels(r io.Reader) (Qrels, error) {
	q := Qrels{}
	err := scanLines(r, "qrels", func(n int, line string) error {
		f := strings.Fields(line)
		if len(f) != 4 {
			return malformed("qrels", n, "want 4 fields \"qid iter docid grade\", got %d", len(f))
		}
		grade, err := strconv.Atoi(f[3])
		if err != nil {
			return malformed("qrels", n, "grade %q is not an integer", f[3])
		}
		j := q[f[0]]
		if j == nil {
			j = map[string]int{}
			q[f[0]] = j
		}
		if _, dup := j[f[2]]; dup {
			return malformed("qrels", n, "repeated judgment for topic %s document %s", f[0], f[2])
		}
		j[f[2]] = grade
		return nil
	})
	if err != nil {
		return nil, err
	}
	return q, nil
}

// scanLines calls fn for every non-blank line with its 1-based number, the
// byte-order mark and trailing CR removed.
func scanLines(r io.Reader, kind string, fn func(n int, line string) error) error {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), maxLineBytes)
	n := 0
	for sc.Scan() {
		n++
		line := strings.TrimSuffix(sc.Text(), "\r")
		if n == 1 {
			line = strings.TrimPrefix(line, "\ufeff")
		}
		if strings.TrimSpace(line) == "" {
			continue
		}
		if err := fn(n, line); err != nil {
			return err
		}
	}
	if err := sc.Err(); err != nil {
		return fmt.Errorf("eval: %s line %d: %w", kind, n+1, err)
	}
	return nil
}

// compareQID orders topic ids numerically when both are decimal integers
// (shorter digit strings first after dropping leading zeros), integers
// before other ids, and bytewise otherwise.
func compareQID(a, b string) int {
	da, db := isDigits(a), isDigits(b)
	switch {
	case da && db:
		ta, tb := strings.TrimLeft(a, "0"), strings.TrimLeft(b, "0")
		if len(ta) != len(tb) {
			return len(ta) - len(tb)
		}
		if c := strings.Compare(ta, tb); c != 0 {
			return c
		}
	case da:
		return -1
	case db:
		return 1
	}
	return strings.Compare(a, b)
}

func isDigits(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

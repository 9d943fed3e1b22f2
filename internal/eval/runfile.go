package eval

import (
	"bufio"
	"cmp"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode"
)

// Scored is one retrieved document with its retrieval score.
type Scored struct {
	// DocID is the document id (no whitespace).
	DocID string `json:"doc_id"`
	// Score is the retrieval score; higher is better. It must be finite to
	// be written to a run file.
	Score float64 `json:"score"`
}

// SortRun orders s in place the way trec_eval ranks a run: by score
// descending, then by document id descending in byte order (so among equal
// scores "d9" ranks above "d10"). trec_eval ignores the rank column of a run
// file and re-sorts this way, so a ranking sorted by SortRun gives the same
// measures here as trec_eval does. NaN scores sort last.
func SortRun(s []Scored) {
	slices.SortStableFunc(s, func(a, b Scored) int {
		if c := cmp.Compare(b.Score, a.Score); c != 0 {
			return c
		}
		return strings.Compare(b.DocID, a.DocID)
	})
}

// DocIDs returns the document ids of s in order, ready for Evaluate.
func DocIDs(s []Scored) []string {
	ids := make([]string, len(s))
	for i, d := range s {
		ids[i] = d.DocID
	}
	return ids
}

// WriteRun writes runs as a TREC run file, one "qid Q0 docid rank score tag"
// line per document, topics in qid order and documents in slice order with
// ranks 1, 2, ... Call SortRun first when the slices are not already in
// trec_eval order. Scores are written in the shortest form that reads back
// exactly. Ids and the tag must be non-empty and free of whitespace, and
// scores finite; otherwise WriteRun returns an error matching ErrInvalid
// before writing anything.
func WriteRun(w io.Writer, runTag string, runs map[string][]Scored) error {
	if err := checkToken("run tag", runTag); err != nil {
		return err
	}
	qids := make([]string, 0, len(runs))
	for qid, docs := range runs {
		if err := checkToken("topic id", qid); err != nil {
			return err
		}
		for _, d := range docs {
			if err := checkToken("document id", d.DocID); err != nil {
				return fmt.Errorf("%w (topic %s)", err, qid)
			}
			if math.IsNaN(d.Score) || math.IsInf(d.Score, 0) {
				return fmt.Errorf("%w: topic %s document %s: score %v is not finite", ErrInvalid, qid, d.DocID, d.Score)
			}
		}
		qids = append(qids, qid)
	}
	slices.SortFunc(qids, compareQID)
	bw := bufio.NewWriter(w)
	for _, qid := range qids {
		for i, d := range runs[qid] {
			bw.WriteString(qid)
			bw.WriteString(" Q0 ")
			bw.WriteString(d.DocID)
			bw.WriteByte(' ')
			bw.WriteString(strconv.Itoa(i + 1))
			bw.WriteByte(' ')
			bw.WriteString(strconv.FormatFloat(d.Score, 'g', -1, 64))
			bw.WriteByte(' ')
			bw.WriteString(runTag)
			bw.WriteByte('\n')
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("eval: write run: %w", err)
	}
	return nil
}

// ReadRun reads a TREC run file ("qid Q0 docid rank score tag" lines,
// separated by spaces or tabs). The second field is ignored and the rank
// must be an integer but is otherwise ignored: as trec_eval does, each
// topic's documents are returned re-sorted by SortRun. A repeated document
// within a topic, a non-finite score, or a tag differing from the first
// line's is an error matching ErrMalformed. tag is the run tag ("" for an
// empty file).
func ReadRun(r io.Reader) (runs map[string][]Scored, tag string, err error) {
	runs = map[string][]Scored{}
	seen := map[string]map[string]int{}
	err = scanLines(r, "run", func(n int, line string) error {
		f := strings.Fields(line)
		if len(f) != 6 {
			return malformed("run", n, "want 6 fields \"qid Q0 docid rank score tag\", got %d", len(f))
		}
		qid, doc := f[0], f[2]
		if _, err := strconv.Atoi(f[3]); err != nil {
			return malformed("run", n, "rank %q is not an integer", f[3])
		}
		score, err := strconv.ParseFloat(f[4], 64)
		if err != nil || math.IsNaN(score) || math.IsInf(score, 0) {
			return malformed("run", n, "score %q is not a finite number", f[4])
		}
		if tag == "" {
			tag = f[5]
		} else if f[5] != tag {
			return malformed("run", n, "run tag %q differs from %q of the first line", f[5], tag)
		}
		docs := seen[qid]
		if docs == nil {
			docs = map[string]int{}
			seen[qid] = docs
		}
		if first, dup := docs[doc]; dup {
			return malformed("run", n, "topic %s lists document %s again (first on line %d)", qid, doc, first)
		}
		docs[doc] = n
		runs[qid] = append(runs[qid], Scored{DocID: doc, Score: score})
		return nil
	})
	if err != nil {
		return nil, "", err
	}
	for _, docs := range runs {
		SortRun(docs)
	}
	return runs, tag, nil
}

func checkToken(what, s string) error {
	if s == "" {
		return fmt.Errorf("%w: empty %s", ErrInvalid, what)
	}
	if strings.ContainsFunc(s, unicode.IsSpace) {
		return fmt.Errorf("%w: %s %q contains whitespace", ErrInvalid, what, s)
	}
	return nil
}

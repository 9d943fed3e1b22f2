package demo

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
)

// Judged file names inside a corpus folder such as testdata/tarnwick.
const (
	TopicsFile      = "topics.tsv"      // qid TAB department TAB query
	KindsFile       = "topic-kinds.tsv" // qid TAB kind
	QrelsFile       = "qrels.txt"       // TREC qrels: qid 0 docid grade
	PreferencesFile = "preferences.tsv" // qid TAB department TAB term|term|...
	CanariesFile    = "canaries.tsv"    // term TAB group
)

// Topic kinds, as written in topic-kinds.tsv.
const (
	KindMismatch  = "mismatch"  // searcher words share no stem with relevant titles
	KindAmbiguous = "ambiguous" // same text asked by two departments: "X01-fo", "X01-it"
	KindOrdinary  = "ordinary"  // a straightforward question
)

// MaxGrade is the highest relevance grade in qrels.txt (0..3).
const MaxGrade = 3

// ErrMalformed is wrapped by every error LoadJudged returns for bad content
// (as opposed to an unreadable file); branch with errors.Is.
var ErrMalformed = errors.New("demo: malformed judged file")

// Topic is one judged query.
type Topic struct {
	ID         string // qid, e.g. "M01" or "X01-fo"
	Department string // the asker's department slug
	Text       string // the query as typed
	Kind       string // KindMismatch, KindAmbiguous or KindOrdinary
}

// Canary is an invented term that may occur only in documents of Group.
type Canary struct {
	Term  string // the coinage, as written in canaries.tsv
	Group string // the access group whose documents alone may hold it
}

// Judged is the judged side of a demo corpus: topics, graded relevance,
// the expansion terms each ambiguous side accepts, and canary terms.
type Judged struct {
	// Topics in topics.tsv order, each with its kind.
	Topics []Topic
	// Qrels maps qid -> docid -> grade (0..MaxGrade).
	Qrels map[string]map[string]int
	// Preferences maps qid -> expansion terms the asker would accept.
	Preferences map[string][]string
	// Canaries in canaries.tsv order.
	Canaries []Canary
}

// LoadJudged reads the five judged files of dir. Blank lines and lines
// starting with "#" are ignored. Besides syntax it checks consistency: no
// duplicate qid or judgement, every topic has exactly one known kind, and
// every kind, judgement and preference names a known topic (preferences
// also with the topic's department). Errors name the file and line.
func LoadJudged(dir string) (*Judged, error) {
	j := &Judged{Qrels: map[string]map[string]int{}, Preferences: map[string][]string{}}
	steps := []struct {
		name  string
		parse func(*Judged, *lineReader) error
	}{
		{TopicsFile, parseTopics},
		{KindsFile, parseKinds},
		{QrelsFile, parseQrels},
		{PreferencesFile, parsePreferences},
		{CanariesFile, parseCanaries},
	}
	for _, s := range steps {
		b, err := os.ReadFile(filepath.Join(dir, s.name))
		if err != nil {
			return nil, fmt.Errorf("demo: load judged: %w", err)
		}
		if err := s.parse(j, newLineReader(s.name, b)); err != nil {
			return nil, err
		}
	}
	for _, t := range j.Topics {
		if t.Kind == "" {
			return nil, &lineError{file: KindsFile, msg: fmt.Sprintf("topic %s has no kind", t.ID)}
		}
	}
	return j, nil
}

// Topic returns the topic with id qid and whether it exists.
func (j *Judged) Topic(qid string) (Topic, bool) {
	for _, t := range j.Topics {
		if t.ID == qid {
			return t, true
		}
	}
	return Topic{}, false
}

// Kind returns the kind of topic qid, or "" when there is no such topic.
func (j *Judged) Kind(qid string) string {
	t, _ := j.Topic(qid)
	return t.Kind
}

// ByKind returns the topics of one kind in file order.
func (j *Judged) ByKind(kind string) []Topic {
	var out []Topic
	for _, t := range j.Topics {
		if t.Kind == kind {
			out = append(out, t)
		}
	}
	return out
}

// AmbiguousPairs groups the ambiguous topics by base qid (the part before
// the first "-": "X01-fo" and "X01-it" under "X01"), sides sorted by qid.
func (j *Judged) AmbiguousPairs() map[string][]Topic {
	out := map[string][]Topic{}
	for _, t := range j.ByKind(KindAmbiguous) {
		base, _, _ := strings.Cut(t.ID, "-")
		out[base] = append(out[base], t)
	}
	for _, sides := range out {
		sort.Slice(sides, func(a, b int) bool { return sides[a].ID < sides[b].ID })
	}
	return out
}

// Relevant returns the docids judged grade >= min for qid, sorted.
func (j *Judged) Relevant(qid string, min int) []string {
	var out []string
	for id, g := range j.Qrels[qid] {
		if g >= min {
			out = append(out, id)
		}
	}
	sort.Strings(out)
	return out
}

func parseTopics(j *Judged, r *lineReader) error {
	seen := map[string]bool{}
	for r.next() {
		f, err := r.fields(3)
		if err != nil {
			return err
		}
		if seen[f[0]] {
			return r.errorf("duplicate topic %s", f[0])
		}
		seen[f[0]] = true
		j.Topics = append(j.Topics, Topic{ID: f[0], Department: f[1], Text: f[2]})
	}
	return nil
}

func parseKinds(j *Judged, r *lineReader) error {
	index := map[string]int{}
	for i, t := range j.Topics {
		index[t.ID] = i
	}
	for r.next() {
		f, err := r.fields(2)
		if err != nil {
			return err
		}
		i, ok := index[f[0]]
		switch {
		case !ok:
			return r.errorf("kind for unknown topic %s", f[0])
		case f[1] != KindMismatch && f[1] != KindAmbiguous && f[1] != KindOrdinary:
			return r.errorf("kind %q: want %s, %s or %s", f[1], KindMismatch, KindAmbiguous, KindOrdinary)
		case j.Topics[i].Kind != "":
			return r.errorf("second kind for topic %s", f[0])
		}
		j.Topics[i].Kind = f[1]
	}
	return nil
}

func parseQrels(j *Judged, r *lineReader) error {
	for r.next() {
		f := strings.Fields(r.line)
		if len(f) != 4 {
			return r.errorf("want 4 fields (qid 0 docid grade), got %d", len(f))
		}
		qid, doc := f[0], f[2]
		g, err := strconv.Atoi(f[3])
		switch {
		case err != nil || g < 0 || g > MaxGrade:
			return r.errorf("grade %q: want an integer 0..%d", f[3], MaxGrade)
		}
		if _, ok := j.Topic(qid); !ok {
			return r.errorf("judgement for unknown topic %s", qid)
		}
		if _, dup := j.Qrels[qid][doc]; dup {
			return r.errorf("second judgement of %s for %s", doc, qid)
		}
		if j.Qrels[qid] == nil {
			j.Qrels[qid] = map[string]int{}
		}
		j.Qrels[qid][doc] = g
	}
	return nil
}

func parsePreferences(j *Judged, r *lineReader) error {
	for r.next() {
		f, err := r.fields(3)
		if err != nil {
			return err
		}
		t, ok := j.Topic(f[0])
		switch {
		case !ok:
			return r.errorf("preferences for unknown topic %s", f[0])
		case t.Department != f[1]:
			return r.errorf("department %s, but topic %s is asked by %s", f[1], f[0], t.Department)
		case j.Preferences[f[0]] != nil:
			return r.errorf("second preferences line for %s", f[0])
		}
		var terms []string
		for _, s := range strings.Split(f[2], "|") {
			if s = strings.TrimSpace(s); s == "" {
				return r.errorf("empty term in %q", f[2])
			}
			terms = append(terms, s)
		}
		j.Preferences[f[0]] = terms
	}
	return nil
}

func parseCanaries(j *Judged, r *lineReader) error {
	seen := map[string]bool{}
	for r.next() {
		f, err := r.fields(2)
		if err != nil {
			return err
		}
		if k := strings.ToLower(f[0]); seen[k] {
			return r.errorf("duplicate canary %s", f[0])
		}
		seen[strings.ToLower(f[0])] = true
		j.Canaries = append(j.Canaries, Canary{Term: f[0], Group: f[1]})
	}
	return nil
}

// lineReader steps through the content lines of one judged file.
type lineReader struct {
	name  string
	lines []string
	n     int    // 1-based number of the current line
	line  string // the current line, trailing CR and spaces removed
}

func newLineReader(name string, b []byte) *lineReader {
	return &lineReader{name: name, lines: strings.Split(string(b), "\n")}
}

// next advances to the next line that is neither blank nor a comment.
func (r *lineReader) next() bool {
	for r.n < len(r.lines) {
		r.line = strings.TrimRight(r.lines[r.n], " \r")
		r.n++
		if t := strings.TrimSpace(r.line); t != "" && !strings.HasPrefix(t, "#") {
			return true
		}
	}
	return false
}

// fields splits the current line at tabs into exactly n non-empty fields.
func (r *lineReader) fields(n int) ([]string, error) {
	f := strings.Split(r.line, "\t")
	if len(f) != n {
		return nil, r.errorf("want %d tab-separated fields, got %d", n, len(f))
	}
	for i := range f {
		if f[i] = strings.TrimSpace(f[i]); f[i] == "" {
			return nil, r.errorf("field %d is empty", i+1)
		}
	}
	return f, nil
}

func (r *lineReader) errorf(format string, args ...any) error {
	return &lineError{file: r.name, line: r.n, msg: fmt.Sprintf(format, args...)}
}

// lineError is a content error at file:line (line 0: the whole file).
type lineError struct {
	file string
	line int
	msg  string
}

func (e *lineError) Error() string {
	if e.line == 0 {
		return fmt.Sprintf("demo: %s: %s", e.file, e.msg)
	}
	return fmt.Sprintf("demo: %s:%d: %s", e.file, e.line, e.msg)
}

func (e *lineError) Unwrap() error { return ErrMalformed }

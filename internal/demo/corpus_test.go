package demo

import (
	"context"
	"fmt"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strings"
	"testing"

	"kinword/internal/doc"
	"kinword/internal/ingest"
	"kinword/internal/text"
)

// The figures below restate the corpus spec summarised in
// testdata/tarnwick/README.md ("What the corpus must satisfy"); they are
// project rules, not external references.
const (
	minDocs, minDeptDocs, minExecDocs = 240, 30, 5
	minWords, maxWords                = 150, 900
	minRestricted                     = 25
	minTopics, minMismatch, minAmbig  = 80, 30, 15
)

// departments maps each department slug to the short code used in
// ambiguous-topic qids ("X01-fo").
var departments = map[string]string{
	"field-operations": "fo", "asset-engineering": "ae", "people-culture": "pc",
	"finance-procurement": "fp", "it-service-desk": "it", "legal-compliance": "lc",
	"health-safety-environment": "hse", "customer-care": "cc", "executive-office": "exec",
}

var formats = []string{"md", "html", "txt", "jsonl", "docx", "pdf"}

// reporter is the part of testing.T the checks use, so that a recorder can
// prove each check fails on drifted data.
type reporter interface {
	Errorf(format string, args ...any)
	Logf(format string, args ...any)
}

// corpusDoc is one document as ingestion produced it.
type corpusDoc struct {
	*doc.Document
	format string // file extension without the dot
}

func (d corpusDoc) text() string { return d.Title + "\n\n" + d.Body }

// walkCorpus ingests docs/ with default options, exactly as the server does.
func walkCorpus(t *testing.T) (docs []corpusDoc, byID map[string]corpusDoc) {
	t.Helper()
	byID = map[string]corpusDoc{}
	err := ingest.Walk(context.Background(), []string{filepath.Join(tarnwick, "docs")}, ingest.Options{}, func(it ingest.Item) error {
		if it.Skip != nil {
			t.Errorf("skipped: %v", it.Skip)
			return nil
		}
		for _, w := range it.Warnings {
			t.Errorf("warning: %s", w)
		}
		file, _, _ := strings.Cut(it.Path, "#")
		d := corpusDoc{it.Doc, strings.TrimPrefix(filepath.Ext(file), ".")}
		docs = append(docs, d)
		byID[d.ID] = d
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return docs, byID
}

func TestCorpusMatchesSpec(t *testing.T) {
	docs, byID := walkCorpus(t)
	j, err := LoadJudged(tarnwick)
	if err != nil {
		t.Fatal(err)
	}

	t.Run("documents", func(t *testing.T) {
		t.Logf("%d documents", len(docs))
		if len(docs) < minDocs {
			t.Errorf("%d documents, want >= %d", len(docs), minDocs)
		}
		if len(byID) != len(docs) {
			t.Errorf("%d distinct IDs for %d documents", len(byID), len(docs))
		}
	})

	t.Run("departments", func(t *testing.T) {
		count := map[string]int{}
		for _, d := range docs {
			count[d.Department]++
			if _, ok := departments[d.Department]; !ok {
				t.Errorf("%s: unknown department %q", d.ID, d.Department)
			}
			if folder, _, _ := strings.Cut(d.ID, "/"); folder != d.Department {
				t.Errorf("%s: department %q differs from its folder", d.ID, d.Department)
			}
		}
		if len(count) < 8 {
			t.Errorf("%d departments, want >= 8", len(count))
		}
		for _, dept := range sortedKeys(count) {
			want := minDeptDocs
			if dept == "executive-office" {
				want = minExecDocs
			}
			t.Logf("%-26s %3d documents", dept, count[dept])
			if count[dept] < want {
				t.Errorf("%s: %d documents, want >= %d", dept, count[dept], want)
			}
		}
	})

	t.Run("words", func(t *testing.T) {
		lo, hi := maxWords, 0
		for _, d := range docs {
			n := len(strings.Fields(d.Title + " " + d.Body))
			lo, hi = min(lo, n), max(hi, n)
			if n < minWords || n > maxWords {
				t.Errorf("%s: %d words, want %d..%d", d.ID, n, minWords, maxWords)
			}
		}
		t.Logf("words per document (title+body): min %d, max %d", lo, hi)
	})

	t.Run("formats", func(t *testing.T) {
		count := map[string]map[string]int{}
		total := map[string]int{}
		for _, d := range docs {
			if count[d.Department] == nil {
				count[d.Department] = map[string]int{}
			}
			count[d.Department][d.format]++
			total[d.format]++
		}
		t.Logf("%-26s %s", "department", strings.Join(formats, " "))
		for _, dept := range sortedKeys(count) {
			t.Logf("%-26s %s", dept, formatRow(count[dept]))
		}
		t.Logf("%-26s %s", "all", formatRow(total))
		for _, f := range formats {
			if total[f] == 0 {
				t.Errorf("no %s document", f)
			}
		}
		for f := range total {
			if !slices.Contains(formats, f) {
				t.Errorf("unexpected format %q", f)
			}
		}
	})

	t.Run("restricted", func(t *testing.T) {
		groups := map[string]int{}
		for _, d := range docs {
			for _, g := range d.Groups {
				groups[g]++
			}
		}
		n := 0
		for _, d := range docs {
			if !d.Open() {
				n++
			}
		}
		t.Logf("%d restricted of %d documents (%.1f%%); per group %v", n, len(docs), 100*float64(n)/float64(len(docs)), groups)
		if n < minRestricted {
			t.Errorf("%d restricted documents, want >= %d", n, minRestricted)
		}
		listed := map[string]bool{}
		for _, c := range j.Canaries {
			listed[c.Group] = true
		}
		for _, g := range sortedKeys(groups) {
			if !listed[g] {
				t.Errorf("restricted group %s has no canary in %s", g, CanariesFile)
			}
		}
	})

	t.Run("canaries", func(t *testing.T) { checkCanaries(t, docs, j.Canaries) })
	t.Run("judged", func(t *testing.T) { checkJudged(t, j, byID) })
	t.Run("topics", func(t *testing.T) { checkTopics(t, j) })
	t.Run("mismatch", func(t *testing.T) { checkMismatch(t, j, byID) })
	t.Run("preferences", func(t *testing.T) { checkPreferences(t, j, byID) })
	t.Run("safety", func(t *testing.T) { checkSafety(t, docs) })
}

func formatRow(m map[string]int) string {
	var cells []string
	for _, f := range formats {
		cells = append(cells, fmt.Sprintf("%*d", len(f), m[f]))
	}
	return strings.Join(cells, " ")
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// wholeWord matches term case-insensitively as a whole word.
func wholeWord(term string) *regexp.Regexp {
	return regexp.MustCompile(`(?i)\b` + regexp.QuoteMeta(term) + `\b`)
}

// checkCanaries: each canary occurs in at least one document of its group
// and in no other document (title, body, URL or ID).
func checkCanaries(t reporter, docs []corpusDoc, canaries []Canary) {
	for _, c := range canaries {
		re, inGroup := wholeWord(c.Term), 0
		for _, d := range docs {
			if !re.MatchString(d.text() + "\n" + d.URL + "\n" + d.ID) {
				continue
			}
			if slices.Contains(d.Groups, c.Group) {
				inGroup++
			} else {
				t.Errorf("canary %s (group %s) leaks into %s (groups %v)", c.Term, c.Group, d.ID, d.Groups)
			}
		}
		t.Logf("canary %-13s %-20s in %d documents of its group", c.Term, c.Group, inGroup)
		if inGroup == 0 {
			t.Errorf("canary %s occurs in no document of group %s", c.Term, c.Group)
		}
	}
}

// checkJudged: every judged docid is a document and every topic has at
// least one document of grade >= 1.
func checkJudged(t reporter, j *Judged, byID map[string]corpusDoc) {
	grades := make([]int, MaxGrade+1)
	for _, qid := range sortedKeys(j.Qrels) {
		for _, id := range sortedKeys(j.Qrels[qid]) {
			grades[j.Qrels[qid][id]]++
			if _, ok := byID[id]; !ok {
				t.Errorf("%s: judged document %s does not exist", qid, id)
			}
		}
	}
	t.Logf("judgements by grade 0..3: %v", grades)
	for _, tp := range j.Topics {
		if len(j.Relevant(tp.ID, 1)) == 0 {
			t.Errorf("%s: no document of grade >= 1", tp.ID)
		}
	}
}

// checkTopics: enough topics of each kind; every ambiguous base has two
// sides with the same text, asked by different departments (matching the
// qid suffix), with different relevant sets.
func checkTopics(t reporter, j *Judged) {
	pairs := j.AmbiguousPairs()
	nm, no := len(j.ByKind(KindMismatch)), len(j.ByKind(KindOrdinary))
	t.Logf("%d topics: %d mismatch, %d ambiguous sides in %d bases, %d ordinary",
		len(j.Topics), nm, len(j.ByKind(KindAmbiguous)), len(pairs), no)
	if len(j.Topics) < minTopics || nm < minMismatch || len(pairs) < minAmbig {
		t.Errorf("want >= %d topics, >= %d mismatch, >= %d ambiguous bases", minTopics, minMismatch, minAmbig)
	}
	for _, tp := range j.Topics {
		if _, ok := departments[tp.Department]; !ok {
			t.Errorf("%s: unknown department %q", tp.ID, tp.Department)
		}
	}
	for _, base := range sortedKeys(pairs) {
		sides := pairs[base]
		if len(sides) != 2 {
			t.Errorf("%s: %d sides, want 2", base, len(sides))
			continue
		}
		a, b := sides[0], sides[1]
		for _, s := range sides {
			if _, code, _ := strings.Cut(s.ID, "-"); departments[s.Department] != code {
				t.Errorf("%s: asked by %s, whose code is not %q", s.ID, s.Department, code)
			}
		}
		ra, rb := j.Relevant(a.ID, 1), j.Relevant(b.ID, 1)
		shared := 0
		for _, id := range ra {
			if slices.Contains(rb, id) {
				shared++
			}
		}
		switch {
		case a.Text != b.Text:
			t.Errorf("%s: texts %q and %q differ", base, a.Text, b.Text)
		case a.Department == b.Department:
			t.Errorf("%s: both sides asked by %s", base, a.Department)
		case slices.Equal(ra, rb):
			t.Errorf("%s: both sides have the same relevant documents", base)
		case shared > 0:
			t.Logf("%s: %d relevant documents shared by both sides", base, shared)
		}
	}
}

// checkMismatch: a mismatch topic shares no stem, after the shared text
// pipeline, with the titles of its relevant documents.
func checkMismatch(t reporter, j *Judged, byID map[string]corpusDoc) {
	p, _ := text.NewPipeline("") // English never fails
	for _, tp := range j.ByKind(KindMismatch) {
		q := p.Terms(tp.Text, "")
		for _, id := range j.Relevant(tp.ID, 1) {
			d, ok := byID[id]
			if !ok {
				continue // reported by checkJudged
			}
			for _, s := range p.Terms(d.Title, d.Language) {
				if slices.Contains(q, s) {
					t.Errorf("%s %q shares stem %q with the title %q of %s", tp.ID, tp.Text, s, d.Title, id)
				}
			}
		}
	}
}

// checkPreferences: every ambiguous side, and nothing else, has accepted
// expansion terms, each occurring (as a stem sequence) in at least one of
// the side's relevant documents.
func checkPreferences(t reporter, j *Judged, byID map[string]corpusDoc) {
	p, _ := text.NewPipeline("")
	for _, tp := range j.Topics {
		terms, ok := j.Preferences[tp.ID]
		if ok != (tp.Kind == KindAmbiguous) {
			t.Errorf("%s (%s): has preferences %v", tp.ID, tp.Kind, ok)
		}
		for _, term := range terms {
			key, found := " "+p.Key(term, "")+" ", 0
			for _, id := range j.Relevant(tp.ID, 1) {
				if d, ok := byID[id]; ok && strings.Contains(" "+p.Key(d.text(), d.Language)+" ", key) {
					found++
				}
			}
			if found == 0 {
				t.Errorf("%s: preferred term %q occurs in none of its relevant documents", tp.ID, term)
			}
		}
	}
}

var (
	safetyWords = regexp.MustCompile(`(?i)\b(lockouts?|confined spaces?|trench(es)?|work(ing)? at height|chlorine)\b`)
	cautionWord = regexp.MustCompile(`(?i)\bcontrolled\b[^.]*\b(procedures?|copy)\b`)
	regulations = regexp.MustCompile(`(?i)\bregulations?\b`)
)

// checkSafety: a document that mentions safety-critical work carries a
// paragraph saying the controlled procedure and local regulations govern.
func checkSafety(t reporter, docs []corpusDoc) {
	n := 0
	for _, d := range docs {
		m := safetyWords.FindString(d.text())
		if m == "" {
			continue
		}
		n++
		ok := false
		for _, para := range strings.Split(d.text(), "\n\n") {
			if cautionWord.MatchString(para) && regulations.MatchString(para) {
				ok = true
				break
			}
		}
		if !ok {
			t.Errorf("%s mentions %q but has no caution naming the controlled procedure and regulations", d.ID, m)
		}
	}
	t.Logf("%d safety documents", n)
}

package demo

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"kinword/internal/doc"
)

// judgedFiles is a small valid judged set; cases override single files.
var judgedFiles = map[string]string{
	TopicsFile: "# qid\tdepartment\tquery\n" +
		"M01\tfield-operations\twho fixes a burst pipe\n" +
		"X01-fo\tfield-operations\tleak\r\n" +
		"X01-it\tit-service-desk\tleak\n\n" +
		"O01\tcustomer-care\tmeter reading dates\n",
	KindsFile:       "M01\tmismatch\nX01-fo\tambiguous\nX01-it\tambiguous\nO01\tordinary\n",
	QrelsFile:       "M01 0 fo/main-break.md 3\nM01 0 fo/glossary.md 0\nX01-fo 0 fo/leakage.md 2\nX01-it 0 it/dlp.md 1\nO01 0 cc/meters.md 2\n",
	PreferencesFile: "X01-fo\tfield-operations\tleakage | night flow\nX01-it\tit-service-desk\tdata exposure\n",
	CanariesFile:    "Kestrelmoor\tops-security\n",
}

func writeJudged(t *testing.T, override map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, body := range judgedFiles {
		if b, ok := override[name]; ok {
			body = b
		}
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func TestLoadJudged(t *testing.T) {
	j, err := LoadJudged(writeJudged(t, nil))
	if err != nil {
		t.Fatal(err)
	}
	if len(j.Topics) != 4 || j.Topics[2] != (Topic{"X01-it", "it-service-desk", "leak", KindAmbiguous}) {
		t.Errorf("Topics = %+v", j.Topics)
	}
	if got := j.Kind("M01"); got != KindMismatch {
		t.Errorf("Kind(M01) = %q", got)
	}
	if got := j.Kind("nope"); got != "" {
		t.Errorf("Kind(nope) = %q, want empty", got)
	}
	if got := j.ByKind(KindOrdinary); len(got) != 1 || got[0].ID != "O01" {
		t.Errorf("ByKind(ordinary) = %+v", got)
	}
	pairs := j.AmbiguousPairs()
	if len(pairs) != 1 || len(pairs["X01"]) != 2 || pairs["X01"][0].ID != "X01-fo" || pairs["X01"][1].ID != "X01-it" {
		t.Errorf("AmbiguousPairs = %+v", pairs)
	}
	if got := j.Relevant("M01", 1); !slices.Equal(got, []string{"fo/main-break.md"}) {
		t.Errorf("Relevant(M01, 1) = %q", got)
	}
	if got := j.Relevant("M01", 0); len(got) != 2 {
		t.Errorf("Relevant(M01, 0) = %q", got)
	}
	if got := j.Preferences["X01-fo"]; !slices.Equal(got, []string{"leakage", "night flow"}) {
		t.Errorf("Preferences[X01-fo] = %q", got)
	}
	if len(j.Canaries) != 1 || j.Canaries[0] != (Canary{"Kestrelmoor", "ops-security"}) {
		t.Errorf("Canaries = %+v", j.Canaries)
	}
}

func TestLoadJudgedErrors(t *testing.T) {
	cases := []struct {
		name, file, body, want string
	}{
		{"topic fields", TopicsFile, "M01\tfield-operations\n", "topics.tsv:1: want 3 tab-separated fields, got 2"},
		{"topic empty field", TopicsFile, "M01\t \tq\n", "topics.tsv:1: field 2 is empty"},
		{"topic duplicate", TopicsFile, "M01\ta\tq\n\nM01\tb\tq\n", "topics.tsv:3: duplicate topic M01"},
		{"kind unknown value", KindsFile, "M01\tvague\n", "topic-kinds.tsv:1: kind \"vague\""},
		{"kind unknown topic", KindsFile, "M09\tordinary\n", "topic-kinds.tsv:1: kind for unknown topic M09"},
		{"kind twice", KindsFile, judgedFiles[KindsFile] + "M01\tordinary\n", "topic-kinds.tsv:5: second kind for topic M01"},
		{"kind missing", KindsFile, "M01\tmismatch\n", "topic-kinds.tsv: topic X01-fo has no kind"},
		{"qrels fields", QrelsFile, "M01 0 d1\n", "qrels.txt:1: want 4 fields"},
		{"qrels grade", QrelsFile, "# c\nM01 0 d1 4\n", "qrels.txt:2: grade \"4\""},
		{"qrels grade text", QrelsFile, "M01 0 d1 high\n", "qrels.txt:1: grade \"high\""},
		{"qrels unknown topic", QrelsFile, "Q9 0 d1 1\n", "qrels.txt:1: judgement for unknown topic Q9"},
		{"qrels duplicate", QrelsFile, "M01 0 d1 1\nM01 0 d1 2\n", "qrels.txt:2: second judgement of d1 for M01"},
		{"prefs department", PreferencesFile, "X01-fo\tit-service-desk\tleakage\n", "preferences.tsv:1: department it-service-desk, but topic X01-fo is asked by field-operations"},
		{"prefs empty term", PreferencesFile, "X01-fo\tfield-operations\tleakage||night flow\n", "preferences.tsv:1: empty term"},
		{"prefs unknown", PreferencesFile, "Z1\tfield-operations\tleakage\n", "preferences.tsv:1: preferences for unknown topic Z1"},
		{"prefs twice", PreferencesFile, judgedFiles[PreferencesFile] + "X01-fo\tfield-operations\tnight flow\n", "preferences.tsv:3: second preferences line for X01-fo"},
		{"canary fields", CanariesFile, "Kestrelmoor\n", "canaries.tsv:1: want 2 tab-separated fields, got 1"},
		{"canary duplicate", CanariesFile, "Kestrelmoor\ta\nkestrelmoor\tb\n", "canaries.tsv:2: duplicate canary kestrelmoor"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := LoadJudged(writeJudged(t, map[string]string{c.file: c.body}))
			if !errors.Is(err, ErrMalformed) || !strings.Contains(err.Error(), c.want) {
				t.Errorf("err = %v, want ErrMalformed containing %q", err, c.want)
			}
		})
	}
	t.Run("missing file", func(t *testing.T) {
		dir := writeJudged(t, nil)
		os.Remove(filepath.Join(dir, QrelsFile))
		_, err := LoadJudged(dir)
		if !errors.Is(err, os.ErrNotExist) || errors.Is(err, ErrMalformed) {
			t.Errorf("err = %v, want os.ErrNotExist only", err)
		}
	})
}

// FuzzParseJudged feeds arbitrary bytes to every judged-file parser: none
// may panic, and every error must wrap ErrMalformed and name its file.
func FuzzParseJudged(f *testing.F) {
	for _, name := range sortedKeys(judgedFiles) {
		f.Add([]byte(judgedFiles[name]))
	}
	f.Add([]byte("M01\t\t\n\x00\tX\r\n#\n"))
	parsers := map[string]func(*Judged, *lineReader) error{
		TopicsFile: parseTopics, KindsFile: parseKinds, QrelsFile: parseQrels,
		PreferencesFile: parsePreferences, CanariesFile: parseCanaries,
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		for name, parse := range parsers {
			j := &Judged{Qrels: map[string]map[string]int{}, Preferences: map[string][]string{}}
			if name != TopicsFile {
				if err := parseTopics(j, newLineReader(TopicsFile, []byte(judgedFiles[TopicsFile]))); err != nil {
					t.Fatal(err)
				}
			}
			if err := parse(j, newLineReader(name, data)); err != nil {
				if !errors.Is(err, ErrMalformed) || !strings.Contains(err.Error(), name) {
					t.Errorf("%s: err = %v", name, err)
				}
			}
		}
	})
}

func ExampleJudged_AmbiguousPairs() {
	j, err := LoadJudged("../../testdata/tarnwick")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, side := range j.AmbiguousPairs()["X01"] {
		fmt.Printf("%s %s %q\n", side.ID, side.Department, side.Text)
	}
	// Output:
	// X01-fo field-operations "leak"
	// X01-it it-service-desk "leak"
}

// recorder collects what a corpus check reports.
type recorder struct{ errs []string }

func (r *recorder) Errorf(format string, args ...any) {
	r.errs = append(r.errs, fmt.Sprintf(format, args...))
}
func (r *recorder) Logf(string, ...any) {}

// TestCorpusChecksCatchDrift proves each corpus check fails on data that
// drifts from the spec, and passes on data that keeps to it.
func TestCorpusChecksCatchDrift(t *testing.T) {
	mk := func(id, title, body string, groups ...string) corpusDoc {
		return corpusDoc{Document: &doc.Document{ID: id, Title: title, Body: body, Groups: groups}, format: "md"}
	}
	caution := "Caution: the controlled procedure and local regulations govern this work, not this intranet copy."
	j, err := LoadJudged(writeJudged(t, nil))
	if err != nil {
		t.Fatal(err)
	}
	good := map[string]corpusDoc{}
	for _, d := range []corpusDoc{
		mk("fo/main-break.md", "Main Break Response", "Crews repair a main break."),
		mk("fo/glossary.md", "Glossary", "A burst pipe is a main break."),
		mk("fo/leakage.md", "Leakage Control", "Night flow and leakage."),
		mk("it/dlp.md", "Data Loss Prevention", "Limit data exposure."),
		mk("cc/meters.md", "Meter Reading Windows", "Meter reading dates."),
	} {
		good[d.ID] = d
	}
	without := func(id string) map[string]corpusDoc {
		m := map[string]corpusDoc{}
		for k, v := range good {
			if k != id {
				m[k] = v
			}
		}
		return m
	}
	retitled := without("fo/main-break.md")
	retitled["fo/main-break.md"] = mk("fo/main-break.md", "Burst Pipes", "Crews repair a main break.")
	sameDept := *j
	sameDept.Topics = slices.Clone(j.Topics)
	sameDept.Topics[2].Department = "field-operations"
	sameRel := *j
	sameRel.Qrels = map[string]map[string]int{"X01-fo": {"fo/leakage.md": 2}, "X01-it": {"fo/leakage.md": 1}}
	leaky := mk("cc/faq.md", "FAQ", "Ask about kestrelmoor.")
	secret := mk("fo/restricted/plan.md", "Plan", "Kestrelmoor site plan.", "ops-security")
	cases := []struct {
		name    string
		run     func(reporter)
		wantErr string // "" = no error expected
	}{
		{"judged ok", func(r reporter) { checkJudged(r, j, good) }, ""},
		{"judged doc missing", func(r reporter) { checkJudged(r, j, without("it/dlp.md")) }, "it/dlp.md does not exist"},
		{"mismatch ok", func(r reporter) { checkMismatch(r, j, good) }, ""},
		{"mismatch shares stem", func(r reporter) { checkMismatch(r, j, retitled) }, `shares stem "burst"`},
		{"preferences ok", func(r reporter) { checkPreferences(r, j, good) }, ""},
		{"preference absent", func(r reporter) { checkPreferences(r, j, without("fo/leakage.md")) }, `"leakage" occurs in none`},
		{"topics too few", func(r reporter) { checkTopics(r, j) }, "want >= 80 topics"},
		{"side code", func(r reporter) { checkTopics(r, &sameDept) }, `X01-it: asked by field-operations, whose code is not "it"`},
		{"sides one department", func(r reporter) { checkTopics(r, &sameDept) }, "X01: both sides asked by field-operations"},
		{"sides same relevant", func(r reporter) { checkTopics(r, &sameRel) }, "X01: both sides have the same relevant documents"},
		{"canary ok", func(r reporter) { checkCanaries(r, []corpusDoc{secret}, j.Canaries) }, ""},
		{"canary leaks", func(r reporter) { checkCanaries(r, []corpusDoc{secret, leaky}, j.Canaries) }, "leaks into cc/faq.md"},
		{"canary unused", func(r reporter) { checkCanaries(r, []corpusDoc{leaky}, j.Canaries) }, "occurs in no document of group"},
		{"safety ok", func(r reporter) { checkSafety(r, []corpusDoc{mk("a", "Trench Support", "Shore it.\n\n"+caution)}) }, ""},
		{"safety no caution", func(r reporter) { checkSafety(r, []corpusDoc{mk("a", "Valves", "Enter the confined space.")}) }, `mentions "confined space"`},
		{"safety no regulations", func(r reporter) {
			checkSafety(r, []corpusDoc{mk("a", "Chlorine", "Follow the controlled procedure.")})
		}, `mentions "Chlorine"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := &recorder{}
			c.run(r)
			got := strings.Join(r.errs, "\n")
			if (c.wantErr == "") != (got == "") || !strings.Contains(got, c.wantErr) {
				t.Errorf("errors:\n%s\nwant one containing %q", got, c.wantErr)
			}
		})
	}
}

package gen

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"net/url"
	"slices"
	"strings"
	"testing"

	"kinword/internal/doc"
)

func TestOptionsValidation(t *testing.T) {
	cases := []struct {
		name string
		opts Options
		ok   bool
	}{
		{"zero value is the default corpus", Options{}, true},
		{"negative docs", Options{Docs: -1}, false},
		{"mean words below clamp", Options{MeanWords: 29}, false},
		{"mean words at clamp", Options{MeanWords: 30}, true},
		{"vocab too small", Options{VocabSize: 999}, false},
		{"negative zipf", Options{ZipfS: -1}, false},
		{"huge zipf", Options{ZipfS: 4.5}, false},
		{"NaN zipf", Options{ZipfS: math.NaN()}, false},
		{"share above one", Options{RestrictedShare: 1.5}, false},
		{"negative share means none", Options{RestrictedShare: -1}, true},
		{"duplicate department", Options{Departments: []string{"a", "a"}}, false},
		{"empty group", Options{Groups: []string{""}}, false},
		{"canary group unknown", Options{CanaryTerms: map[string]string{"nobody": "zz9"}}, false},
		{"canary not a token", Options{CanaryTerms: map[string]string{"executive": "two words"}}, false},
		{"canary upper case", Options{CanaryTerms: map[string]string{"executive": "Zz9"}}, false},
		{"canary is a function word", Options{CanaryTerms: map[string]string{"executive": "the"}}, false},
		{"canary shared by two groups", Options{CanaryTerms: map[string]string{"executive": "zz9", "it-security": "zz9"}}, false},
		{"canary fine", Options{CanaryTerms: map[string]string{"executive": "zz9"}}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := New(c.opts)
			if c.ok && err != nil {
				t.Fatalf("New: %v", err)
			}
			if !c.ok && !errors.Is(err, ErrBadOptions) {
				t.Fatalf("New error = %v, want ErrBadOptions", err)
			}
		})
	}
}

func TestDefaultsResolved(t *testing.T) {
	o := mustNew(t, Options{RestrictedShare: -1}).Options()
	if o.Docs != 1000 || o.Seed != 1 || o.MeanWords != 200 || o.VocabSize != 50000 || o.ZipfS != 1.07 {
		t.Errorf("scalar defaults = %+v", o)
	}
	if !slices.Equal(o.Departments, DefaultDepartments) || !slices.Equal(o.Groups, DefaultGroups) {
		t.Errorf("list defaults = %v / %v", o.Departments, o.Groups)
	}
	if o.RestrictedShare != 0 {
		t.Errorf("negative RestrictedShare resolved to %v, want 0", o.RestrictedShare)
	}
}

func TestDeterminism(t *testing.T) {
	base := Options{Docs: 300, Seed: 7}
	a, b := jsonl(t, base), jsonl(t, base)
	if !bytes.Equal(a, b) {
		t.Fatal("same seed gave different output")
	}
	other := base
	other.Seed = 8
	if bytes.Equal(a, jsonl(t, other)) {
		t.Fatal("different seeds gave identical output")
	}
	// A document depends only on Seed and its index: a shorter corpus is a
	// prefix of a longer one.
	short := base
	short.Docs = 120
	if s := jsonl(t, short); !bytes.HasPrefix(a, s) {
		t.Fatal("120-document corpus is not a prefix of the 300-document one")
	}
}

func TestDocumentFields(t *testing.T) {
	opts := Options{Docs: 800, Seed: 3}
	for i, d := range collect(t, opts) {
		if want := fmt.Sprintf("gen-%06d", i+1); d.ID != want {
			t.Fatalf("doc %d: ID %q, want %q", i, d.ID, want)
		}
		if !slices.Contains(DefaultDepartments, d.Department) {
			t.Fatalf("%s: department %q", d.ID, d.Department)
		}
		if len(d.Groups) > 1 || (len(d.Groups) == 1 && !slices.Contains(DefaultGroups, d.Groups[0])) {
			t.Fatalf("%s: groups %v", d.ID, d.Groups)
		}
		u, err := url.Parse(d.URL)
		if err != nil || u.Scheme != "https" || u.Path != "/"+d.Department+"/"+d.ID {
			t.Fatalf("%s: URL %q (%v)", d.ID, d.URL, err)
		}
		if d.Modified.Before(modifiedFrom) || !d.Modified.Before(modifiedTo) ||
			d.Modified.Nanosecond() != 0 || d.Modified.Location() != modifiedFrom.Location() {
			t.Fatalf("%s: modified %v", d.ID, d.Modified)
		}
		if d.Language != "english" {
			t.Fatalf("%s: language %q", d.ID, d.Language)
		}
		if n := len(strings.Fields(d.Title)); n < 3 || n > 8 {
			t.Fatalf("%s: title %q has %d words", d.ID, d.Title, n)
		}
		checkBody(t, d)
	}
}

// checkBody checks the paragraph and sentence layout of one body.
func checkBody(t *testing.T, d doc.Document) {
	t.Helper()
	words := len(strings.Fields(d.Body))
	if words < 30 || words > 6*200 {
		t.Fatalf("%s: %d words, outside [30, 1200]", d.ID, words)
	}
	paras := strings.Split(d.Body, "\n\n")
	for _, p := range paras {
		n := len(strings.Fields(p))
		if words >= 40 && (n < 40 || n > 120) {
			t.Fatalf("%s: paragraph of %d words", d.ID, n)
		}
		if strings.TrimSpace(p) != p || !strings.HasSuffix(p, ".") || strings.Contains(p, "\n") {
			t.Fatalf("%s: malformed paragraph %q", d.ID, p)
		}
		if c := p[0]; c < 'A' || c > 'Z' {
			t.Fatalf("%s: paragraph starts with %q", d.ID, c)
		}
	}
	for _, r := range d.Body {
		if (r < 'a' || r > 'z') && (r < 'A' || r > 'Z') && r != ' ' && r != '.' && r != '\n' {
			t.Fatalf("%s: unexpected character %q", d.ID, r)
		}
	}
}

// The restricted count is Binomial(n, p); a 4-sigma band (common practice)
// fails by chance with probability below 1e-4, and the seed is fixed.
func TestRestrictedShare(t *testing.T) {
	cases := []struct {
		name  string
		share float64
		want  float64
	}{
		{"default", 0, 0.1},
		{"thirty percent", 0.3, 0.3},
		{"none", -1, 0},
		{"all", 1, 1},
	}
	const n = 4000
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			perGroup := map[string]int{}
			restricted := 0
			for _, d := range collect(t, Options{Docs: n, MeanWords: 40, RestrictedShare: c.share}) {
				if len(d.Groups) > 0 {
					restricted++
					perGroup[d.Groups[0]]++
				}
			}
			got := float64(restricted) / n
			tol := 4*math.Sqrt(c.want*(1-c.want)/n) + 1e-9
			if math.Abs(got-c.want) > tol {
				t.Errorf("restricted share %.4f, want %.2f ± %.4f", got, c.want, tol)
			}
			if c.want > 0 && len(perGroup) != len(DefaultGroups) {
				t.Errorf("groups used: %v, want all of %v", perGroup, DefaultGroups)
			}
		})
	}
}

func TestCanaryTerms(t *testing.T) {
	// A vocabulary word as canary must be withdrawn from the vocabulary.
	taken := mustNew(t, Options{}).Vocabulary()[500]
	canaries := map[string]string{"executive": "canaryexec7", "legal-privileged": taken}
	opts := Options{Docs: 3000, MeanWords: 60, RestrictedShare: 0.2, CanaryTerms: canaries}
	if slices.Contains(mustNew(t, opts).Vocabulary(), taken) {
		t.Fatalf("canary %q still in the vocabulary", taken)
	}
	restricted := map[string]int{}
	carrying := map[string]int{}
	for _, d := range collect(t, opts) {
		if len(d.Groups) == 1 {
			restricted[d.Groups[0]]++
		}
		toks := tokens(d.Body + " " + d.Title)
		for grp, term := range canaries {
			n := strings.Count(" "+strings.Join(toks, " ")+" ", " "+term+" ")
			if n == 0 {
				continue
			}
			if !slices.Equal(d.Groups, []string{grp}) {
				t.Fatalf("%s (groups %v) carries the canary of %q", d.ID, d.Groups, grp)
			}
			if n != 1 || !strings.Contains(d.Body, term) {
				t.Fatalf("%s carries canary %q %d times", d.ID, term, n)
			}
			carrying[grp]++
		}
	}
	// Binomial(restricted, CanaryShare), 4-sigma band (common practice).
	for grp := range canaries {
		n := float64(restricted[grp])
		want, tol := n*CanaryShare, 4*math.Sqrt(n*CanaryShare*(1-CanaryShare))
		if got := float64(carrying[grp]); n == 0 || math.Abs(got-want) > tol {
			t.Errorf("group %s: %v of %v restricted docs carry the canary, want %.0f ± %.0f", grp, got, n, want, tol)
		}
	}
}

func TestGenerateStops(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := Generate(ctx, Options{}, func(doc.Document) error { return nil }); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: err = %v", err)
	}
	stop := errors.New("enough")
	seen := 0
	err := Generate(context.Background(), Options{}, func(doc.Document) error {
		if seen++; seen == 5 {
			return stop
		}
		return nil
	})
	if !errors.Is(err, stop) || seen != 5 {
		t.Errorf("callback error: err = %v after %d docs", err, seen)
	}
	if err := Generate(context.Background(), Options{Docs: -3}, nil); !errors.Is(err, ErrBadOptions) {
		t.Errorf("bad options: err = %v", err)
	}
}

func TestUnknownDepartment(t *testing.T) {
	g := mustNew(t, Options{})
	if _, err := g.TopicWords("nowhere"); !errors.Is(err, ErrUnknownDepartment) {
		t.Errorf("TopicWords: err = %v", err)
	}
	if _, err := g.Phrases("nowhere"); !errors.Is(err, ErrUnknownDepartment) {
		t.Errorf("Phrases: err = %v", err)
	}
}

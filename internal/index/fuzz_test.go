package index

import (
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"

	"kinword/internal/text"
)

// FuzzParseQuery checks the query parser against properties that follow
// from its contract (query.go) rather than from its code:
//   - it never panics, and every error wraps ErrBadQuery;
//   - invalid UTF-8 and input longer than MaxBytes are always rejected;
//   - an accepted query has 1..MaxTerms terms, sorted by key without
//     duplicates, each weight a positive whole number;
//   - keys are non-empty, have no control characters and no whitespace but
//     single inner spaces, and an inner space appears only when the input
//     held a double quote (a phrase);
//   - parsing is deterministic, with a warm or a fresh pipeline (the stem
//     memo must not change answers);
//   - raising MaxTerms never changes an accepted answer;
//   - "s s" (s twice, when s has balanced quotes) gives the same keys with
//     doubled weights: a term given twice gets weight 2.
func FuzzParseQuery(f *testing.F) {
	seeds := []struct {
		q              string
		maxBytes, maxT uint16
	}{
		{"main break valve", 0, 0},
		{`"main break" valve valve`, 0, 0},
		{`"the of"`, 0, 0},
		{`"unclosed phrase`, 0, 0},
		{`""""`, 0, 0},
		{"the of and", 0, 0},
		{"\xff\xfe", 0, 0},
		{strings.Repeat("a", 600), 0, 0},
		{"a b c d e f g", 0, 2},
		{"hydrant flushing chamber", 8, 0},
		{"e-mail x-ray covid-19 3.5 1,200 o'clock", 0, 0},
		{"Crème BRÛLÉE straße ǅ", 0, 0},
		{"tab\there\nnew\x00line", 0, 0},
		{`"  spaced   out  " phrase`, 0, 0},
	}
	for _, s := range seeds {
		f.Add(s.q, s.maxBytes, s.maxT)
	}
	warm, err := text.NewPipeline("")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, q string, maxBytes, maxTerms uint16) {
		lim := QueryLimits{MaxBytes: int(maxBytes), MaxTerms: int(maxTerms)}
		res := lim.resolve()
		got, err := ParseQuery(warm, q, lim)
		if err != nil {
			if !errors.Is(err, ErrBadQuery) {
				t.Fatalf("error %v does not wrap ErrBadQuery", err)
			}
		} else {
			if !utf8.ValidString(q) {
				t.Fatalf("accepted invalid UTF-8 %q", q)
			}
			if len(q) > res.MaxBytes {
				t.Fatalf("accepted %d bytes over limit %d", len(q), res.MaxBytes)
			}
			checkTerms(t, q, got, res.MaxTerms)
		}

		fresh, err2 := text.NewPipeline("")
		if err2 != nil {
			t.Fatal(err2)
		}
		again, errAgain := ParseQuery(fresh, q, lim)
		if (err == nil) != (errAgain == nil) || !reflect.DeepEqual(got, again) {
			t.Fatalf("not deterministic: %v, %v then %v, %v", got, err, again, errAgain)
		}
		if err != nil {
			return
		}

		wide := QueryLimits{MaxBytes: 4*len(q) + 16, MaxTerms: math.MaxInt32}
		if w, err := ParseQuery(warm, q, wide); err != nil || !reflect.DeepEqual(w, got) {
			t.Fatalf("wider limits changed the answer: %v, %v; want %v", w, err, got)
		}
		if strings.Count(q, `"`)%2 == 0 {
			twice, err := ParseQuery(warm, q+" "+q, wide)
			if err != nil || len(twice) != len(got) {
				t.Fatalf("doubled query: %v, %v; single %v", twice, err, got)
			}
			for i := range got {
				if twice[i].Key != got[i].Key || twice[i].Weight != 2*got[i].Weight {
					t.Fatalf("doubled query term %v, single %v", twice[i], got[i])
				}
			}
		}
	})
}

func checkTerms(t *testing.T, q string, terms []QueryTerm, maxTerms int) {
	t.Helper()
	if len(terms) == 0 || len(terms) > maxTerms {
		t.Fatalf("%d terms, limit %d: %v", len(terms), maxTerms, terms)
	}
	phrases := strings.Contains(q, `"`)
	for i, qt := range terms {
		if i > 0 && terms[i-1].Key >= qt.Key {
			t.Fatalf("keys not strictly sorted: %q then %q", terms[i-1].Key, qt.Key)
		}
		if qt.Weight < 1 || qt.Weight != math.Trunc(qt.Weight) {
			t.Fatalf("weight %v of %q is not a positive count", qt.Weight, qt.Key)
		}
		k := qt.Key
		if k == "" || strings.TrimSpace(k) != k || strings.Contains(k, "  ") || !utf8.ValidString(k) {
			t.Fatalf("malformed key %q", k)
		}
		if strings.ContainsFunc(k, func(r rune) bool { return unicode.IsControl(r) || (unicode.IsSpace(r) && r != ' ') }) {
			t.Fatalf("key %q has control or non-space whitespace characters", k)
		}
		if strings.Contains(k, " ") && !phrases {
			t.Fatalf("key %q has a space but the query %q has no phrase", k, q)
		}
	}
}

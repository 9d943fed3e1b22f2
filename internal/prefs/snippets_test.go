package prefs

import (
	"fmt"
	"math"
	"testing"
	"time"
)

// TestSnippetTerms checks the snippet evidence by hand. Propensities follow
// the default decay curve 1/(k+1) (Eta 1), so a click at rank 0 weighs 1
// and one at rank 2 weighs 1/(1/3) = 3 (inverse propensity weighting,
// Joachims, Swaminathan & Schnabel, WSDM 2017); all clicks are "now", so
// decay is 1.
func TestSnippetTerms(t *testing.T) {
	now := time.Date(2026, 6, 1, 12, 0, 0, 0, time.UTC)
	click := func(dept string, s, rank int, stems ...string) SnippetClick {
		return SnippetClick{Time: now, Session: fmt.Sprintf("s%d", s), Department: dept, Query: "leak", Rank: rank, Stems: stems}
	}
	type want struct {
		dept  string
		terms []TermWeight
	}
	cases := []struct {
		name   string
		clicks []SnippetClick
		want   []want
	}{
		{"five sessions at rank 0 and one at rank 2",
			[]SnippetClick{click("it", 1, 0, "phish"), click("it", 2, 0, "phish"), click("it", 3, 0, "phish"),
				click("it", 4, 0, "phish"), click("it", 5, 0, "phish"), click("it", 6, 2, "exposur")},
			// phish 5·1 = 5, exposur 1·3 = 3: normalised 1 and 0.6.
			[]want{{"it", []TermWeight{{"phish", 1}, {"exposur", 0.6}}}}},
		{"a session counts once per query and term per day, at its best rank",
			[]SnippetClick{click("it", 1, 4, "phish"), click("it", 1, 0, "phish"), click("it", 1, 0, "phish"),
				click("it", 2, 0, "phish"), click("it", 3, 0, "phish"), click("it", 4, 0, "phish"), click("it", 5, 1, "exposur")},
			// phish: sessions 1-4 at rank 0: 4; exposur: 1/(1/2) = 2: 0.5.
			[]want{{"it", []TermWeight{{"phish", 1}, {"exposur", 0.5}}}}},
		{"four sessions are not enough for the department or the organisation",
			[]SnippetClick{click("it", 1, 0, "phish"), click("it", 2, 0, "phish"), click("it", 3, 0, "phish"), click("it", 4, 0, "phish")},
			[]want{{"it", nil}, {"ops", nil}}},
		{"thin departments fall back to the organisation; a department with its own evidence keeps it",
			[]SnippetClick{click("it", 1, 0, "phish"), click("it", 2, 0, "phish"), click("it", 3, 0, "phish"),
				click("ops", 4, 0, "valv"), click("ops", 5, 0, "valv"), click("ops", 6, 0, "valv"), click("ops", 7, 0, "valv"), click("ops", 8, 0, "valv")},
			// ops has 5 sessions: its own list. it has 3: the organisation's
			// (valv 5, phish 3). hr never clicked: the organisation's too.
			[]want{{"ops", []TermWeight{{"valv", 1}}}, {"it", []TermWeight{{"valv", 1}, {"phish", 0.6}}}, {"hr", []TermWeight{{"valv", 1}, {"phish", 0.6}}}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := NewBuilder(Options{})
			for _, cl := range c.clicks {
				b.AddSnippet(cl)
			}
			m := b.Snapshot(now)
			for _, w := range c.want {
				got := m.SnippetTerms(w.dept, "leak", 10)
				if len(got) != len(w.terms) {
					t.Fatalf("%s: got %v, want %v", w.dept, got, w.terms)
				}
				for i := range got {
					if got[i].Term != w.terms[i].Term || math.Abs(got[i].Weight-w.terms[i].Weight) > 1e-12 {
						t.Errorf("%s: got %v, want %v", w.dept, got, w.terms)
					}
				}
			}
		})
	}
}

// TestSnippetTermsIsolation: one department's clicks never change another
// department's list once that department has its own evidence, and only
// enter a thin department's list through the organisation-wide list.
func TestSnippetTermsIsolation(t *testing.T) {
	now := time.Date(2026, 6, 1, 12, 0, 0, 0, time.UTC)
	b := NewBuilder(Options{})
	for s := range 5 {
		b.AddSnippet(SnippetClick{Time: now, Session: fmt.Sprint("a", s), Department: "a", Query: "q", Stems: []string{"own"}})
	}
	before := b.Snapshot(now).SnippetTerms("a", "q", 5)
	for s := range 50 {
		b.AddSnippet(SnippetClick{Time: now, Session: fmt.Sprint("b", s), Department: "b", Query: "q", Stems: []string{"other"}})
	}
	after := b.Snapshot(now).SnippetTerms("a", "q", 5)
	if len(before) != 1 || len(after) != 1 || after[0] != before[0] {
		t.Errorf("department b moved a's list: before %v after %v", before, after)
	}
}

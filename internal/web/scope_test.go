package web

import (
	"slices"
	"strings"
	"testing"

	"kinword/internal/access"
	"kinword/internal/review"
)

// fakeReaders: only members of "executive" may read documents holding
// "thrennick"; keys read as upper-case words.
type fakeReaders struct{}

func (fakeReaders) Visible(v access.Viewer, key string) bool {
	return !strings.Contains(key, "thrennick") || slices.Contains(v.Groups, "executive")
}
func (fakeReaders) DisplayKey(key string) string { return strings.ToUpper(key) }

// TestDesksShowOnlyWhatTheCallerMayRead: the admin's review and the
// librarian's preview samples obey the search page's access rule — a term
// or query that only documents the caller may not read hold never shows
// (the canary rule of the access design), and what shows reads as words.
func TestDesksShowOnlyWhatTheCallerMayRead(t *testing.T) {
	s := &Server{opts: Options{Readers: fakeReaders{}}}
	rep := &review.Report{
		Impressions: 3,
		Terms:       []review.TermRow{{Term: "valv", Impressions: 2}, {Term: "thrennick", Impressions: 1}},
		Pairs:       []review.TermRow{{Query: "budget", Term: "thrennick"}, {Query: "thrennick plan", Term: "valv"}, {Query: "pump", Term: "valv"}},
		RarelyAccepted: []review.Attention{{Query: "budget", Term: "thrennick", Draft: review.RuleDraft{Kind: "block", Query: "budget", Term: "thrennick"}},
			{Query: "pump", Term: "seal", Draft: review.RuleDraft{Kind: "block", Query: "pump", Term: "seal"}}},
	}
	cases := []struct {
		name       string
		v          access.Viewer
		terms      []string
		pairs      int
		attentions int
	}{
		{"outsider", access.Viewer{Department: "finance"}, []string{"VALV"}, 1, 1},
		{"insider", access.Viewer{Groups: []string{"executive"}}, []string{"VALV", "THRENNICK"}, 3, 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := s.scopeReport(c.v, rep)
			var terms []string
			for _, r := range got.Terms {
				terms = append(terms, r.Term)
			}
			if !slices.Equal(terms, c.terms) || len(got.Pairs) != c.pairs || len(got.RarelyAccepted) != c.attentions {
				t.Errorf("terms %v pairs %d attention %d; want %v %d %d", terms, len(got.Pairs), len(got.RarelyAccepted), c.terms, c.pairs, c.attentions)
			}
			if got.Impressions != 3 {
				t.Errorf("counts changed: %d", got.Impressions)
			}
			q, shown, ok := s.scopeTerms(c.v, "pump", []string{"valv", "thrennick"})
			if !ok || q != "PUMP" || !slices.Equal(shown, c.terms) {
				t.Errorf("preview sample: %q %v %v, want PUMP %v", q, shown, ok, c.terms)
			}
			if _, _, ok := s.scopeTerms(c.v, "thrennick plan", nil); ok != (c.name == "insider") {
				t.Errorf("a query only insiders' documents hold: shown %v", ok)
			}
		})
	}
	if rep.Terms[1].Term != "thrennick" {
		t.Error("scopeReport changed the report it was given")
	}
}

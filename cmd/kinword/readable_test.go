package main

import (
	"testing"

	"kinword/internal/review"
)

// TestReviewShowsWords: the admin's review (and so its CSV files) shows the
// words people search with, not stems, in term rows, query-and-term rows,
// attention lists and the rule drafts they link to.
func TestReviewShowsWords(t *testing.T) {
	words := map[string]string{"hazard wast": "hazardous waste", "complianc": "compliance", "audit": "audit", "intern audit": "internal audit"}
	display := func(k string) string {
		if w, ok := words[k]; ok {
			return w
		}
		return k
	}
	r := &review.Report{
		Terms:          []review.TermRow{{Term: "hazard wast"}},
		Pairs:          []review.TermRow{{Query: "audit", Term: "intern audit"}},
		RarelyAccepted: []review.Attention{{Query: "audit", Term: "complianc", Draft: review.RuleDraft{Kind: review.DraftBlock, Query: "audit", Term: "complianc"}}},
	}
	readable(r, display)
	cases := []struct{ name, got, want string }{
		{"term row", r.Terms[0].Term, "hazardous waste"},
		{"pair term", r.Pairs[0].Term, "internal audit"},
		{"pair query", r.Pairs[0].Query, "audit"},
		{"attention term", r.RarelyAccepted[0].Term, "compliance"},
		{"draft term", r.RarelyAccepted[0].Draft.Term, "compliance"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: %q, want %q", c.name, c.got, c.want)
		}
	}
}

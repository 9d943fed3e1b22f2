package suggest

import (
	"strings"
)

// Suggestion is one related term offered to the searcher.
type Suggestion struct {
	// Term is the key: a stem or a phrase key of stems ("main break"); pass
	// it to Expand.
	Term string `json:"term"`
	// Display is how to show it: its commonest surface form among the
	// viewer's readable documents, or a phrase as its words were written
	// together; the key itself only when no surface form is known.
	Display string `json:"display"`
	// Score is the combined score (see Options for the weights).
	Score float64 `json:"score"`
	// Evidence says why it was offered.
	Evidence Evidence `json:"evidence"`
}

// Evidence is why a suggestion was offered.
type Evidence struct {
	// Sources are the paths that proposed it, in this order: "feedback"
	// (the feedback model over the viewer's top results proposed it, or
	// for a phrase one of its words), "association" (the mined table) and
	// "phrase" (a mined phrase containing a query word or joining strong
	// candidates).
	Sources []string `json:"sources"`
	// FeedbackDocs is how many of the feedback documents (the viewer's top
	// results) contain it.
	FeedbackDocs int `json:"feedback_docs"`
	// Parts are the score parts, each in [0, 1], by name: "feedback",
	// "association", "coverage", "phrase", "offer". Score is their
	// weighted sum (see Options for the weights; a part of weight 0 is
	// still reported).
	Parts map[string]float64 `json:"parts"`
	// Neighbours are the query terms (keys) that proposed it through the
	// association table or a phrase containing them.
	Neighbours []string `json:"neighbours,omitempty"`
	// BestPair is the query term of its strongest association pair, and
	// LLR and NPMI that pair's signed G2 and normalised PMI (zero without
	// an association).
	BestPair string  `json:"best_pair,omitempty"`
	LLR      float64 `json:"llr,omitempty"`
	NPMI     float64 `json:"npmi,omitempty"`
	// Rule is the ID of the librarian's rule that offered it (sources
	// "rule:pin", "rule:relate", "rule:broader", "rule:narrower"), if any.
	Rule string `json:"rule,omitempty"`
}

// Keys returns the terms of suggestions, in order, for Expand.
func Keys(s []Suggestion) []string {
	out := make([]string, len(s))
	for i, x := range s {
		out[i] = x.Term
	}
	return out
}

// display returns how cd is shown: for a phrase the table's written form
// when it comes from open text, otherwise the corpus's display (viewer-
// scoped); for a word the corpus's display, or the table's open-text
// display when the corpus has no surface form for it.
func (r *run) display(cd *cand) string {
	if cd.display != "" {
		return cd.display
	}
	d := ""
	if len(cd.words) > 1 && cd.dispSafe && cd.tblDisplay != "" {
		d = cd.tblDisplay
	} else {
		d = r.c.Display(cd.key)
		if (d == "" || d == cd.key) && cd.dispSafe && cd.tblDisplay != "" {
			d = cd.tblDisplay
		}
	}
	if d == "" {
		d = cd.key
	}
	cd.display = d
	return d
}

// suggestion builds the output for a chosen candidate.
func (r *run) suggestion(cd *cand) Suggestion {
	ev := Evidence{FeedbackDocs: cd.ndocs, Parts: make(map[string]float64, numParts),
		BestPair: cd.bestPair, LLR: cd.bestLLR, NPMI: cd.bestNPMI}
	for i, name := range []string{"feedback", "association", "phrase"} {
		if cd.src&(1<<i) != 0 {
			ev.Sources = append(ev.Sources, name)
		}
	}
	for i, p := range cd.parts {
		ev.Parts[partNames[i]] = p
	}
	if len(cd.neighbours) > 0 {
		ev.Neighbours = append([]string(nil), cd.neighbours...)
	}
	return Suggestion{Term: cd.key, Display: strings.TrimSpace(r.display(cd)), Score: cd.score, Evidence: ev}
}

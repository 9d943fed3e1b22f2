package finder

import (
	"kinword/internal/access"
	"kinword/internal/index"
	"kinword/internal/suggest"
)

// autoExpand is the automatic mode: the engine's AutoExpand over the
// viewer's own first-pass results (the view reads only what the viewer
// may read, so neither the feedback documents nor the statistics reach
// further). It returns the expanded query and the terms it added, or the
// query unchanged and nil when nothing was added.
func autoExpand(s *state, view *index.View, v access.Viewer, q []index.QueryTerm, first index.Result) ([]index.QueryTerm, []Expansion) {
	x := s.eng.AutoExpand(view, suggest.Request{Query: toSuggest(q), Viewer: v, Feedback: feedback(first.Hits, len(first.Hits))})
	orig := make(map[string]bool, len(q))
	for _, t := range q {
		orig[t.Key] = true
	}
	out := make([]index.QueryTerm, len(x))
	var added []Expansion
	for i, t := range x {
		out[i] = index.QueryTerm{Key: t.Key, Weight: t.Weight}
		if !orig[t.Key] {
			added = append(added, Expansion{Term: t.Key, Display: view.Display(t.Key), Weight: t.Weight})
		}
	}
	if len(added) == 0 {
		return q, nil
	}
	return out, added
}

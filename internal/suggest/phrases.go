package suggest

import (
	"cmp"
	"slices"
	"strings"

	"kinword/internal/assoc"
)

// queryPhraseCandidates adds the viewer's mined phrases that contain a
// query word.
func (r *run) queryPhraseCandidates() {
	if r.e.tbl == nil {
		return
	}
	for _, q := range r.query {
		for _, w := range strings.Fields(q.Key) {
			for _, p := range r.phrasesWith(w) {
				r.addPhrase(p, q.Key)
			}
		}
	}
}

// phrasesWith returns the first PhrasesPerTerm phrases with word w.
func (r *run) phrasesWith(w string) []assoc.Phrase {
	return r.e.tbl.PhrasesWithTop(r.req.Viewer, w, r.e.opt.PhrasesPerTerm)
}

// addPhrase records p as a phrase candidate proposed through by.
func (r *run) addPhrase(p assoc.Phrase, by string) *cand {
	cd := r.get(p.Key)
	cd.src |= srcPhrase
	cd.inTable = true
	if by != "" {
		cd.addNeighbour(by)
	}
	if cd.tblDisplay == "" || !cd.dispSafe {
		cd.tblDisplay, cd.dispSafe = p.Display, slices.Contains(p.Scopes, assoc.OpenScope)
	}
	return cd
}

// strongPhraseCandidates adds the mined phrases of the strongest single
// words whose every word is a query word or another strong candidate
// ("main" and "break" both strong: "main break"). The new phrases go
// through the filters too.
func (r *run) strongPhraseCandidates() {
	strongN := r.e.opt.StrongCandidates
	if r.req.StrongCandidates != 0 {
		strongN = max(r.req.StrongCandidates, 0)
	}
	if r.e.tbl == nil || strongN == 0 {
		return
	}
	prelim := r.prelimScores()
	var singles []*cand
	for _, cd := range r.list {
		if len(cd.words) == 1 && prelim[cd] > 0 {
			singles = append(singles, cd)
		}
	}
	slices.SortFunc(singles, func(a, b *cand) int {
		if c := cmp.Compare(prelim[b], prelim[a]); c != 0 {
			return c
		}
		return strings.Compare(a.key, b.key)
	})
	singles = singles[:min(len(singles), strongN)]
	strong := map[string]bool{}
	for _, cd := range singles {
		strong[cd.key] = true
	}
	var added []*cand
	for _, x := range singles {
		for _, p := range r.phrasesWith(x.key) {
			ok := true
			for _, w := range strings.Fields(p.Key) {
				ok = ok && (strong[w] || r.qstems[w])
			}
			if !ok {
				continue
			}
			_, existed := r.cands[p.Key]
			cd := r.addPhrase(p, "")
			if !existed {
				added = append(added, cd)
			}
		}
	}
	for _, cd := range added {
		if r.e.reject(r, cd) == "" {
			r.list = append(r.list, cd)
		}
	}
	slices.SortFunc(r.list, func(a, b *cand) int { return strings.Compare(a.key, b.key) })
}

// prelimScores are the feedback and association parts, weighted, over the
// candidates passing the filters: the ranking that picks strong
// candidates before coverage is known.
func (r *run) prelimScores() map[*cand]float64 {
	var maxFb, maxAs float64
	for _, cd := range r.list {
		maxFb, maxAs = max(maxFb, cd.fbRaw), max(maxAs, cd.asRaw)
	}
	out := make(map[*cand]float64, len(r.list))
	for _, cd := range r.list {
		out[cd] = r.e.opt.FeedbackWeight*ratio(cd.fbRaw, maxFb) + r.e.opt.AssocWeight*ratio(cd.asRaw, maxAs)
	}
	return out
}

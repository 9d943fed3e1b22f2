package suggest

import (
	"cmp"
	"math/bits"
	"slices"
	"strings"

	"kinword/internal/prf"
)

// Indexes of the score parts in cand.parts and their Evidence.Parts names.
const (
	partFeedback = iota
	partAssoc
	partCoverage
	partPhrase
	partOffer
	numParts
)

var partNames = [numParts]string{"feedback", "association", "coverage", "phrase", "offer"}

// docSet computes (once) which feedback documents contain cd, as a bit set,
// and returns how many do. A phrase must occur as consecutive tokens.
func (r *run) docSet(cd *cand) int {
	if cd.haveSet {
		return cd.ndocs
	}
	cd.haveSet = true
	if n := (len(r.docs) + 63) / 64; n <= len(cd.set) {
		cd.docSet = cd.set[:n]
	} else {
		cd.docSet = make([]uint64, n)
	}
	var buf [4]uint32
	ids := buf[:0]
	if cd.hasID {
		ids = append(ids, cd.id)
	} else {
		for _, w := range cd.words {
			id, ok := r.c.TermID(w)
			if !ok {
				return 0
			}
			ids = append(ids, id)
		}
	}
	for i, d := range r.docs {
		in := true
		for _, id := range ids {
			in = in && hasTerm(d.terms, id)
		}
		if in && len(ids) > 1 {
			in = hasRun(d.toks, ids)
		}
		if in {
			cd.docSet[i/64] |= 1 << (i % 64)
			cd.ndocs++
		}
	}
	return cd.ndocs
}

// hasTerm reports whether terms (sorted by term) holds id: a plain binary
// search, the engine's most frequent lookup.
func hasTerm(terms []prf.TermFreq, id uint32) bool {
	lo, hi := 0, len(terms)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if terms[m].Term < id {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo < len(terms) && terms[lo].Term == id
}

// hasRun reports whether ids occur as consecutive tokens of toks.
func hasRun(toks, ids []uint32) bool {
	for i := 0; i+len(ids) <= len(toks); i++ {
		if toks[i] == ids[0] && slices.Equal(toks[i:i+len(ids)], ids) {
			return true
		}
	}
	return false
}

// score computes every part and the combined score of the candidates
// passing the filters and returns those with a positive score, best first
// (ties by key). The parts, each in [0, 1]:
//
//   - feedback: the feedback-model weight divided by the largest over the
//     candidates (a phrase takes the weight of its strongest non-query
//     word);
//   - association: Σ_q (w_q/Σw)·LLR(q, c) over the query terms q that
//     have c as a positive-LLR neighbour for the viewer, divided by the
//     largest over the candidates;
//   - coverage: the share of feedback documents containing c;
//   - phrase: 1 for a phrase whose every word is a query word or a
//     feedback or association candidate, else 0;
//   - offer: Robertson's offer weight over the feedback documents (see
//     offerWeight), 0 when negative, divided by the largest over the
//     candidates.
func (r *run) score() []*cand {
	o := &r.e.opt
	var maxFb, maxAs, maxOw float64
	ow := make([]float64, len(r.list))
	for i, cd := range r.list {
		maxFb, maxAs = max(maxFb, cd.fbRaw), max(maxAs, cd.asRaw)
		ow[i] = max(r.offerWeight(cd), 0)
		maxOw = max(maxOw, ow[i])
	}
	w := [numParts]float64{o.FeedbackWeight, o.AssocWeight, o.CoverageWeight, o.PhraseWeight, o.OfferWeight}
	var pool []*cand
	for i, cd := range r.list {
		cd.parts = [numParts]float64{ratio(cd.fbRaw, maxFb), ratio(cd.asRaw, maxAs),
			ratio(float64(r.docSet(cd)), float64(len(r.docs))), cd.phrase, ratio(ow[i], maxOw)}
		cd.score = 0
		for i, p := range cd.parts {
			cd.score += w[i] * p
		}
		if cd.score > 0 {
			pool = append(pool, cd)
		}
	}
	slices.SortFunc(pool, byScore)
	return pool
}

// byScore orders candidates by score descending, then key.
func byScore(a, b *cand) int {
	if c := cmp.Compare(b.score, a.score); c != 0 {
		return c
	}
	return strings.Compare(a.key, b.key)
}

// selectMMR picks up to k candidates from pool (sorted by byScore) by
// maximal marginal relevance (Carbonell & Goldstein, SIGIR 1998): each
// pick maximises λ·s(c) − (1−λ)·max_{d chosen} sim(c, d), where s is the
// score divided by the best score and sim is 1 when one candidate's words
// contain the other's ("main break" and "break") and otherwise the Jaccard
// overlap of their feedback-document sets (0 when both sets are empty).
// Ties go to the higher score, then the smaller key.
//
// Candidates with s below MinShare are left out first. A pick is admitted
// only if its displayed form has no stopword word and is not the
// display of a chosen suggestion (compared case-folded), and, when it
// contains or is contained in a chosen suggestion, only if bothStrong
// holds for the pair. A pick not admitted is discarded. The result is in
// pick order.
func (r *run) selectMMR(pool []*cand, k int) []*cand {
	if len(pool) == 0 || k <= 0 {
		return nil
	}
	o := &r.e.opt
	best := pool[0].score
	n := 0
	minShare := o.MinShare
	if r.req.MinShare != 0 {
		minShare = max(r.req.MinShare, 0)
	}
	for n < len(pool) && pool[n].score/best >= minShare {
		n++
	}
	rest := slices.Clone(pool[:n])
	var chosen []*cand
	shown := map[string]bool{}
	for len(chosen) < k && len(rest) > 0 {
		bi, bv := -1, 0.0
		for i, cd := range rest {
			sim := 0.0
			for _, ch := range chosen {
				sim = max(sim, similarity(cd, ch))
			}
			if v := o.Lambda*cd.score/best - (1-o.Lambda)*sim; bi < 0 || v > bv {
				bi, bv = i, v
			}
		}
		cd := rest[bi]
		rest = slices.Delete(rest, bi, bi+1)
		disp := r.display(cd)
		folded := strings.ToLower(disp)
		if shown[folded] || r.e.hasStopword(folded) {
			continue
		}
		ok := true
		for _, ch := range chosen {
			switch {
			case contains(cd.words, ch.words):
				ok = ok && r.bothStrong(cd, ch, best)
			case contains(ch.words, cd.words):
				ok = ok && r.bothStrong(ch, cd, best)
			}
		}
		if !ok {
			continue
		}
		shown[folded] = true
		chosen = append(chosen, cd)
	}
	return chosen
}

// bothStrong reports whether a phrase and its part may both be offered:
// both score at least StrongShare of the best, and the part occurs in some
// feedback document without the phrase (a part seen only inside the
// phrase adds nothing to it).
func (r *run) bothStrong(phrase, part *cand, best float64) bool {
	if phrase.score/best < r.e.opt.StrongShare || part.score/best < r.e.opt.StrongShare {
		return false
	}
	for i := range part.docSet {
		if part.docSet[i]&^phrase.docSet[i] != 0 {
			return true
		}
	}
	return false
}

// hasStopword reports whether a displayed form has a stopword word.
func (e *Engine) hasStopword(folded string) bool {
	for _, w := range strings.Fields(folded) {
		if e.stop.Has(w) {
			return true
		}
	}
	return false
}

// similarity is MMR's sim(a, b).
func similarity(a, b *cand) float64 {
	if contains(a.words, b.words) || contains(b.words, a.words) {
		return 1
	}
	inter, union := 0, 0
	for i := range a.docSet {
		inter += bits.OnesCount64(a.docSet[i] & b.docSet[i])
		union += bits.OnesCount64(a.docSet[i] | b.docSet[i])
	}
	return ratio(float64(inter), float64(union))
}

// contains reports whether every word of part is a word of whole.
func contains(whole, part []string) bool {
	for _, w := range part {
		if !slices.Contains(whole, w) {
			return false
		}
	}
	return true
}

package suggest

import (
	"cmp"
	"math"
	"slices"
	"strings"

	"kinword/internal/prf"
)

// Expand returns query with the accepted suggestion keys (Keys of the
// accepted Suggestions, or keys the caller kept) appended at weight ×
// the largest original weight (so at weight itself for a plain query of
// weight-1 terms). weight <= 0 means DefaultExpandWeight (0.3). Original
// terms keep their weights and order (repeated keys merged); accepted keys
// already in the query, repeated or empty are skipped; phrase keys stay
// phrases. The input is not modified.
func Expand(query []QueryTerm, accepted []string, weight float64) []QueryTerm {
	if !(weight > 0) || math.IsInf(weight, 1) {
		weight = DefaultExpandWeight
	}
	out := mergeQuery(query)
	top := 0.0
	for _, q := range out {
		top = max(top, q.Weight)
	}
	if top == 0 {
		top = 1
	}
	have := map[string]bool{}
	for _, q := range out {
		have[q.Key] = true
	}
	for _, a := range accepted {
		key := strings.Join(strings.Fields(a), " ")
		if key == "" || have[key] {
			continue
		}
		have[key] = true
		out = append(out, QueryTerm{Key: key, Weight: weight * top})
	}
	return out
}

// AutoExpand is the automatic mode: the query expanded with the strongest
// terms of the AutoModel feedback model (over its own FeedbackDocs), interpolated as RM3 interpolates (Abdul-Jaleel
// et al., TREC 2004), without asking the searcher. The original terms come
// first, in order, at full weight normalised,
//
//	weight(q) = w_q / max_q' w_q'
//
// followed by the AutoTerms strongest feedback terms t that are not query
// words and pass the candidate filters (stopwords, also in the displayed
// form, numbers, short, DF and generic words), heaviest first (ties by
// key), at
//
//	rm3, mixture, blend: weight(t) = ((1−λ)/λ) · P(t|F) · (Σ_q w_q) / max_q w_q
//	rocchio:      weight(t) = F(t) / (α · max_q w_q)
//
// where P(t|F) is the model's feedback distribution (RM1 for rm3, θ_F for
// mixture, each cut to FeedbackTerms and renormalised, their average for
// blend), F(t) Rocchio's
// feedback component β·centroid, λ the model's OrigWeight and α Rocchio's
// Alpha; the sums and maxima run over the words given to the model (a
// phrase's words each at the phrase's weight). The factor is the one that
// maps the interpolated query λ·w_q/Σw + (1−λ)·P(t|F) (Rocchio: α·w_q +
// F(t)) to weight(q) = w_q/max w, so an expansion term keeps exactly its
// RM3 weight relative to the query's own part. When λ (or α) is 0 the
// strongest expansion term gets weight 1 instead.
//
// Without feedback documents, or for an empty query, it returns the
// normalised original terms only.
func (e *Engine) AutoExpand(c Corpus, req Request) []QueryTerm {
	r := e.prepareFor(c, req, e.auto.fbDocs)
	out := make([]QueryTerm, 0, len(r.query)+e.opt.AutoTerms)
	top := 0.0
	for _, q := range r.query {
		top = max(top, q.Weight)
	}
	for _, q := range r.query {
		out = append(out, QueryTerm{q.Key, q.Weight / top})
	}
	if len(r.query) == 0 {
		return out
	}
	mq := r.modelQuery()
	var msum, mmax float64
	for _, q := range mq {
		msum += q.Weight
		mmax = max(mmax, q.Weight)
	}
	res := e.auto.run(r)
	fb := slices.Clone(res.Feedback)
	slices.SortFunc(fb, func(a, b prf.Weighted) int {
		if c := cmp.Compare(b.Weight, a.Weight); c != 0 {
			return c
		}
		return strings.Compare(c.Term(a.ID), c.Term(b.ID))
	})
	var exp []QueryTerm
	for _, f := range fb {
		if len(exp) == e.opt.AutoTerms {
			break
		}
		// Automatic expansion keeps the model's terms as they are: the
		// display filters (generic words, frequent terms, the query's own
		// stems) serve a searcher choosing terms, and removing them from a
		// weighted query measurably lowers MAP (see the eval reports).
		exp = append(exp, QueryTerm{c.Term(f.ID), f.Weight})
	}
	if len(exp) == 0 {
		return out
	}
	var scale float64
	switch {
	case e.auto.origCoef == 0 || mmax == 0:
		scale = 1 / exp[0].Weight
	case e.auto.name == "rocchio":
		scale = 1 / (e.auto.origCoef * mmax)
	default:
		scale = (1 - e.auto.origCoef) / e.auto.origCoef * msum / mmax
	}
	// A query term the model also proposes gets the two parts summed, as in
	// the model's own interpolated query.
	at := make(map[string]int, len(out))
	for i, q := range out {
		at[q.Key] = i
	}
	for _, t := range exp {
		if i, ok := at[t.Key]; ok {
			out[i].Weight += t.Weight * scale
			continue
		}
		at[t.Key] = len(out)
		out = append(out, QueryTerm{t.Key, t.Weight * scale})
	}
	return out
}

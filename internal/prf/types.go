// Package prf holds Kinword's pseudo-relevance feedback models. Given a
// query and the documents a first retrieval pass ranked highest, each model
// returns weighted terms: a feedback model, whose strongest terms are shown
// as related-term suggestions, and an expanded query for automatic
// expansion. Three models are provided, and a blend of the three:
//
//   - RM3: the relevance model RM1 of Lavrenko & Croft (SIGIR 2001)
//     interpolated with the original query as in Abdul-Jaleel et al.
//     (TREC 2004);
//   - Mixture: the mixture-model feedback of Zhai & Lafferty (CIKM 2001),
//     which fits a feedback model by EM against a fixed collection
//     background;
//   - Rocchio: the vector-space feedback of Rocchio (1971) over BM25 term
//     weights (or raw term frequencies);
//   - Blend: a weighted average of RM1, the mixture model's θ_F and
//     Rocchio's normalised feedback vector over the same feedback
//     documents, interpolated with the query as RM3 does.
//
// All of them have the method Expand(q []QueryTerm, docs []Doc, st Stats)
// Result, so a caller may declare one interface over them. TermVector
// builds a feedback document's Terms from its tokens, the one counting the
// index and the suggestion engine share.
//
// The package is pure arithmetic. It must not import bleve, gin, database
// drivers or internal/index; its only Kinword dependency is internal/rank,
// for the BM25 formula. It reads collection statistics through the small
// Stats interface declared here, which the index's per-viewer View
// satisfies: every statistic then counts only documents the viewer may
// read, so feedback never leaks what the viewer cannot see.
//
// Every output list is sorted by weight descending, then term ID
// ascending, and is a deterministic function of the inputs, including
// their order.
package prf

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
)

// Defaults of the options every model has.
const (
	DefaultFeedbackDocs  = 10
	DefaultFeedbackTerms = 20
	DefaultOrigWeight    = 0.5 // RM3 and Mixture
)

// ErrBadOptions reports an option value outside its documented range.
var ErrBadOptions = errors.New("prf: bad options")

// Stats are collection statistics over the documents the viewer may read.
type Stats interface {
	// N is the number of documents.
	N() int
	// TotalLen is the number of tokens in them.
	TotalLen() int64
	// AvgDL is their mean length in tokens (0 for an empty collection).
	AvgDL() float64
	// DF is the number of documents containing term id.
	DF(id uint32) int
	// CF is the number of occurrences of term id.
	CF(id uint32) int64
}

// TermFreq is a term with its frequency in one document.
type TermFreq struct {
	Term uint32
	TF   int
}

// Doc is one feedback document.
type Doc struct {
	// Terms are the document's distinct terms with their frequencies,
	// sorted by Term. Unsorted lists and repeated terms are accepted (a
	// sorted copy is made and repeats are summed) at some extra cost.
	// Entries with TF <= 0 are ignored.
	Terms []TermFreq
	// Len is the document length in tokens; if it is <= 0 the sum of the
	// term frequencies is used.
	Len int
	// Score is the first-pass retrieval score. The models use the
	// FeedbackDocs highest-scoring documents (ties: earlier in the slice
	// first); the score does not otherwise enter any formula.
	Score float64
}

// QueryTerm is one term of the original query with its weight (usually its
// count in the query). Terms with a weight that is not positive and finite
// are ignored; repeated IDs are merged by adding their weights.
type QueryTerm struct {
	ID     uint32
	Weight float64
}

// Weighted is a term with a model weight.
type Weighted struct {
	ID     uint32
	Weight float64
}

// Result is the output of one feedback run.
type Result struct {
	// Feedback is the feedback model, cut to the FeedbackTerms strongest
	// terms: for RM3 the relevance model P(w|R) and for Mixture θ_F, both
	// renormalised to sum to 1; for Rocchio the positive part of the
	// feedback vector β·centroid(R) − γ·centroid(NR). It may contain query
	// terms. Nil when there is no usable feedback.
	Feedback []Weighted
	// Query is the expanded query: the original query terms and the
	// Feedback terms with their combined weights; terms of weight zero are
	// dropped. For RM3 and Mixture it is a distribution summing to 1.
	Query []Weighted
	// Iterations is the number of EM iterations run (Mixture only).
	Iterations int
}

// byWeight orders weighted terms: higher weight first, then lower ID.
// Weights are never NaN here (inputs are filtered).
func byWeight(a, b Weighted) int {
	switch {
	case a.Weight > b.Weight:
		return -1
	case a.Weight < b.Weight:
		return 1
	}
	return cmp.Compare(a.ID, b.ID)
}

// sortByWeight sorts ws in place by weight descending, then ID ascending.
func sortByWeight(ws []Weighted) { slices.SortFunc(ws, byWeight) }

// mergeQuery returns the usable query terms, merged by ID and sorted by ID,
// and the sum of their weights.
func mergeQuery(q []QueryTerm) ([]Weighted, float64) {
	out := make([]Weighted, 0, len(q))
	for _, t := range q {
		if t.Weight > 0 && !math.IsInf(t.Weight, 1) {
			out = append(out, Weighted{t.ID, t.Weight})
		}
	}
	slices.SortStableFunc(out, func(a, b Weighted) int { return cmp.Compare(a.ID, b.ID) })
	n := 0
	var sum float64
	for _, t := range out {
		sum += t.Weight
		if n > 0 && out[n-1].ID == t.ID {
			out[n-1].Weight += t.Weight
			continue
		}
		out[n] = t
		n++
	}
	return out[:n], sum
}

// normalised returns ws scaled to sum to 1 (ws must have a positive sum).
func normalised(ws []Weighted, sum float64) []Weighted {
	out := make([]Weighted, len(ws))
	for i, w := range ws {
		out[i] = Weighted{w.ID, w.Weight / sum}
	}
	return out
}

// combine returns the expanded query of RM3 and Mixture: the interpolation
// of qdist and the feedback model, or whichever of the two is non-empty.
// expandFrame is the frame RM3 and the mixture model share: merge the
// query, choose the feedback documents (the k highest-scoring), let model
// turn them into a feedback distribution over the merged query (returning
// it with the EM iterations it ran, 0 for none), cut that to terms and
// renormalise it, and interpolate it with the query at weight lambda.
func expandFrame(q []QueryTerm, docs []Doc, k, terms int, lambda float64, model func(qt []Weighted, fb []fbDoc) ([]Weighted, int)) Result {
	qt, qsum := mergeQuery(q)
	var qdist []Weighted
	if qsum > 0 {
		qdist = normalised(qt, qsum)
	}
	var res Result
	if fb := prepare(docs, k); len(fb) > 0 {
		var dist []Weighted
		dist, res.Iterations = model(qt, fb)
		res.Feedback = renormalise(topN(dist, terms))
	}
	res.Query = combine(qdist, res.Feedback, lambda)
	return res
}

func combine(qdist, feedback []Weighted, lambda float64) []Weighted {
	var out []Weighted
	switch {
	case feedback == nil:
		out = slices.Clone(qdist)
		sortByWeight(out)
	case qdist == nil:
		out = slices.Clone(feedback)
	default:
		out = interpolate(qdist, feedback, lambda)
	}
	return out
}

// interpolate returns λ·P(t|Q) + (1−λ)·P(t|F) over the union of the
// query's and the feedback model's terms, dropping zero weights, sorted by
// weight. qdist is sorted by ID; fb is any order; both sum to 1.
func interpolate(qdist, fb []Weighted, lambda float64) []Weighted {
	out := make([]Weighted, 0, len(qdist)+len(fb))
	for _, t := range qdist {
		out = append(out, Weighted{t.ID, lambda * t.Weight})
	}
	for _, f := range fb {
		w := (1 - lambda) * f.Weight
		if i, ok := slices.BinarySearchFunc(qdist, f.ID, func(a Weighted, id uint32) int { return cmp.Compare(a.ID, id) }); ok {
			out[i].Weight += w
			continue
		}
		out = append(out, Weighted{f.ID, w})
	}
	out = slices.DeleteFunc(out, func(w Weighted) bool { return w.Weight <= 0 })
	sortByWeight(out)
	return out
}

// checkFraction reports whether v is a finite number in [0, max].
func checkFraction(v, max float64) bool { return v >= 0 && v <= max && !math.IsNaN(v) }

// checkCounts validates the shared FeedbackDocs and FeedbackTerms options.
func checkCounts(model string, docs, terms int) error {
	if docs < 0 {
		return errorf("%s: FeedbackDocs %d is negative", model, docs)
	}
	if terms < 0 {
		return errorf("%s: FeedbackTerms %d is negative", model, terms)
	}
	return nil
}

// resolveFraction maps the zero value to def and negative values to 0.
func resolveFraction(v, def float64) float64 {
	switch {
	case v == 0:
		return def
	case v < 0:
		return 0
	}
	return v
}

// resolveCount maps the zero value to def.
func resolveCount(v, def int) int {
	if v == 0 {
		return def
	}
	return v
}

// errorf wraps ErrBadOptions with a description.
func errorf(format string, args ...any) error {
	return fmt.Errorf("%w: "+format, append([]any{ErrBadOptions}, args...)...)
}

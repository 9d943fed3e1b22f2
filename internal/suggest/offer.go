package suggest

import "math"

// offerWeight is Robertson's offer weight of cd over the feedback
// documents, taken as the relevant set (Robertson, 1990):
//
//	OW = r · log[ (r+0.5)(N−n−R+r+0.5) / ((n−r+0.5)(R−r+0.5)) ]
//
// where R is the number of feedback documents, r those containing cd (a
// phrase as consecutive tokens), n the readable documents containing cd
// and N all readable documents. The logarithm is the Robertson/Sparck
// Jones relevance weight with the usual 0.5 correction (Robertson &
// Sparck Jones, 1976), so a candidate scores high when it is in many
// feedback documents and few others. It is 0 for a candidate in no
// feedback document and negative for one no likelier in the feedback
// documents than in the collection. n is taken as at least r, and a
// non-positive argument (impossible for feedback documents the viewer can
// read) gives 0.
//
// S. E. Robertson (1990), "On term selection for query expansion",
// Journal of Documentation 46(4), 359-364. S. E. Robertson and K. Sparck
// Jones (1976), "Relevance weighting of search terms", JASIS 27(3),
// 129-146.
func (r *run) offerWeight(cd *cand) float64 {
	big, rel := float64(len(r.docs)), float64(r.docSet(cd))
	if rel == 0 {
		return 0
	}
	var n float64
	if len(cd.words) == 1 && cd.hasID {
		n = float64(r.c.DF(cd.id))
	} else {
		n = float64(r.c.KeyDF(cd.key))
	}
	return offerWeight(rel, big, max(n, rel), float64(r.c.N()))
}

// offerWeight is OW for r of R feedback documents, n of N documents.
func offerWeight(r, R, n, N float64) float64 {
	num, den := (r+0.5)*(N-n-R+r+0.5), (n-r+0.5)*(R-r+0.5)
	if !(num > 0) || !(den > 0) {
		return 0
	}
	return r * math.Log(num/den)
}

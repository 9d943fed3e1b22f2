package suggest

import (
	"math"
	"slices"
	"strings"
	"unicode"

	"kinword/internal/prf"
)

// Reasons a candidate is dropped, in the order the filters run.
const (
	rejExcluded = "excluded" // the request excludes it (a librarian's block)
	rejStopword = "stopword" // a word of it is a stopword (stem or surface form)
	rejQuery    = "query"    // the query's own term or stem variant
	rejNumber   = "number"   // a bare number
	rejShort    = "short"    // a single word with fewer than MinLetters letters
	rejUnknown  = "unknown"  // not in the viewer's collection
	rejRare     = "rare"     // DF below MinDF
	rejCommon   = "common"   // DF/N above MaxDFShare
	rejGeneric  = "generic"  // residual IDF below MinResidualIDF
)

// ResidualIDF is Church & Gale's (1995) residual inverse document
// frequency of term id, in bits: the observed IDF log2(N/df) minus the IDF
// a Poisson model with the term's collection frequency cf predicts,
// −log2(1 − exp(−cf/N)). Content words cluster in few documents (bursty)
// and score high; generic words spread like Poisson and score near 0. It
// is 0 when N, df or cf is not positive.
//
// K. W. Church and W. A. Gale (1995), "Inverse Document Frequency (IDF): A
// Measure of Deviations from Poisson", Third Workshop on Very Large
// Corpora.
func ResidualIDF(st prf.Stats, id uint32) float64 {
	n, df, cf := float64(st.N()), float64(st.DF(id)), float64(st.CF(id))
	if n <= 0 || df <= 0 || cf <= 0 {
		return 0
	}
	// log2(N/df) + log2(1 − e^(−cf/N)), with −expm1 for precision when
	// cf/N is small.
	return math.Log2(n/df) + math.Log2(-math.Expm1(-cf/n))
}

// filter keeps the candidates that pass every filter, sorted by key, and
// sets each phrase's feedback and phrase parts.
func (r *run) filter() {
	keys := make([]string, 0, len(r.cands))
	for k := range r.cands {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		cd := r.cands[k]
		if r.e.reject(r, cd) == "" {
			r.list = append(r.list, cd)
		}
	}
}

// reject returns why cd is dropped, or "" when it passes. The filters:
//
//   - excluded: the request's Exclude says so (a librarian's block);
//   - stopword: any word whose stem is a stopword of the configured
//     language (the text pipeline's list); the displayed form is checked
//     the same way when a candidate is about to be chosen (selectMMR);
//   - query: the key is a query key, or every word of it is a query stem
//     (a stem variant of the query: "pumps" for "pump", or a phrase of
//     query words only);
//   - number: a single word, or every word of a phrase, that is a bare
//     number (digits and . , : / - only);
//   - short: a single word with fewer than MinLetters letters;
//   - unknown, rare, common: DF in the viewer's collection is 0, below
//     MinDF, or above MaxDFShare·N (a phrase's DF is bounded first by its
//     table and feedback-document counts and by its rarest word, and
//     counted with KeyDF only when the bounds do not decide);
//   - generic: a single word with DF >= ResidualIDFMinDF whose
//     ResidualIDF is below MinResidualIDF, or a phrase all of whose words
//     are such generic words.
func (e *Engine) reject(r *run, cd *cand) string {
	o := &e.opt
	if r.req.Exclude != nil && r.req.Exclude(cd.key) {
		return rejExcluded
	}
	for _, w := range cd.words {
		if e.stop.Has(w) {
			return rejStopword
		}
	}
	allQuery := true
	for _, w := range cd.words {
		allQuery = allQuery && r.qstems[w]
	}
	if allQuery || slices.ContainsFunc(r.query, func(q QueryTerm) bool { return q.Key == cd.key }) {
		return rejQuery
	}
	numbers := 0
	for _, w := range cd.words {
		if isNumber(w) {
			numbers++
		}
	}
	if numbers == len(cd.words) {
		return rejNumber
	}
	if len(cd.words) == 1 && letters(cd.key) < o.MinLetters {
		return rejShort
	}
	if len(cd.words) > 1 {
		return e.rejectPhrase(r, cd)
	}
	if !cd.hasID {
		cd.id, cd.hasID = r.c.TermID(cd.key)
		if !cd.hasID {
			return rejUnknown
		}
	}
	df := r.c.DF(cd.id)
	if why := e.dfReason(df, r.c.N()); why != "" {
		return why
	}
	if e.generic(r, cd.id, df) {
		return rejGeneric
	}
	return ""
}

// dfReason applies the DF filters to a known DF.
func (e *Engine) dfReason(df, n int) string {
	switch {
	case df <= 0:
		return rejUnknown
	case df < e.opt.MinDF:
		return rejRare
	case float64(df) > e.opt.MaxDFShare*float64(n):
		return rejCommon
	}
	return ""
}

// generic reports whether a word of DF df is a generic word.
func (e *Engine) generic(r *run, id uint32, df int) bool {
	return df >= e.opt.ResidualIDFMinDF && ResidualIDF(r.c, id) < e.opt.MinResidualIDF
}

// rejectPhrase applies the DF and generic filters to a phrase and sets its
// feedback part (the strongest feedback weight of its non-query words; the
// phrase then counts as proposed by feedback too) and phrase part (1 when
// every word is a query word or a candidate of the feedback or association
// paths).
func (e *Engine) rejectPhrase(r *run, cd *cand) string {
	n := r.c.N()
	upper, allGeneric := math.MaxInt, true
	for _, w := range cd.words {
		id, ok := r.c.TermID(w)
		if !ok {
			return rejUnknown
		}
		df := r.c.DF(id)
		upper = min(upper, df)
		allGeneric = allGeneric && e.generic(r, id, df)
	}
	if why := e.dfReason(upper, n); why == rejUnknown || why == rejRare {
		return why // the phrase is in no more documents than its rarest word
	}
	lower := r.docSet(cd)
	if cd.inTable {
		lower = max(lower, e.tableMinDF)
	}
	if lower < e.opt.MinDF || float64(upper) > e.opt.MaxDFShare*float64(n) {
		if why := e.dfReason(r.c.KeyDF(cd.key), n); why != "" {
			return why
		}
	}
	if allGeneric {
		return rejGeneric
	}
	supported := true
	for _, w := range cd.words {
		if !r.qstems[w] {
			cd.fbRaw = max(cd.fbRaw, r.fbByKey[w])
			other, ok := r.cands[w]
			supported = supported && ok && other.src&(srcFeedback|srcAssoc) != 0
		}
	}
	if supported {
		cd.phrase = 1
	}
	if cd.fbRaw > 0 {
		cd.src |= srcFeedback
	}
	return ""
}

// isNumber reports whether w is made of digits and . , : / - only, with
// at least one digit.
func isNumber(w string) bool {
	digit := false
	for _, c := range w {
		switch {
		case c >= '0' && c <= '9':
			digit = true
		case strings.ContainsRune(".,:/-", c):
		default:
			return false
		}
	}
	return digit
}

// letters counts the letters of w.
func letters(w string) int {
	n := 0
	for _, c := range w {
		if unicode.IsLetter(c) {
			n++
		}
	}
	return n
}

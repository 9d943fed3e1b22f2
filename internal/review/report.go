package review

import (
	"math"
	"time"
)

// Report is the review of one window. Every list has a fixed, documented
// order, so the same events give the same report.
type Report struct {
	From, To    time.Time     // the window as given (zero = open)
	Department  string        // the department reviewed; "" = all
	Bucket      time.Duration // trend bucket width used
	Origin      time.Time     // start of the first trend bucket (UTC); zero without impressions
	Impressions int           // impressions reviewed
	// Unmatched counts accepts and dismissals that name no known
	// impression, or a term their impression did not show. (Those of
	// impressions outside the window or department are skipped silently.)
	Unmatched int

	// Terms has one row per term over all departments (Department "")
	// and one per (department, term); sorted by Department, Impressions
	// descending, Term.
	Terms []TermRow
	// Pairs is Terms per query: one row per (query, term), overall and
	// per department; sorted by Department, Impressions descending,
	// Query, Term. Pair rows carry no Trend; impressions with an empty
	// query have none.
	Pairs []TermRow
	// Trend covers every reviewed impression, one point per bucket from
	// Origin to the last bucket (of To when set, else of the last
	// impression), empty buckets included.
	Trend []Point

	// RarelyAccepted: pairs with at least MinImpressions impressions
	// whose corrected rate's upper 95% bound is below LowRate (Count =
	// accepts, Rate = corrected rate, High = upper bound); draft: block.
	// Sorted by Department, Impressions descending, Query, Term.
	RarelyAccepted []Attention
	// OftenDismissed: pairs with at least MinImpressions impressions and
	// dismissals per impression at least DismissRate (Count = dismissals,
	// Rate = Count/Impressions); draft: block. Sorted by Department, Rate
	// descending, Impressions descending, Query, Term.
	OftenDismissed []Attention
	// NoResults: queries with impressions that showed no results (Hits ==
	// 0; Impressions = all impressions of the query, Count = zero-hit
	// ones); draft: relate the query to the term that rescued it most
	// often (Term "" when none did: the librarian picks one). Sorted by
	// Department, Count descending, Query.
	NoResults []Attention
	// NoSuggestions: queries with impressions that showed no terms
	// (Impressions = all impressions of the query, Count = empty ones);
	// draft: relate, Term "" (the librarian picks one). Same order as
	// NoResults.
	NoSuggestions []Attention
	// Rescued: (query, term) pairs where accepting the term on a zero-hit
	// impression was followed, in the same session within Window, by an
	// impression with results for the same query or for a query that
	// contains the term (Impressions = zero-hit impressions of the query,
	// Count = rescues by the term); draft: pin the term for the query.
	// Sorted by Department, Count descending, Query, Term.
	Rescued []Attention
}

// TermRow is the acceptance record of one term (or one (query, term) pair)
// in one department or overall.
type TermRow struct {
	Department string // "" = every reviewed department
	Query      string // pair rows: the query; term rows: ""
	Term       string

	Impressions int     // impressions that showed the term
	Exposure    float64 // Σ propensity(position) over those impressions: expected examinations
	Accepts     int     // impressions in which it was accepted (at most one each)
	Dismissals  int     // impressions in which it was dismissed (at most one each)
	Successes   int     // accepts followed by a result click (see Build)

	Rate        float64 // Accepts / Impressions
	Corrected   float64 // Accepts / Exposure: the position-corrected acceptance rate
	Low, High   float64 // 95% interval of Corrected (see Interval)
	DismissRate float64 // Dismissals / Impressions
	SuccessRate float64 // Successes / Accepts; 0 without accepts
	MeanPos     float64 // mean 0-based position the term was shown at

	Trend []Point // term rows: non-empty buckets, oldest first; pair rows: nil
}

// Point is one trend bucket.
type Point struct {
	Start       time.Time // bucket start (UTC)
	Impressions int       // impressions (term trend: those showing the term)
	Shown       int       // term slots shown (term trend: = Impressions)
	Exposure    float64   // Σ propensity over those slots
	Accepts     int
	Dismissals  int
	Successes   int
	ZeroHits    int     // impressions with Hits == 0
	Empty       int     // impressions with no terms (report trend only)
	Rate        float64 // Accepts / Shown
	Corrected   float64 // Accepts / Exposure
}

// Attention is one row of an attention list; what Impressions, Count and
// Rate count depends on the list (see Report).
type Attention struct {
	Department  string // "" = every reviewed department
	Query       string
	Term        string // "" on query-level lists
	Impressions int
	Count       int
	Rate        float64
	High        float64 // RarelyAccepted: upper 95% bound of the corrected rate; else 0
	Draft       RuleDraft
}

// Draft rule kinds.
const (
	DraftBlock  = "block"  // stop suggesting Term for Query
	DraftRelate = "relate" // suggest Term for Query
	DraftPin    = "pin"    // show Term first for Query
)

// RuleDraft is a rule a librarian may review and save; nothing applies it
// automatically.
type RuleDraft struct {
	Kind       string // one of the Draft constants
	Query      string
	Term       string // "" when the librarian has to choose the term
	Department string // "" = every department
}

// Wilson returns the Wilson score interval for k successes in n trials at
// 95% (Wilson, "Probable inference, the law of succession, and statistical
// inference", JASA 22, 1927; recommended over the Wald interval by Agresti
// & Coull, "Approximate is better than 'exact' for interval estimation of
// binomial proportions", The American Statistician 52, 1998):
//
//	centre = (p̂ + z²/2n) / (1 + z²/n)
//	half   = z/(1 + z²/n) · √(p̂(1−p̂)/n + z²/4n²),   p̂ = k/n, z = 1.95996
//
// clamped into [0, 1]. n ≤ 0 gives [0, 1].
func Wilson(k, n int) (low, high float64) {
	if n <= 0 {
		return 0, 1
	}
	k = min(max(k, 0), n)
	nf, p := float64(n), float64(k)/float64(n)
	z2 := z95 * z95
	den := 1 + z2/nf
	centre := (p + z2/(2*nf)) / den
	half := z95 / den * math.Sqrt(p*(1-p)/nf+z2/(4*nf*nf))
	return max(centre-half, 0), min(centre+half, 1)
}

// Interval is the 95% interval of the corrected rate a/E: the Wilson
// interval of the raw rate a/n, scaled by n/E. The scale is fixed by where
// the term was shown, so the interval moves with the estimate. Under the
// examination hypothesis the accepts are a sum of Bernoulli trials with
// unequal probabilities, whose variance never exceeds the binomial one
// with the same mean, so the scaled interval is, if anything, wide.
// Values above 1 mean the propensity curve undervalues deep positions.
func Interval(accepts, impressions int, exposure float64) (low, high float64) {
	lo, hi := Wilson(accepts, impressions)
	if exposure <= 0 || impressions <= 0 {
		return lo, hi
	}
	f := float64(impressions) / exposure
	return lo * f, hi * f
}

func ratio(a, b float64) float64 {
	if b <= 0 {
		return 0
	}
	return a / b
}

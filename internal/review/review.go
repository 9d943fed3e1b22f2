// Package review turns interaction events into the admin's review of
// suggestion quality: per term (overall, per department and per query)
// how often it was shown, accepted and dismissed, its raw and
// position-corrected acceptance rate with a 95% interval, how often an
// accept led to a result click, trends per time bucket, and attention
// lists (much shown but rarely accepted, often dismissed, queries without
// results or suggestions, rescued searches) that each carry a draft rule
// for a librarian.
//
// It is pure logic over a slice of events: it imports only the standard
// library and must not import internal/store, internal/web, gin, bleve or
// database drivers. Callers convert stored events into Event.
package review

import (
	"math"
	"time"
)

// Event kinds; other kinds (for example mark_useful) are ignored.
const (
	KindImpression = "impression" // suggestion terms shown for a query
	KindAccept     = "accept"     // a shown term was added to the query
	KindDismiss    = "dismiss"    // a shown term was set aside
	KindClick      = "click"      // a result was opened
	KindMarkUseful = "mark_useful"
)

// Event is one interaction on the search page.
type Event struct {
	Kind       string    // one of the Kind constants
	Impression string    // the impression the event belongs to (an impression's own id)
	Time       time.Time // when it happened
	Session    string    // short-lived session token; "" cannot be linked across impressions
	Department string    // department of the searcher's view; "" counts only in the all-departments rows
	Query      string    // normalised query key
	Term       string    // accept, dismiss: the term key
	Position   int       // accept, dismiss: position as reported; the impression's own order is used
	Terms      []string  // impression: shown term keys in order; click: the accepted term keys
	Hits       int       // impression: result count shown with it; negative = unknown (0 means none!)
	Doc        string    // click: result document id
	Rank       int       // click: 0-based rank of the result
}

// Defaults of Options.
const (
	DefaultEta            = 0.7               // exponent of the default examination curve
	DefaultBucket         = 24 * time.Hour    // trend bucket width
	DefaultWindow         = 30 * time.Minute  // accept -> click / rescue window
	DefaultMinImpressions = 20                // impressions before a pair can need attention
	DefaultLowRate        = 0.10              // rarely accepted: upper bound below this
	DefaultDismissRate    = 0.25              // often dismissed: dismissals/impressions at least this
	PropensityFloor       = 0.05              // propensities are clipped from below to this
	MaxBuckets            = 10000             // the trend never has more buckets; Bucket widens instead
	z95                   = 1.959963984540054 // Φ⁻¹(0.975), the two-sided 95% normal quantile
)

// DefaultPropensity is the configured examination decay curve
//
//	p(k) = 1/(k+1)^η,  η = DefaultEta = 0.7, k = 0-based position
//
// the probability that a searcher looks at the suggestion shown at
// position k (a reciprocal-rank position-bias curve, common practice; the
// same family as prefs.DecayPropensities).
func DefaultPropensity(pos int) float64 {
	return 1 / math.Pow(float64(max(pos, 0)+1), DefaultEta)
}

// Options select and tune a review. The zero value reviews every event with
// the defaults above.
type Options struct {
	// From and To bound the impressions reviewed: From ≤ Time < To. The zero
	// time leaves that side open. Accepts, dismissals and clicks count with
	// the impression they belong to, whatever their own time.
	From, To time.Time
	// Department restricts the review to impressions of one department;
	// "" reviews all.
	Department string
	// Propensity is the examination probability of a 0-based position,
	// clipped into [PropensityFloor, 1]; nil means DefaultPropensity.
	Propensity func(pos int) float64
	// Bucket is the width of a trend bucket; default 24h. Buckets start at
	// From, or (From zero) at the first impression's time truncated to a
	// multiple of Bucket since the zero time (UTC midnight for 24h).
	Bucket time.Duration
	// Window is how long after an accept a result click still makes it a
	// success, and a later impression with results still makes it a
	// rescue; default 30 minutes.
	Window time.Duration
	// MinImpressions is how many impressions a (query, term) pair needs
	// before it can be listed as rarely accepted or often dismissed;
	// default 20.
	MinImpressions int
	// LowRate lists a pair as rarely accepted when the upper end of its
	// corrected rate's 95% interval is below it; default 0.10 (with the
	// interval widened by position correction, 0.05 listed nothing on the
	// demo's simulated traffic, not even a term accepted 0 times in 102).
	LowRate float64
	// DismissRate lists a pair as often dismissed when dismissals per
	// impression reach it; default 0.25.
	DismissRate float64
}

func (o Options) withDefaults() Options {
	if o.Propensity == nil {
		o.Propensity = DefaultPropensity
	}
	if o.Bucket <= 0 {
		o.Bucket = DefaultBucket
	}
	if o.Window <= 0 {
		o.Window = DefaultWindow
	}
	if o.MinImpressions <= 0 {
		o.MinImpressions = DefaultMinImpressions
	}
	if o.LowRate <= 0 {
		o.LowRate = DefaultLowRate
	}
	if o.DismissRate <= 0 {
		o.DismissRate = DefaultDismissRate
	}
	return o
}

// propensity is o.Propensity clipped into [PropensityFloor, 1] (clipping
// bounds the weight of deep positions: common practice for inverse
// propensity weighting).
func (o Options) propensity(pos int) float64 {
	p := o.Propensity(pos)
	if !(p >= PropensityFloor) { // also catches NaN
		p = PropensityFloor
	}
	return min(p, 1)
}

// inScope reports whether an impression at t of department dept is reviewed.
func (o Options) inScope(t time.Time, dept string) bool {
	if o.Department != "" && dept != o.Department {
		return false
	}
	return (o.From.IsZero() || !t.Before(o.From)) && (o.To.IsZero() || t.Before(o.To))
}

// Package prefs learns, per department, how likely a suggested term is to be
// accepted for a query, from interaction events (impressions, accepts,
// dismissals, clicks), and re-ranks suggestions with that estimate. While a
// department's own data is thin its estimate is smoothed toward the
// organisation-wide estimate, then toward the term's acceptance under other
// queries sharing a query term, then toward the content score.
//
// The estimator is a time-decayed, inverse-propensity-weighted (IPW) accept
// rate with a Beta prior; exploration is Thompson sampling on a bounded,
// seeded share of impressions. simulate.go holds a cascade click model used
// to test and demonstrate learning.
//
// It is pure logic: it must not import bleve, gin, database drivers,
// internal/index or any other Kinword package that does I/O.
package prefs

import "time"

// Event kinds. Accept and click both count as an acceptance of the
// suggestion (a click on a suggestion adds it to the query); dismiss counts
// as an examination without acceptance.
const (
	KindImpression = "impression"
	KindAccept     = "accept"
	KindDismiss    = "dismiss"
	KindClick      = "click"
)

// Evidence sources, from most to least specific.
const (
	SourceDepartment   = "department"
	SourceOrganisation = "organisation"
	SourceQueryTerm    = "query-term"
	SourceContent      = "content"
)

// Event is one logged interaction with the suggestion list.
type Event struct {
	// Kind is one of the Kind* constants; other kinds are ignored.
	Kind string
	// Time is when it happened; the decay age is measured from it.
	Time time.Time
	// Session identifies the searcher's session; caps and evidence gates
	// count distinct sessions.
	Session string
	// Department is the searcher's department slug.
	Department string
	// Query is the canonical query key: sorted stems joined by one space.
	Query string
	// Term is the suggestion key (accept, click, dismiss; impression when
	// Shown is empty).
	Term string
	// Position is the 0-based position Term was shown at.
	Position int
	// Shown lists, for an impression, the suggestion keys shown in order;
	// each counts as examined at its index.
	Shown []string
	// SwapLower marks events of the randomised swap slice used by
	// EstimatePropensities: the slice randomises the adjacent pair
	// (SwapLower-1, SwapLower). 0 means the event is not in the slice.
	SwapLower int
	// Swapped reports whether that pair was exchanged in this impression
	// (or in the impression this click/accept belongs to).
	Swapped bool
}

// Options tune the model. The zero value gives the documented defaults.
type Options struct {
	// HalfLife is the age at which an event's weight halves; default 30 days.
	HalfLife time.Duration
	// PriorStrength is α0+β0 of the Beta prior, in pseudo-examinations;
	// default 10.
	PriorStrength float64
	// MinSessions is how many distinct sessions must have seen a
	// (query, term) before that level's own data is used; default 5.
	MinSessions int
	// ExploreShare is the share of impressions ranked by a Thompson sample
	// instead of the posterior mean, in [0,1]; 0 means default 0.1,
	// negative disables exploration.
	ExploreShare float64
	// LearnWeight is w in score = (1-w)·content + w·acceptance, in [0,1];
	// 0 means default 0.5, negative means 0 (content only).
	LearnWeight float64
	// Propensity gives the examination probability per position (index =
	// position); positions past its end use its last value. nil means the
	// decay curve 1/(k+1)^Eta.
	Propensity []float64
	// Eta is the exponent of the decay curve; default 1.
	Eta float64
	// PropensityFloor clips propensities from below before inverting;
	// default 0.05 (common practice for IPW variance control).
	PropensityFloor float64
	// ContentPrior is the prior mean used by Acceptance, which has no
	// content score; default 0.5. Rank uses each candidate's content.
	ContentPrior float64
	// Seed makes exploration deterministic together with the impression id.
	Seed uint64
}

func (o Options) withDefaults() Options {
	if o.HalfLife <= 0 {
		o.HalfLife = 30 * 24 * time.Hour
	}
	if o.PriorStrength <= 0 {
		o.PriorStrength = 10
	}
	if o.MinSessions <= 0 {
		o.MinSessions = 5
	}
	switch {
	case o.ExploreShare == 0:
		o.ExploreShare = 0.1
	case o.ExploreShare < 0:
		o.ExploreShare = 0
	case o.ExploreShare > 1:
		o.ExploreShare = 1
	}
	switch {
	case o.LearnWeight == 0:
		o.LearnWeight = 0.5
	case o.LearnWeight < 0:
		o.LearnWeight = 0
	case o.LearnWeight > 1:
		o.LearnWeight = 1
	}
	if o.Eta <= 0 {
		o.Eta = 1
	}
	if o.PropensityFloor <= 0 {
		o.PropensityFloor = 0.05
	}
	if o.ContentPrior <= 0 || o.ContentPrior >= 1 {
		o.ContentPrior = 0.5
	}
	return o
}

// Evidence says what an estimate rests on.
type Evidence struct {
	// Sessions is the number of distinct sessions that saw the pair at the
	// level the estimate came from.
	Sessions int
	// Accepts is the decayed, inverse-propensity-weighted accept count A.
	Accepts float64
	// Impressions is the decayed examination count E.
	Impressions float64
	// Source is one of the Source* constants.
	Source string
}

// Package trial tries a proposed change to the librarian rules or the
// search settings offline, before it goes live: it runs a judged set the
// organisation keeps (topics and graded judgements, as eval reads them)
// through the search service twice, once with the rules in force and once
// with the change, and compares the two topic by topic with the paired
// randomization test (common practice in IR evaluation; Smucker, Allan &
// Carterette, CIKM 2007, compare it with the t-test and sign test).
//
// Three views are compared, because rules act in two places: the plain
// search (equivalence rules widen the query; the automatic mode expands
// it), the search after the searcher accepts the first suggestion (pins
// and blocks change which term that is), and after the best of the first
// few suggestions (what a searcher choosing well would reach).
//
// It is domain logic over the finder: it imports kinword/internal/finder,
// eval, curate and access. It must not import gin, bleve or database
// drivers directly, nor internal/store or internal/web.
package trial

import (
	"context"
	"errors"
	"time"

	"kinword/internal/curate"
	"kinword/internal/eval"
	"kinword/internal/finder"
)

// ErrInvalid marks a proposal or judged set the trial cannot run.
var ErrInvalid = errors.New("trial: invalid")

// Searcher is what a trial needs of the search service.
type Searcher interface {
	Search(ctx context.Context, req finder.Request) (finder.Response, error)
}

// Proposal is a change to try.
type Proposal struct {
	// Title names the trial in lists, e.g. "pin leak detection for leak".
	Title string `json:"title"`
	// Add are rules to add; one with the ID of a rule in force replaces it.
	Add []curate.Rule `json:"add,omitempty"`
	// Remove are IDs of rules in force to drop.
	Remove []string `json:"remove,omitempty"`
	// AutoExpand, when set, switches the automatic mode (search.auto_expand)
	// for the proposed side; nil keeps the configured setting on both sides.
	AutoExpand *bool `json:"auto_expand,omitempty"`
	// AcceptedWeight, when set, is the weight of an accepted term
	// (search.accepted_weight, in (0, 1]) on the proposed side; nil keeps
	// the configured weight on both sides. It acts on the two views with
	// an accepted suggestion.
	AcceptedWeight *float64 `json:"accepted_weight,omitempty"`
}

// Empty reports whether p changes nothing.
func (p Proposal) Empty() bool {
	return len(p.Add) == 0 && len(p.Remove) == 0 && p.AutoExpand == nil && p.AcceptedWeight == nil
}

// Limits on a proposal.
const (
	MaxTitleBytes = 200  // longest Title
	MaxRules      = 1000 // most rules in Add plus Remove
	MaxTopics     = 2000 // most judged topics run
)

// Options tune a trial. The zero value is ready to use.
type Options struct {
	// Depth is how many results each search ranks for the measures;
	// default 100 (Recall@100), at most finder.MaxRanking.
	Depth int
	// Tries is how many suggestions the "best of" view tries per topic;
	// default 5.
	Tries int
	// Groups are the access groups of the viewer every topic is run as,
	// with the topic's department; nil means open documents only. Give
	// the caller's own groups, so a report never draws on documents its
	// reader may not read.
	Groups []string
	// Trials is the number of randomization-test trials; default
	// eval.DefaultTrials.
	Trials int
	// Seed seeds the randomization test; zero is a valid fixed seed.
	Seed uint64
}

func (o Options) resolve() Options {
	if o.Depth <= 0 {
		o.Depth = 100
	}
	o.Depth = min(o.Depth, finder.MaxRanking)
	if o.Tries <= 0 {
		o.Tries = 5
	}
	return o
}

// View names.
const (
	ViewSearch = "search"   // the query as typed
	ViewFirst  = "first"    // after accepting the first suggestion
	ViewBest   = "best"     // after accepting the best of the first Tries suggestions
	Current    = "current"  // the method name of the rules in force
	Proposed   = "proposed" // the method name of the change
	maxSamples = 10         // topics whose suggestions changed, listed
)

// Report is a finished trial.
type Report struct {
	// ID identifies the stored report ("t" + 12 hex digits); set by the
	// keeper, empty before.
	ID string `json:"id"`
	// Created is when the trial ran (UTC).
	Created time.Time `json:"created"`
	// Actor is who ran it (an API token name, or "demo").
	Actor string `json:"actor"`
	// Proposal is what was tried.
	Proposal Proposal `json:"proposal"`
	// Collection names the judged set.
	Collection string `json:"collection"`
	// Topics is the number of judged topics run.
	Topics int `json:"topics"`
	// RulesInForce and RulesProposed count the rules on each side.
	RulesInForce  int `json:"rules_in_force"`
	RulesProposed int `json:"rules_proposed"`
	// Changed counts topics whose results or suggestions differ.
	Changed int `json:"changed"`
	// Views hold the two sides' measures per view (ViewSearch, ViewFirst,
	// ViewBest, in that order), each compared with the current side.
	Views []View `json:"views"`
	// Samples list up to 10 topics whose suggestions changed, in qid
	// order, with the suggestions shown as words.
	Samples []Sample `json:"samples"`
}

// View is one view's two runs (Current and Proposed).
type View struct {
	Name   string       `json:"name"`
	Report *eval.Report `json:"report"`
}

// Sample is one topic's suggestions before and after.
type Sample struct {
	QID    string   `json:"qid"`
	Query  string   `json:"query"`
	Before []string `json:"before"`
	After  []string `json:"after"`
}

// Find returns the view called name, or nil.
func (r *Report) Find(name string) *View {
	for i := range r.Views {
		if r.Views[i].Name == name {
			return &r.Views[i]
		}
	}
	return nil
}

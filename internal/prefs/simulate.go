package prefs

import (
	"fmt"
	"math/rand/v2"
	"time"
)

// CascadeOptions set the simulated searcher's relevance r(term).
type CascadeOptions struct {
	// Preferred is the accept probability of a preferred term once examined,
	// in [0,1]; default 0.7.
	Preferred float64
	// Other is the accept probability of any other term, in [0,1]; 0 means
	// default 0.05, negative means 0.
	Other float64
}

func (o CascadeOptions) withDefaults() CascadeOptions {
	if o.Preferred <= 0 {
		o.Preferred = 0.7
	}
	switch {
	case o.Other == 0:
		o.Other = 0.05
	case o.Other < 0:
		o.Other = 0
	}
	o.Preferred, o.Other = min(o.Preferred, 1), min(o.Other, 1)
	return o
}

// Relevance is r(term) under opts.
func (o CascadeOptions) Relevance(term string, preferred map[string]bool) float64 {
	o = o.withDefaults()
	if preferred[term] {
		return o.Preferred
	}
	return o.Other
}

// SimulateSession runs one searcher of the cascade model (Craswell, Zoeter,
// Taylor & Ramsey, "An experimental comparison of click position-bias
// models", WSDM 2008, §3.4): the searcher examines shown top-down, accepts
// the term at position k with probability r(term) and stops at the first
// accept; otherwise moves on to the next position with probability 1. Hence
//
//	P(accept at k) = r_k · Π_{i<k} (1 − r_i).
//
// It returns the accepted position, or -1 if none was accepted.
func SimulateSession(rng *rand.Rand, shown []string, preferred map[string]bool, opts CascadeOptions) int {
	opts = opts.withDefaults()
	for k, t := range shown {
		if rng.Float64() < opts.Relevance(t, preferred) {
			return k
		}
	}
	return -1
}

// CascadeProbabilities is the closed form of the same model: entry k is
// P(accept at k), and the last entry (index len(shown)) is P(no accept).
func CascadeProbabilities(shown []string, preferred map[string]bool, opts CascadeOptions) []float64 {
	opts = opts.withDefaults()
	out := make([]float64, len(shown)+1)
	rest := 1.0
	for k, t := range shown {
		r := opts.Relevance(t, preferred)
		out[k] = rest * r
		rest *= 1 - r
	}
	out[len(shown)] = rest
	return out
}

// SessionEvents turns one simulated session into log events: an impression
// of shown and, when acceptedPos ≥ 0, an accept of that position.
func SessionEvents(session, dept, query string, at time.Time, shown []string, acceptedPos int) []Event {
	evs := []Event{{Kind: KindImpression, Time: at, Session: session, Department: dept,
		Query: query, Shown: append([]string(nil), shown...)}}
	if acceptedPos >= 0 && acceptedPos < len(shown) {
		evs = append(evs, Event{Kind: KindAccept, Time: at, Session: session, Department: dept,
			Query: query, Term: shown[acceptedPos], Position: acceptedPos})
	}
	return evs
}

// Simulation drives learning with cascade searchers: every session is
// ranked by the current model, simulated, logged, and the model rebuilt
// every Rebuild sessions.
type Simulation struct {
	// Dept and Query are the searchers' department and canonical query.
	Dept, Query string
	// Candidates are the suggestions with their content scores.
	Candidates []Candidate
	// Preferred are the department's preferred terms.
	Preferred map[string]bool
	// Cascade sets relevance; zero value = defaults.
	Cascade CascadeOptions
	// Options configure the model.
	Options Options
	// Rebuild is how many sessions pass between snapshots; default 100.
	Rebuild int
	// Start is the first session's time; sessions are a minute apart.
	Start time.Time
}

// Run simulates n sessions from the given events and returns all events
// (prior ones first) and the final model.
func (s Simulation) Run(rng *rand.Rand, n int, events []Event) ([]Event, *Model) {
	if s.Rebuild <= 0 {
		s.Rebuild = 100
	}
	at := s.Start
	model := Build(events, at, s.Options)
	shown := make([]string, len(s.Candidates))
	for i := range n {
		if i > 0 && i%s.Rebuild == 0 {
			model = Build(events, at, s.Options)
		}
		id := fmt.Sprintf("%s-sim-%d", s.Dept, i)
		for j, r := range model.Rank(s.Dept, s.Query, s.Candidates, id) {
			shown[j] = r.Term
		}
		pos := SimulateSession(rng, shown, s.Preferred, s.Cascade)
		events = append(events, SessionEvents(id, s.Dept, s.Query, at, shown, pos)...)
		at = at.Add(time.Minute)
	}
	return events, Build(events, at, s.Options)
}

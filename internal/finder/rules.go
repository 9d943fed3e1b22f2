package finder

import (
	"strings"
	"time"

	"kinword/internal/curate"
	"kinword/internal/index"
	"kinword/internal/suggest"
)

// SetRules publishes a new compiled set of librarian rules (nil: none) and
// drops cached suggestion lists, so a rule change shows within the refresh
// interval without re-mining.
func (f *Finder) SetRules(set *curate.Set) {
	f.rules.Store(set)
	f.cache.Flush()
}

// effect is what the rules set do to a query for a department now; the
// zero Effect when there are no rules.
func effect(set *curate.Set, dept string, q []index.QueryTerm, now time.Time) curate.Effect {
	if set == nil {
		return curate.Effect{}
	}
	var stems []string
	for _, t := range q {
		stems = append(stems, strings.Fields(t.Key)...)
	}
	return set.For(dept, stems, now)
}

// withEquivalents adds the preferred terms of use rules (ANSI/NISO Z39.19
// equivalence: a search for a non-preferred term also matches the
// preferred one) to the query at the weight of its strongest term. Terms
// already in the query are left as they are.
func withEquivalents(q []index.QueryTerm, eff curate.Effect) []index.QueryTerm {
	if len(eff.Equivalents) == 0 {
		return q
	}
	top := 0.0
	have := map[string]bool{}
	for _, t := range q {
		top = max(top, t.Weight)
		have[t.Key] = true
	}
	out := append([]index.QueryTerm(nil), q...)
	for _, o := range eff.Equivalents {
		if o.Key == "" || have[o.Key] {
			continue
		}
		have[o.Key] = true
		out = append(out, index.QueryTerm{Key: o.Key, Weight: top})
	}
	return out
}

// applyRules puts the rules' offers in front of the engine's suggestions:
// pins first, then related terms, then broader and narrower refinements,
// then the engine's own list (blocked terms already excluded there), with
// repeated keys, the query's own keys, accepted terms and blocked terms
// dropped, cut to k. A rule's term is offered only when the viewer may
// read at least one document containing it, so a rule can never reveal
// a term that only restricted documents hold.
func applyRules(view *index.View, eff curate.Effect, q []index.QueryTerm, accepted []string, engine []suggest.Suggestion, k int) []suggest.Suggestion {
	if len(eff.Pins)+len(eff.Relates)+len(eff.Refinements) == 0 {
		return engine
	}
	seen := map[string]bool{}
	for _, t := range q {
		seen[t.Key] = true
	}
	for _, a := range accepted {
		seen[a] = true
	}
	out := make([]suggest.Suggestion, 0, k)
	add := func(s suggest.Suggestion) {
		if len(out) < k && !seen[s.Term] && !eff.Blocks(s.Term) {
			seen[s.Term] = true
			out = append(out, s)
		}
	}
	for _, group := range [][]curate.Offer{eff.Pins, eff.Relates, eff.Refinements} {
		for _, o := range group {
			if o.Key == "" || view.KeyDF(o.Key) == 0 {
				continue
			}
			add(suggest.Suggestion{Term: o.Key, Display: o.Display, Evidence: suggest.Evidence{
				Sources: []string{"rule:" + o.Relation}, Rule: o.RuleID, Parts: map[string]float64{},
				FeedbackDocs: 0}})
		}
	}
	for _, s := range engine {
		add(s)
	}
	return out
}

package curate

import (
	"errors"
	"fmt"
	"sort"
	"sync"
	"time"

	"kinword/internal/text"
)

// Offer is one term a rule puts forward.
type Offer struct {
	// Key is the term's stem key (text.Pipeline.Key).
	Key string
	// Display is the rule's surface Term, as the librarian wrote it.
	Display string
	// RuleID is the ID of the rule that made the offer.
	RuleID string
	// Relation is the rule's kind: "pin", "relate", "use", "broader" or
	// "narrower".
	Relation string
	// Department is the rule's department; "" for an organisation rule.
	Department string
}

// Effect is what the rules do to one query.
type Effect struct {
	// Pins are terms always offered (pin rules).
	Pins []Offer
	// Relates are related terms (relate rules).
	Relates []Offer
	// Refinements are broader and narrower terms, Relation telling which.
	Refinements []Offer
	// Equivalents are preferred terms to add to the query (use rules): a
	// search for the non-preferred term also matches these.
	Equivalents []Offer
	// Blocked maps the stem key of each blocked term to the ID of the block
	// rule that decided it; nil when nothing is blocked. Callers drop these
	// terms from every other source of suggestions too.
	Blocked map[string]string
	// Rules are the IDs of the rules that took effect, sorted.
	Rules []string
}

// Blocks reports whether the term with stem key key is blocked.
func (e Effect) Blocks(key string) bool {
	_, ok := e.Blocked[key]
	return ok
}

// Set is a compiled, immutable rule set, safe for concurrent use. Its rules
// are indexed by one stem of their query (the stem fewest rules share), so
// For looks only at rules that can fire.
type Set struct {
	rules []analysed
	org   scope
	depts map[string]*scope
}

// scope indexes the rules of one department, or of the organisation.
type scope struct {
	byStem map[string][]int32 // positions in Set.rules, ascending
	always []int32            // blocks with an empty query
}

// Compile validates rules (ValidateSet, any department accepted) and builds
// the Set. Rules without an ID get their ContentID. A nil p means an English
// pipeline. It fails, wrapping ErrInvalid or ErrContradiction, on any problem.
func Compile(rules []Rule, p *text.Pipeline) (*Set, error) {
	if p == nil {
		p = defaultPipeline()
	}
	if ps := ValidateSet(rules, nil, p); len(ps) > 0 {
		errs := make([]error, len(ps))
		for i, pr := range ps {
			errs[i] = pr
		}
		return nil, fmt.Errorf("curate: compile %d rules: %w", len(rules), errors.Join(errs...))
	}
	s := &Set{rules: make([]analysed, len(rules)), depts: make(map[string]*scope)}
	freq := make(map[string]int)
	for i, r := range rules {
		if r.ID == "" {
			r.ID = ContentID(r)
		}
		s.rules[i] = analyse(r, p)
		for _, st := range s.rules[i].qStems {
			freq[st]++
		}
	}
	for i, a := range s.rules {
		sc := &s.org
		if a.Department != "" {
			if s.depts[a.Department] == nil {
				s.depts[a.Department] = &scope{}
			}
			sc = s.depts[a.Department]
		}
		if len(a.qStems) == 0 {
			sc.always = append(sc.always, int32(i))
			continue
		}
		best := a.qStems[0]
		for _, st := range a.qStems[1:] {
			if freq[st] < freq[best] {
				best = st
			}
		}
		if sc.byStem == nil {
			sc.byStem = make(map[string][]int32)
		}
		sc.byStem[best] = append(sc.byStem[best], int32(i))
	}
	return s, nil
}

// Len returns the number of rules in the set.
func (s *Set) Len() int { return len(s.rules) }

// For returns the effect of the rules on a query with stems queryStems (from
// text.Pipeline.Terms) for a viewer of department dept ("" = no department:
// organisation rules only) at time now. Rules outside [Start, Expiry) do not
// fire.
//
// Precedence, per term stem key: when a rule of dept fired on the term, the
// department's rules decide whether it is blocked, else the organisation's:
// so a department block beats an organisation pin (or relate, use,
// refinement), and a department pin beats an organisation block. Within the
// deciding scope a block beats every other rule on the term. Offers of a term
// that is not blocked are kept from both scopes. Each list holds department
// offers first, then organisation offers, each in the order rules were given
// to Compile, one offer per key (per key and relation for Refinements).
func (s *Set) For(dept string, queryStems []string, now time.Time) Effect {
	var e Effect
	if s == nil || len(s.rules) == 0 {
		return e
	}
	qs := distinct(append([]string(nil), queryStems...))
	var fired []int32
	if d := s.depts[dept]; dept != "" && d != nil {
		fired = s.fire(d, qs, now, fired)
	}
	nDept := len(fired)
	fired = s.fire(&s.org, qs, now, fired)
	if len(fired) == 0 {
		return e
	}
	sort.Slice(fired[:nDept], func(i, j int) bool { return fired[i] < fired[j] })
	rest := fired[nDept:]
	sort.Slice(rest, func(i, j int) bool { return rest[i] < rest[j] })

	// decided[key]: 1 = the department decides, 2 = blocked.
	decided := make(map[string]uint8, len(fired))
	for n, j := range fired {
		a := &s.rules[j]
		if n < nDept {
			decided[a.tKey] |= 1
			if a.Kind == Block {
				decided[a.tKey] |= 2
			}
		} else if a.Kind == Block && decided[a.tKey]&1 == 0 {
			decided[a.tKey] |= 2
		}
	}
	ids := make([]string, 0, len(fired))
	for n, j := range fired {
		a := &s.rules[j]
		st := decided[a.tKey]
		if a.Kind == Block {
			if st&2 == 0 || (n >= nDept && st&1 != 0) {
				continue // overridden by the department
			}
			if e.Blocked == nil {
				e.Blocked = make(map[string]string)
			}
			if _, ok := e.Blocked[a.tKey]; !ok {
				e.Blocked[a.tKey] = a.ID
			}
			ids = append(ids, a.ID)
			continue
		}
		if st&2 != 0 {
			continue
		}
		o := Offer{Key: a.tKey, Display: a.Term, RuleID: a.ID, Relation: string(a.Kind), Department: a.Department}
		switch a.Kind {
		case Pin:
			e.Pins = addOffer(e.Pins, o)
		case Relate:
			e.Relates = addOffer(e.Relates, o)
		case Use:
			e.Equivalents = addOffer(e.Equivalents, o)
		case Broader, Narrower:
			e.Refinements = addOffer(e.Refinements, o)
		}
		ids = append(ids, a.ID)
	}
	e.Rules = distinct(ids)
	return e
}

// fire appends the positions of the active rules of sc whose query stems
// are all in the sorted, distinct qs.
func (s *Set) fire(sc *scope, qs []string, now time.Time, out []int32) []int32 {
	for _, j := range sc.always {
		if s.rules[j].Active(now) {
			out = append(out, j)
		}
	}
	for _, st := range qs {
		for _, j := range sc.byStem[st] {
			a := &s.rules[j]
			if a.Active(now) && subset(a.qStems, qs) {
				out = append(out, j)
			}
		}
	}
	return out
}

// addOffer appends o unless list already offers its key with its relation.
func addOffer(list []Offer, o Offer) []Offer {
	for _, x := range list {
		if x.Key == o.Key && x.Relation == o.Relation {
			return list
		}
	}
	return append(list, o)
}

var (
	defaultOnce sync.Once
	defaultP    *text.Pipeline
)

// defaultPipeline returns a shared English pipeline.
func defaultPipeline() *text.Pipeline {
	defaultOnce.Do(func() {
		p, err := text.NewPipeline(text.English)
		if err != nil {
			panic("curate: english pipeline: " + err.Error())
		}
		defaultP = p
	})
	return defaultP
}

package trial

import (
	"context"
	"errors"
	"fmt"
	"slices"
	"strings"
	"unicode/utf8"

	"kinword/internal/access"
	"kinword/internal/curate"
	"kinword/internal/eval"
	"kinword/internal/finder"
	"kinword/internal/index"
	"kinword/internal/text"
)

// Sets compiles the two sides of a trial: the rules in force, and those
// rules with the proposal applied (Remove dropped, Add added or replacing
// by ID). A proposal that names a rule not in force, or whose result does
// not compile (an invalid rule, a contradiction), is an error wrapping
// ErrInvalid.
func Sets(inForce []curate.Rule, p Proposal, pl *text.Pipeline) (current, proposed *curate.Set, err error) {
	if n := len(p.Title); n > MaxTitleBytes || !utf8.ValidString(p.Title) {
		return nil, nil, fmt.Errorf("%w: title must be valid UTF-8 of at most %d bytes", ErrInvalid, MaxTitleBytes)
	}
	if w := p.AcceptedWeight; w != nil && !(*w > 0 && *w <= 1) {
		return nil, nil, fmt.Errorf("%w: accepted_weight %g is outside (0, 1]", ErrInvalid, *w)
	}
	if len(p.Add)+len(p.Remove) > MaxRules {
		return nil, nil, fmt.Errorf("%w: at most %d rules may be added or removed", ErrInvalid, MaxRules)
	}
	if current, err = curate.Compile(inForce, pl); err != nil {
		return nil, nil, fmt.Errorf("trial: rules in force: %w", err)
	}
	ids := map[string]bool{}
	for _, r := range inForce {
		ids[r.ID] = true
	}
	drop := map[string]bool{}
	for _, id := range p.Remove {
		if !ids[id] {
			return nil, nil, fmt.Errorf("%w: rule %q is not in force", ErrInvalid, id)
		}
		drop[id] = true
	}
	for _, r := range p.Add {
		if r.ID != "" {
			drop[r.ID] = true // replaced
		}
	}
	var rules []curate.Rule
	for _, r := range inForce {
		if !drop[r.ID] {
			rules = append(rules, r)
		}
	}
	rules = append(rules, p.Add...)
	if proposed, err = curate.Compile(rules, pl); err != nil {
		return nil, nil, fmt.Errorf("%w: proposed rules: %w", ErrInvalid, err)
	}
	return current, proposed, nil
}

// side is one arm of the trial.
type side struct {
	name   string
	rules  *curate.Set
	auto   *bool
	accept float64 // accepted-term weight; 0 = as configured
}

// outcome is one topic on one side.
type outcome struct {
	search, first, best eval.Measures
	ranking             []string   // the plain search's ranking
	terms, shown        []string   // suggestion keys and displays
	accepted            [][]string // the ranking after each suggestion tried
}

// Run runs every judged topic of col on both sides and compares them. The
// current side searches with current and the configured settings; the
// proposed side with proposed and the proposal's settings. Topics without
// a relevant judgement are skipped; a topic whose query the search refuses
// (only stopwords, too long) scores 0 on both sides. ctx cancels the run.
func Run(ctx context.Context, s Searcher, col *eval.Collection, current, proposed *curate.Set, p Proposal, opts Options) (*Report, error) {
	opts = opts.resolve()
	var topics []eval.Topic
	for _, t := range col.Topics {
		if eval.NumRelevant(col.Qrels[t.ID]) > 0 {
			topics = append(topics, t)
		}
	}
	if len(topics) == 0 {
		return nil, fmt.Errorf("%w: the judged set %s has no topic with a relevant judgement", ErrInvalid, col.Name)
	}
	if len(topics) > MaxTopics {
		return nil, fmt.Errorf("%w: the judged set %s has %d judged topics; at most %d are run", ErrInvalid, col.Name, len(topics), MaxTopics)
	}
	proposedWeight := 0.0
	if p.AcceptedWeight != nil {
		proposedWeight = *p.AcceptedWeight
	}
	sides := []side{{Current, current, nil, 0}, {Proposed, proposed, p.AutoExpand, proposedWeight}}
	per := map[string]map[string]map[string]eval.Measures{} // view -> side -> qid
	for _, v := range []string{ViewSearch, ViewFirst, ViewBest} {
		per[v] = map[string]map[string]eval.Measures{Current: {}, Proposed: {}}
	}
	rep := &Report{Proposal: p, Collection: col.Name, Topics: len(topics), Samples: []Sample{},
		RulesInForce: current.Len(), RulesProposed: proposed.Len()}
	for _, t := range topics {
		var outs [2]outcome
		for i, sd := range sides {
			o, err := runTopic(ctx, s, t, col.Qrels[t.ID], sd, opts)
			if err != nil {
				return nil, fmt.Errorf("trial: topic %s (%s side): %w", t.ID, sd.name, err)
			}
			outs[i] = o
			per[ViewSearch][sd.name][t.ID] = o.search
			per[ViewFirst][sd.name][t.ID] = o.first
			per[ViewBest][sd.name][t.ID] = o.best
		}
		a, b := outs[0], outs[1]
		if !slices.Equal(a.ranking, b.ranking) || !slices.Equal(a.terms, b.terms) ||
			!slices.EqualFunc(a.accepted, b.accepted, slices.Equal) {
			rep.Changed++
			if !slices.Equal(a.terms, b.terms) && len(rep.Samples) < maxSamples {
				rep.Samples = append(rep.Samples, Sample{QID: t.ID, Query: t.Text, Before: a.shown, After: b.shown})
			}
		}
	}
	for _, v := range []string{ViewSearch, ViewFirst, ViewBest} {
		er := &eval.Report{Collection: col.Name}
		for _, sd := range sides {
			if err := er.Add(eval.NewRun(sd.name, per[v][sd.name])); err != nil {
				return nil, err
			}
		}
		if err := er.CompareAgainst(Current, eval.CompareOptions{Trials: opts.Trials, Seed: opts.Seed}); err != nil {
			return nil, err
		}
		rep.Views = append(rep.Views, View{Name: v, Report: er})
	}
	return rep, nil
}

// runTopic searches one topic on one side: the plain query, then each of
// the first Tries suggestions accepted in turn.
func runTopic(ctx context.Context, s Searcher, t eval.Topic, judged map[string]int, sd side, opts Options) (outcome, error) {
	req := finder.Request{
		Query:        t.Text,
		Viewer:       access.Viewer{Department: t.Department, Groups: opts.Groups}.Normalize(),
		Impression:   "trial-" + t.ID, // the same exploration on both sides
		Rules:        sd.rules,
		Ranking:      opts.Depth,
		AutoExpand:   sd.auto,
		AcceptWeight: sd.accept,
	}
	resp, err := s.Search(ctx, req)
	if errors.Is(err, index.ErrBadQuery) {
		m := eval.Evaluate(nil, judged) // scores 0 but counts the topic
		return outcome{search: m, first: m, best: m, terms: []string{}, shown: []string{}}, nil
	}
	if err != nil {
		return outcome{}, err
	}
	o := outcome{ranking: resp.Ranking, terms: []string{}, shown: []string{}}
	o.search = eval.Evaluate(resp.Ranking, judged)
	o.first, o.best = o.search, o.search // no suggestion: the searcher keeps the query
	for i, sg := range resp.Suggestions {
		o.terms = append(o.terms, sg.Term)
		o.shown = append(o.shown, sg.Display)
		if i >= opts.Tries {
			continue
		}
		acc := req
		acc.Accepted = []string{sg.Term}
		r, err := s.Search(ctx, acc)
		if err != nil {
			return outcome{}, err
		}
		o.accepted = append(o.accepted, r.Ranking)
		m := eval.Evaluate(r.Ranking, judged)
		if i == 0 {
			o.first, o.best = m, m
		} else if m.MAP > o.best.MAP {
			o.best = m
		}
	}
	return o, nil
}

// String is a one-line summary: the proposal's title and the change of each
// view's MAP.
func (r *Report) String() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: %d topics, %d changed", r.Proposal.Title, r.Topics, r.Changed)
	for _, v := range r.Views {
		c, p := v.Report.Find(Current), v.Report.Find(Proposed)
		if c == nil || p == nil || p.Comparison == nil {
			continue
		}
		fmt.Fprintf(&b, "; %s MAP %.4f -> %.4f (p %.3f)", v.Name, c.MAP, p.MAP, p.PValue)
	}
	return b.String()
}

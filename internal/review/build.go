package review

import (
	"iter"
	"slices"
	"time"
)

// key names a row: a term (Query "") or a pair, overall (Department "")
// or in one department.
type key struct{ dept, query, term string }

// agg accumulates one TermRow (and, for term rows, its trend).
type agg struct {
	row    TermRow
	posSum int
	trend  map[int]*Point // term rows only
}

// imp is one impression as indexed by Build.
type imp struct {
	ev     *Event
	scope  bool // reviewed (window and department)
	bucket int
	slots  []slot // one per distinct shown term, in order
}

// slot is a term shown in an impression.
type slot struct {
	term      string
	rows      [4]*agg // the rows the slot counts in: term and pair, overall and per department
	n         int     // rows used
	accept    *acceptRec
	dismissed bool
}

type acceptRec struct {
	imp     *imp
	slot    *slot
	at      time.Time
	success bool
}

// builder holds the indexes of one Build.
type builder struct {
	o       Options
	r       *Report
	rows    map[key]*agg
	imps    map[string]*imp   // by impression id, first one wins
	bySess  map[string][]*imp // every impression with a session, in time order
	accs    []*acceptRec      // in time order
	trend   map[int]*Point
	queries map[key]*qstat // by (department, query)
	props   []float64      // clipped propensity by position
}

// qstat counts one query's impressions in one department or overall.
type qstat struct{ impressions, zero, empty int }

// BuildSeq is Build over a sequence.
func BuildSeq(events iter.Seq[Event], opts Options) *Report {
	return Build(slices.Collect(events), opts)
}

// Build reviews events (in any order; they are not modified) under opts.
//
// Counting rules: every impression in the window and department counts
// once for each distinct term it showed, at the term's first position. An
// accept or dismissal counts with the impression it names, at most once
// per (impression, term). An accept is a success when a click listing the
// term among its accepted terms follows it within Window and belongs to
// the same impression, or to the same session and query (the page sends
// the refreshed impression's id with clicks made after an accept). Clicks
// without terms are not attributed.
func Build(events []Event, opts Options) *Report {
	o := opts.withDefaults()
	b := &builder{
		o:       o,
		r:       &Report{From: opts.From, To: opts.To, Department: opts.Department, Bucket: o.Bucket},
		rows:    map[key]*agg{},
		imps:    map[string]*imp{},
		bySess:  map[string][]*imp{},
		trend:   map[int]*Point{},
		queries: map[key]*qstat{},
	}
	order := make([]int, len(events))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(i, j int) int { return events[i].Time.Compare(events[j].Time) })
	b.origin(events, order)
	for _, i := range order {
		if events[i].Kind == KindImpression {
			b.impression(&events[i])
		}
	}
	for _, i := range order {
		if k := events[i].Kind; k == KindAccept || k == KindDismiss {
			b.reaction(&events[i])
		}
	}
	b.successes(events, order)
	b.finish()
	return b.r
}

// origin fixes the trend's first bucket and, widening Bucket if needed,
// keeps the trend within MaxBuckets.
func (b *builder) origin(events []Event, order []int) {
	var first, last time.Time
	found := false
	for _, i := range order {
		e := &events[i]
		if e.Kind != KindImpression || !b.o.inScope(e.Time, e.Department) {
			continue
		}
		if !found {
			first, found = e.Time, true
		}
		last = e.Time
	}
	if !found {
		return
	}
	if !b.o.To.IsZero() {
		last = b.o.To.Add(-time.Nanosecond)
	}
	for {
		origin := first.Truncate(b.o.Bucket)
		if !b.o.From.IsZero() {
			origin = b.o.From
		}
		if last.Sub(origin)/b.o.Bucket < MaxBuckets {
			b.r.Origin, b.r.Bucket = origin.UTC(), b.o.Bucket
			return
		}
		b.o.Bucket *= 2
	}
}

// prop is the clipped propensity of pos, computed once per position.
func (b *builder) prop(pos int) float64 {
	for len(b.props) <= pos {
		b.props = append(b.props, b.o.propensity(len(b.props)))
	}
	return b.props[pos]
}

func (b *builder) bucket(t time.Time) int {
	return int(t.Sub(b.r.Origin) / b.o.Bucket)
}

func (b *builder) row(k key) *agg {
	a := b.rows[k]
	if a == nil {
		a = &agg{row: TermRow{Department: k.dept, Query: k.query, Term: k.term}}
		if k.query == "" {
			a.trend = map[int]*Point{}
		}
		b.rows[k] = a
	}
	return a
}

// point returns a's trend point for bucket i (nil for pair rows).
func (a *agg) point(i int, start time.Time) *Point {
	if a.trend == nil {
		return nil
	}
	p := a.trend[i]
	if p == nil {
		p = &Point{Start: start}
		a.trend[i] = p
	}
	return p
}

func (b *builder) impression(e *Event) {
	m := &imp{ev: e, scope: b.o.inScope(e.Time, e.Department)}
	if e.Impression != "" {
		if _, dup := b.imps[e.Impression]; dup {
			return
		}
		b.imps[e.Impression] = m
	}
	if e.Session != "" {
		b.bySess[e.Session] = append(b.bySess[e.Session], m)
	}
	if !m.scope {
		return
	}
	b.r.Impressions++
	m.bucket = b.bucket(e.Time)
	start := b.r.Origin.Add(time.Duration(m.bucket) * b.o.Bucket)
	tp := b.trend[m.bucket]
	if tp == nil {
		tp = &Point{Start: start}
		b.trend[m.bucket] = tp
	}
	tp.Impressions++
	zero := e.Hits == 0
	if zero {
		tp.ZeroHits++
	}
	if len(e.Terms) == 0 {
		tp.Empty++
	}
	depts := []string{""}
	if e.Department != "" {
		depts = append(depts, e.Department)
	}
	for _, d := range depts {
		q := b.queries[key{d, e.Query, ""}]
		if q == nil {
			q = &qstat{}
			b.queries[key{d, e.Query, ""}] = q
		}
		q.impressions++
		if zero {
			q.zero++
		}
		if len(e.Terms) == 0 {
			q.empty++
		}
	}
	for pos, t := range e.Terms {
		if slices.ContainsFunc(m.slots, func(s slot) bool { return s.term == t }) {
			continue
		}
		p := b.prop(pos)
		s := slot{term: t}
		for _, d := range depts {
			s.rows[s.n] = b.row(key{d, "", t})
			s.n++
			if e.Query != "" { // an empty query has no pair rows
				s.rows[s.n] = b.row(key{d, e.Query, t})
				s.n++
			}
		}
		for _, a := range s.rows[:s.n] {
			a.row.Impressions++
			a.row.Exposure += p
			a.posSum += pos
			if pt := a.point(m.bucket, start); pt != nil {
				pt.Impressions++
				pt.Shown++
				pt.Exposure += p
				if zero {
					pt.ZeroHits++
				}
			}
		}
		tp.Shown++
		tp.Exposure += p
		m.slots = append(m.slots, s)
	}
}

// reaction counts an accept or dismissal with its impression.
func (b *builder) reaction(e *Event) {
	m := b.imps[e.Impression]
	if m == nil {
		b.r.Unmatched++
		return
	}
	if !m.scope {
		return
	}
	i := slices.IndexFunc(m.slots, func(s slot) bool { return s.term == e.Term })
	if i < 0 {
		b.r.Unmatched++
		return
	}
	s := &m.slots[i]
	tp := b.trend[m.bucket]
	switch {
	case e.Kind == KindAccept && s.accept == nil:
		s.accept = &acceptRec{imp: m, slot: s, at: e.Time}
		b.accs = append(b.accs, s.accept)
		tp.Accepts++
		for _, a := range s.rows[:s.n] {
			a.row.Accepts++
			if pt := a.point(m.bucket, time.Time{}); pt != nil {
				pt.Accepts++
			}
		}
	case e.Kind == KindDismiss && !s.dismissed:
		s.dismissed = true
		tp.Dismissals++
		for _, a := range s.rows[:s.n] {
			a.row.Dismissals++
			if pt := a.point(m.bucket, time.Time{}); pt != nil {
				pt.Dismissals++
			}
		}
	}
}

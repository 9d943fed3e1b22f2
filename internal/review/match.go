package review

import (
	"slices"
	"sort"
	"strings"
	"time"
)

// successes marks each accept that a later click credits (see Build).
func (b *builder) successes(events []Event, order []int) {
	byImp := map[[2]string]*acceptRec{}
	bySQ := map[[3]string][]*acceptRec{}
	for _, a := range b.accs {
		ev := a.imp.ev
		byImp[[2]string{ev.Impression, a.slot.term}] = a
		if ev.Session != "" {
			k := [3]string{ev.Session, ev.Query, a.slot.term}
			bySQ[k] = append(bySQ[k], a)
		}
	}
	for _, i := range order {
		c := &events[i]
		if c.Kind != KindClick || len(c.Terms) == 0 {
			continue
		}
		q := c.Query
		if m := b.imps[c.Impression]; q == "" && m != nil {
			q = m.ev.Query
		}
		for j, t := range c.Terms {
			if slices.Contains(c.Terms[:j], t) {
				continue
			}
			if a := byImp[[2]string{c.Impression, t}]; a != nil {
				b.credit(a, c.Time)
			}
			if c.Session != "" {
				for _, a := range bySQ[[3]string{c.Session, q, t}] {
					b.credit(a, c.Time)
				}
			}
		}
	}
}

// credit makes a a success if a click at t is within Window after it.
func (b *builder) credit(a *acceptRec, t time.Time) {
	if a.success || t.Before(a.at) || t.Sub(a.at) > b.o.Window {
		return
	}
	a.success = true
	b.trend[a.imp.bucket].Successes++
	for _, g := range a.slot.rows[:a.slot.n] {
		g.row.Successes++
		if pt := g.point(a.imp.bucket, time.Time{}); pt != nil {
			pt.Successes++
		}
	}
}

// rescues counts, per (department, query, term) overall and per
// department, the zero-hit impressions that accepting term rescued: a
// later impression of the same session, within Window of the accept, with
// results, for the same query or a query containing the term as a whole
// word sequence.
func (b *builder) rescues() map[key]int {
	out := map[key]int{}
	for _, a := range b.accs {
		m := a.imp
		if m.ev.Hits != 0 || m.ev.Session == "" {
			continue
		}
		list := b.bySess[m.ev.Session]
		from := sort.Search(len(list), func(i int) bool { return !list[i].ev.Time.Before(a.at) })
		for _, j := range list[from:] {
			if j.ev.Time.Sub(a.at) > b.o.Window {
				break
			}
			if j == m || j.ev.Hits <= 0 {
				continue
			}
			if j.ev.Query == m.ev.Query || containsWords(j.ev.Query, a.slot.term) {
				out[key{"", m.ev.Query, a.slot.term}]++
				if d := m.ev.Department; d != "" {
					out[key{d, m.ev.Query, a.slot.term}]++
				}
				break
			}
		}
	}
	return out
}

// containsWords reports whether the space-separated words of term occur
// consecutively in query.
func containsWords(query, term string) bool {
	if strings.TrimSpace(term) == "" {
		return false
	}
	return strings.Contains(" "+strings.Join(strings.Fields(query), " ")+" ", " "+strings.Join(strings.Fields(term), " ")+" ")
}

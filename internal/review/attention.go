package review

import (
	"cmp"
	"slices"
)

// attention fills the attention lists (see Report for what each holds).
func (b *builder) attention() {
	r := b.r
	for _, p := range r.Pairs {
		if p.Impressions < b.o.MinImpressions {
			continue
		}
		draft := RuleDraft{Kind: DraftBlock, Query: p.Query, Term: p.Term, Department: p.Department}
		if p.High < b.o.LowRate {
			r.RarelyAccepted = append(r.RarelyAccepted, Attention{Department: p.Department, Query: p.Query, Term: p.Term,
				Impressions: p.Impressions, Count: p.Accepts, Rate: p.Corrected, High: p.High, Draft: draft})
		}
		if p.DismissRate >= b.o.DismissRate {
			r.OftenDismissed = append(r.OftenDismissed, Attention{Department: p.Department, Query: p.Query, Term: p.Term,
				Impressions: p.Impressions, Count: p.Dismissals, Rate: p.DismissRate, Draft: draft})
		}
	}
	// Pairs are sorted by Department, Impressions desc, Query, Term: the
	// order RarelyAccepted wants.
	slices.SortStableFunc(r.OftenDismissed, func(x, y Attention) int {
		return cmp.Or(cmp.Compare(x.Department, y.Department), cmp.Compare(y.Rate, x.Rate))
	})

	rescued := b.rescues()
	best := map[key]Attention{} // by (department, query): the top rescuing term
	for k, n := range rescued {
		q := b.queries[key{k.dept, k.query, ""}]
		a := Attention{Department: k.dept, Query: k.query, Term: k.term, Impressions: q.zero, Count: n,
			Rate: ratio(float64(n), float64(q.zero)), Draft: RuleDraft{Kind: DraftPin, Query: k.query, Term: k.term, Department: k.dept}}
		r.Rescued = append(r.Rescued, a)
		qk := key{k.dept, k.query, ""}
		if cur, ok := best[qk]; !ok || n > cur.Count || n == cur.Count && k.term < cur.Term {
			best[qk] = a
		}
	}
	slices.SortFunc(r.Rescued, byCount)

	for k, q := range b.queries {
		if q.zero > 0 {
			r.NoResults = append(r.NoResults, Attention{Department: k.dept, Query: k.query, Impressions: q.impressions,
				Count: q.zero, Rate: ratio(float64(q.zero), float64(q.impressions)),
				Draft: RuleDraft{Kind: DraftRelate, Query: k.query, Term: best[k].Term, Department: k.dept}})
		}
		if q.empty > 0 {
			r.NoSuggestions = append(r.NoSuggestions, Attention{Department: k.dept, Query: k.query, Impressions: q.impressions,
				Count: q.empty, Rate: ratio(float64(q.empty), float64(q.impressions)),
				Draft: RuleDraft{Kind: DraftRelate, Query: k.query, Department: k.dept}})
		}
	}
	slices.SortFunc(r.NoResults, byCount)
	slices.SortFunc(r.NoSuggestions, byCount)
}

// byCount orders by Department, Count descending, Query, Term.
func byCount(x, y Attention) int {
	return cmp.Or(cmp.Compare(x.Department, y.Department), cmp.Compare(y.Count, x.Count),
		cmp.Compare(x.Query, y.Query), cmp.Compare(x.Term, y.Term))
}

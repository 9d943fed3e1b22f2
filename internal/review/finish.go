package review

import (
	"cmp"
	"slices"
	"time"
)

// finish derives rates, sorts rows and builds the attention lists.
func (b *builder) finish() {
	all := make([]*agg, 0, len(b.rows))
	for _, a := range b.rows {
		r := &a.row
		n := float64(r.Impressions)
		r.Rate = ratio(float64(r.Accepts), n)
		r.Corrected = ratio(float64(r.Accepts), r.Exposure)
		r.Low, r.High = Interval(r.Accepts, r.Impressions, r.Exposure)
		r.DismissRate = ratio(float64(r.Dismissals), n)
		r.SuccessRate = ratio(float64(r.Successes), float64(r.Accepts))
		r.MeanPos = ratio(float64(a.posSum), n)
		if a.trend != nil {
			r.Trend = sortedPoints(a.trend)
		}
		all = append(all, a)
	}
	// Department, Impressions descending, Query, Term: a total order, as
	// keys are unique.
	slices.SortFunc(all, func(x, y *agg) int {
		return cmp.Or(cmp.Compare(x.row.Department, y.row.Department), cmp.Compare(y.row.Impressions, x.row.Impressions),
			cmp.Compare(x.row.Query, y.row.Query), cmp.Compare(x.row.Term, y.row.Term))
	})
	for _, a := range all {
		if a.row.Query == "" {
			b.r.Terms = append(b.r.Terms, a.row)
		} else {
			b.r.Pairs = append(b.r.Pairs, a.row)
		}
	}
	if b.r.Impressions > 0 {
		last := 0
		for i := range b.trend {
			last = max(last, i)
		}
		if !b.o.To.IsZero() {
			last = max(last, b.bucket(b.o.To.Add(-time.Nanosecond)))
		}
		b.r.Trend = make([]Point, last+1)
		for i := range b.r.Trend {
			if p := b.trend[i]; p != nil {
				b.r.Trend[i] = *p
			} else {
				b.r.Trend[i].Start = b.r.Origin.Add(time.Duration(i) * b.o.Bucket)
			}
			rates(&b.r.Trend[i])
		}
	}
	b.attention()
}

func sortedPoints(m map[int]*Point) []Point {
	idx := make([]int, 0, len(m))
	for i := range m {
		idx = append(idx, i)
	}
	slices.Sort(idx)
	out := make([]Point, len(idx))
	for j, i := range idx {
		out[j] = *m[i]
		rates(&out[j])
	}
	return out
}

func rates(p *Point) {
	p.Rate = ratio(float64(p.Accepts), float64(p.Shown))
	p.Corrected = ratio(float64(p.Accepts), p.Exposure)
}

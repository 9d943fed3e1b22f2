package prefs

import (
	"cmp"
	"slices"
	"time"
)

// SnippetClick is a result click with the stems of the snippet the
// searcher saw on that result: implicit feedback from the text shown, not
// the whole document, so nothing the searcher did not see is learned.
type SnippetClick struct {
	Time       time.Time
	Session    string
	Department string
	Query      string   // canonical query key
	Doc        string   // the clicked document
	Rank       int      // 0-based rank of the result
	Stems      []string // distinct stems of its snippet, query stems removed
}

// TermWeight is a term with the weight of its evidence.
type TermWeight struct {
	Term   string  `json:"term"`
	Weight float64 `json:"weight"`
}

// snippetKey identifies one capped unit: a session counts a (query, term)
// once per UTC day, however many results it clicks.
type snippetKey struct {
	dept, session, query, term string
	day                        int64
}

// AddSnippet records a result click's snippet. Clicks without a query or
// stems are ignored.
func (b *Builder) AddSnippet(c SnippetClick) {
	if c.Query == "" || len(c.Stems) == 0 {
		return
	}
	b.snippets = append(b.snippets, c)
}

// snippetTable holds, per (department, query) and per query over the
// organisation, the position-corrected, decayed snippet evidence of each
// term and the number of distinct sessions behind it.
type snippetTable struct {
	dept map[[2]string][]TermWeight // (department, query)
	org  map[string][]TermWeight    // query
	dSes map[[2]string]int          // distinct sessions per (department, query)
	oSes map[string]int
}

// buildSnippets turns the clicks into the table: each capped unit weighs
// DecayWeight(age, HalfLife) / propensity(rank) (inverse propensity
// weighting, as for accepts: a result at rank k is examined with
// probability p_k; Joachims, Swaminathan & Schnabel, WSDM 2017); a
// session's unit keeps its best (lowest) rank of the day.
func buildSnippets(clicks []SnippetClick, o Options, now time.Time) snippetTable {
	best := map[snippetKey]SnippetClick{}
	for _, c := range clicks {
		day := c.Time.UTC().Unix() / 86400
		for _, t := range c.Stems {
			k := snippetKey{c.Department, c.Session, c.Query, t, day}
			if old, ok := best[k]; !ok || c.Rank < old.Rank || (c.Rank == old.Rank && c.Time.After(old.Time)) {
				best[k] = c
			}
		}
	}
	dw, ow := map[[2]string]map[string]float64{}, map[string]map[string]float64{}
	dses, oses := map[[2]string]map[string]bool{}, map[string]map[string]bool{}
	for k, c := range best {
		w := DecayWeight(now.Sub(c.Time), o.HalfLife) / o.propensity(c.Rank)
		dq := [2]string{k.dept, k.query}
		if dw[dq] == nil {
			dw[dq], dses[dq] = map[string]float64{}, map[string]bool{}
		}
		if ow[k.query] == nil {
			ow[k.query], oses[k.query] = map[string]float64{}, map[string]bool{}
		}
		dw[dq][k.term] += w
		ow[k.query][k.term] += w
		dses[dq][k.session] = true
		oses[k.query][k.dept+"\x00"+k.session] = true
	}
	t := snippetTable{dept: map[[2]string][]TermWeight{}, org: map[string][]TermWeight{},
		dSes: map[[2]string]int{}, oSes: map[string]int{}}
	for dq, m := range dw {
		t.dept[dq], t.dSes[dq] = normalised(m), len(dses[dq])
	}
	for q, m := range ow {
		t.org[q], t.oSes[q] = normalised(m), len(oses[q])
	}
	return t
}

// normalised lists m's terms by weight (ties by term), scaled so the
// strongest is 1.
func normalised(m map[string]float64) []TermWeight {
	out := make([]TermWeight, 0, len(m))
	top := 0.0
	for t, w := range m {
		out = append(out, TermWeight{t, w})
		top = max(top, w)
	}
	slices.SortFunc(out, func(a, b TermWeight) int {
		return cmp.Or(cmp.Compare(b.Weight, a.Weight), cmp.Compare(a.Term, b.Term))
	})
	for i := range out {
		out[i].Weight /= top
	}
	return out
}

// SnippetTerms returns up to k terms that the snippets of clicked results
// suggest for a query in a department, strongest first, weights in (0, 1].
// A department's own clicks are used once at least MinSessions distinct
// sessions of it clicked for the query; otherwise the organisation's, once
// MinSessions sessions across departments did; otherwise none, so a single
// session cannot steer anyone's suggestions.
func (m *Model) SnippetTerms(dept, query string, k int) []TermWeight {
	dq := [2]string{dept, query}
	var l []TermWeight
	switch {
	case m.snip.dSes[dq] >= m.opts.MinSessions:
		l = m.snip.dept[dq]
	case m.snip.oSes[query] >= m.opts.MinSessions:
		l = m.snip.org[query]
	}
	return slices.Clone(l[:min(len(l), max(k, 0))])
}

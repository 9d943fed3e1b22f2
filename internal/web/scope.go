package web

import (
	"slices"

	"kinword/internal/access"
	"kinword/internal/review"
)

// Readers says what a caller may see of the vocabulary, so that the
// librarian's and admin's desks obey the same access rule as the search
// page: no term or query that only documents the caller may not read hold.
// The finder implements it.
type Readers interface {
	// Visible reports whether viewer v may read a document holding the
	// stem or phrase key (for a query key: every word of it).
	Visible(v access.Viewer, key string) bool
	// DisplayKey is how a key reads to people (words, not stems).
	DisplayKey(key string) string
}

// scopeReport keeps the review rows whose term and query the caller may
// see, then shows them as words. Counts over all impressions (the trend)
// stay: they reveal no term.
func (s *Server) scopeReport(v access.Viewer, r *review.Report) *review.Report {
	rd := s.opts.Readers
	if rd == nil {
		return r
	}
	seen := map[string]bool{} // key -> visible, asked once per key
	ok := func(keys ...string) bool {
		for _, k := range keys {
			if k == "" {
				continue
			}
			vis, asked := seen[k]
			if !asked {
				vis = rd.Visible(v, k)
				seen[k] = vis
			}
			if !vis {
				return false
			}
		}
		return true
	}
	memo := map[string]string{}
	d := func(k string) string {
		if k == "" {
			return k
		}
		if w, seen := memo[k]; seen {
			return w
		}
		w := rd.DisplayKey(k)
		memo[k] = w
		return w
	}
	rows := func(in []review.TermRow) []review.TermRow {
		out := in[:0:0]
		for _, x := range in {
			if ok(x.Term, x.Query) {
				x.Term, x.Query = d(x.Term), d(x.Query)
				out = append(out, x)
			}
		}
		return out
	}
	att := func(in []review.Attention) []review.Attention {
		out := in[:0:0]
		for _, a := range in {
			if ok(a.Term, a.Query, a.Draft.Term, a.Draft.Query) {
				a.Term, a.Query = d(a.Term), d(a.Query)
				a.Draft.Term, a.Draft.Query = d(a.Draft.Term), d(a.Draft.Query)
				out = append(out, a)
			}
		}
		return out
	}
	c := *r
	c.Terms, c.Pairs = rows(r.Terms), rows(r.Pairs)
	c.RarelyAccepted, c.OftenDismissed = att(r.RarelyAccepted), att(r.OftenDismissed)
	c.NoResults, c.NoSuggestions, c.Rescued = att(r.NoResults), att(r.NoSuggestions), att(r.Rescued)
	return &c
}

// scopeTerms keeps the keys of a shown list the caller may see, as words;
// the second result is false when the query itself is hidden from them.
func (s *Server) scopeTerms(v access.Viewer, query string, keys []string) (string, []string, bool) {
	rd := s.opts.Readers
	if rd == nil {
		return query, keys, true
	}
	if query != "" && !rd.Visible(v, query) {
		return "", nil, false
	}
	out := make([]string, 0, len(keys))
	for _, k := range keys {
		if rd.Visible(v, k) {
			out = append(out, rd.DisplayKey(k))
		}
	}
	return rd.DisplayKey(query), slices.Clip(out), true
}

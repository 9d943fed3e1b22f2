package finder

import (
	"context"
	"fmt"
	"strings"

	"kinword/internal/index"
	"kinword/internal/prefs"
	"kinword/internal/suggest"
)

// SnippetWeight is how much snippet evidence adds to a candidate's content
// score before learning ranks the pool, as a share of the pool's best
// content score: the term the snippets of clicked results favour most
// gains 0.8 of it, so five sessions clicking the same result can bring a
// word of its snippet among the suggestions shown, while accept and
// dismiss evidence keeps the last word.
const SnippetWeight = 0.8

// SnippetStems returns the distinct stems of the snippet shown for
// document docID under a canonical query key and accepted term keys: the
// text a searcher saw before clicking, recomputed as the search page
// renders it, less the query's own stems and stopwords. An unknown
// document gives no stems and no error (it may have been deleted since).
func (f *Finder) SnippetStems(ctx context.Context, docID, queryKey string, accepted []string) ([]string, error) {
	s, err := f.acquire()
	if err != nil {
		return nil, err
	}
	defer s.release()
	view := everything(s.h.ix) // the clicker could read it
	d, ok := view.DocNum(docID)
	if !ok {
		return nil, nil
	}
	var q []index.QueryTerm
	skip := map[string]bool{}
	for _, k := range append(strings.Fields(queryKey), accepted...) {
		q = append(q, index.QueryTerm{Key: k, Weight: 1})
		for _, w := range strings.Fields(k) {
			skip[w] = true
		}
	}
	docs, err := view.Stored(ctx, s.h.ix, []uint32{d})
	if err != nil {
		return nil, fmt.Errorf("finder: snippet of %s: %w", docID, err)
	}
	if len(docs) == 0 {
		return nil, nil
	}
	p := f.p
	sn := index.MakeSnippet(p, docs[0].Body, docs[0].Language, q, f.opts.SnippetTokens)
	var out []string
	for _, s := range p.Terms(sn.Text, docs[0].Language) {
		if !skip[s] && len(s) >= 3 {
			skip[s] = true
			out = append(out, s)
		}
	}
	return out, nil
}

// withSnippets adds the learned snippet evidence of the department's
// clicks for this query to a candidate pool: a pooled term gains
// SnippetWeight·weight·(best score in the pool) on its score and the source "clicks"; a term not in
// the pool joins it with that score, if the viewer may read a document
// holding it and it is neither a query key, nor accepted, nor blocked, nor
// in more than a fifth of the viewer's documents (the suggestion engine's
// common-term bound).
func withSnippets(view *index.View, m *prefs.Model, dept, query string, q []index.QueryTerm, accepted []string,
	block func(string) bool, pool []suggest.Suggestion) []suggest.Suggestion {
	terms := m.SnippetTerms(dept, query, 10)
	if len(terms) == 0 {
		return pool
	}
	at := make(map[string]int, len(pool))
	best := 0.0
	for i, s := range pool {
		at[s.Term] = i
		best = max(best, s.Score)
	}
	if best == 0 {
		best = 1
	}
	skip := map[string]bool{}
	for _, t := range q {
		skip[t.Key] = true
	}
	for _, a := range accepted {
		skip[a] = true
	}
	for _, t := range terms {
		if i, ok := at[t.Term]; ok {
			s := &pool[i]
			s.Score += SnippetWeight * t.Weight * best
			s.Evidence.Sources = append(append([]string(nil), s.Evidence.Sources...), "clicks")
			s.Evidence.Parts = cloneParts(s.Evidence.Parts)
			s.Evidence.Parts["clicks"] = t.Weight
			continue
		}
		if skip[t.Term] || (block != nil && block(t.Term)) {
			continue
		}
		df := view.KeyDF(t.Term)
		if df == 0 || float64(df) > 0.2*float64(view.N()) {
			continue
		}
		pool = append(pool, suggest.Suggestion{Term: t.Term, Display: view.Display(t.Term), Score: SnippetWeight * t.Weight * best,
			Evidence: suggest.Evidence{Sources: []string{"clicks"}, Parts: map[string]float64{"clicks": t.Weight}}})
	}
	return pool
}

package finder

import (
	"context"
	"strconv"
	"strings"
	"time"

	"kinword/internal/access"
	"kinword/internal/curate"
	"kinword/internal/index"
	"kinword/internal/prefs"
	"kinword/internal/suggest"
)

// Result is one ranked document as a searcher sees it.
type Result struct {
	Rank       int       `json:"rank"`
	ID         string    `json:"id"`
	Title      string    `json:"title"`
	URL        string    `json:"url,omitempty"`
	Department string    `json:"department,omitempty"`
	Snippet    string    `json:"snippet"`
	Segments   []Segment `json:"segments"`
	Score      float64   `json:"score"`
}

// Segment is a run of snippet text, marked where it matched the query, so
// clients need no byte offsets.
type Segment struct {
	Text string `json:"text"`
	Mark bool   `json:"mark,omitempty"`
}

func segments(sn index.Snippet) []Segment {
	var out []Segment
	last := 0
	for _, m := range sn.Marks {
		if m.Start > last {
			out = append(out, Segment{Text: sn.Text[last:m.Start]})
		}
		out = append(out, Segment{Text: sn.Text[m.Start:m.End], Mark: true})
		last = m.End
	}
	if last < len(sn.Text) {
		out = append(out, Segment{Text: sn.Text[last:]})
	}
	return out
}

// Response answers one search.
type Response struct {
	Query       string               `json:"query"`
	Accepted    []string             `json:"accepted"`
	Total       int                  `json:"total"`
	Results     []Result             `json:"results"`
	Suggestions []suggest.Suggestion `json:"suggestions"`
	Impression  string               `json:"impression"`
	// Expanded are the terms the automatic mode added (Options.AutoExpand),
	// heaviest first; empty otherwise.
	Expanded []Expansion `json:"expanded,omitempty"`
	// Ranking lists the IDs of the top Request.Ranking results the viewer
	// may read, best first, without snippets (offline trials); nil unless
	// asked for.
	Ranking []string `json:"-"`
}

// Expansion is one term the automatic mode added to a query.
type Expansion struct {
	// Term is the stem or phrase key.
	Term string `json:"term"`
	// Display is how it reads: its commonest surface form among the
	// documents the viewer may read.
	Display string `json:"display"`
	// Weight is its weight in the expanded query, relative to the query's
	// strongest original term (1).
	Weight float64 `json:"weight"`
}

// Request is one search.
type Request struct {
	// Query is the searcher's text.
	Query string
	// Accepted are suggestion keys the searcher accepted (stems or phrase
	// keys, as returned in Suggestion.Term).
	Accepted []string
	// Viewer is who is searching.
	Viewer access.Viewer
	// WithResults false returns suggestions only (for a widget).
	WithResults bool
	// Impression, when set, is used as the impression id instead of a
	// random one (simulations, for reproducible exploration).
	Impression string
	// Useful are IDs of results the searcher marked useful: explicit
	// relevance feedback. Only documents the viewer may read count.
	Useful []string
	// Rules, when non-nil, replaces the published librarian rules for this
	// request (offline trials of a proposed change: an empty Set means no
	// rules). Its suggestion lists are neither read from nor left in the
	// cache.
	Rules *curate.Set
	// Ranking, when positive, asks for Response.Ranking: the IDs of the top
	// Ranking results (at most MaxRanking), for offline evaluation.
	Ranking int
	// AutoExpand, when non-nil, overrides Options.AutoExpand for this
	// request (offline trials of the setting).
	AutoExpand *bool
	// AcceptWeight, when positive, overrides Options.AcceptWeight for this
	// request's accepted terms (offline trials of the setting); its
	// suggestion lists are neither read from nor left in the cache.
	AcceptWeight float64
}

// MaxRanking is the deepest Request.Ranking served.
const MaxRanking = 1000

// Search runs a query for a viewer: BM25 over readable documents, the
// accepted terms added at the accepted-term weight, snippets, and
// suggestions from the viewer's own top results. Errors wrapping
// index.ErrBadQuery are the caller's fault.
func (f *Finder) Search(ctx context.Context, req Request) (Response, error) {
	if f.slots != nil {
		select {
		case f.slots <- struct{}{}:
			defer func() { <-f.slots }()
		case <-ctx.Done():
			return Response{}, ctx.Err()
		}
	}
	s, err := f.acquire()
	if err != nil {
		return Response{}, err
	}
	defer s.release() // the index stays open until this search is done
	q, err := index.ParseQuery(f.p, req.Query, f.opts.Limits)
	if err != nil {
		return Response{}, err
	}
	view := s.h.ix.View(req.Viewer)
	rules := req.Rules
	if rules == nil {
		rules = f.rules.Load()
	}
	eff := effect(rules, req.Viewer.Department, q, time.Now())
	accepted := cleanAccepted(req.Accepted)
	full := withEquivalents(q, eff)
	if len(accepted) > 0 {
		w := f.opts.AcceptWeight
		if req.AcceptWeight > 0 {
			w = req.AcceptWeight
		}
		x := suggest.Expand(toSuggest(full), accepted, w)
		full = make([]index.QueryTerm, len(x))
		for i, t := range x {
			full[i] = index.QueryTerm{Key: t.Key, Weight: t.Weight}
		}
	}
	var marked []suggest.Hit
	for _, id := range cleanAccepted(req.Useful) {
		if d, ok := view.DocNum(id); ok { // unreadable or unknown IDs are ignored
			marked = append(marked, suggest.Hit{Doc: d, Score: 1})
		}
	}
	if len(marked) > 0 {
		// Explicit feedback: the feedback model over the marked documents
		// refines the query (the same interpolation as automatic mode).
		x := s.eng.AutoExpand(view, suggest.Request{Query: toSuggest(full), Viewer: req.Viewer, Feedback: marked})
		full = make([]index.QueryTerm, len(x))
		for i, t := range x {
			full[i] = index.QueryTerm{Key: t.Key, Weight: t.Weight}
		}
	}
	depth := min(max(req.Ranking, 0), MaxRanking)
	// Suggestions read the first FeedbackDocs hits; only learning looks
	// further, for the searcher's own department's documents among the
	// FeedbackPool first. Ranking 50 rather than 10 costs about a tenth
	// more per search (BenchmarkLatency on the 100,000-document corpus).
	m := f.model.Load() // one snapshot for the whole request
	pool := f.opts.FeedbackDocs
	if m != nil {
		pool = f.opts.FeedbackPool
	}
	k := max(f.opts.Results, pool, depth)
	res, err := view.Search(ctx, full, f.opts.BM25, k)
	if err != nil {
		return Response{}, err
	}
	fbRes := res
	var expanded []Expansion
	auto := f.opts.AutoExpand
	if req.AutoExpand != nil {
		auto = *req.AutoExpand
	}
	if auto && len(accepted) == 0 && len(marked) == 0 {
		if full, expanded = autoExpand(s, view, req.Viewer, full, res); len(expanded) > 0 {
			if res, err = view.Search(ctx, full, f.opts.BM25, k); err != nil {
				return Response{}, err
			}
		}
	}
	if len(marked) > 0 {
		// Suggestions then draw on the marked documents first.
		fbRes = withMarkedFirst(res, marked)
	}
	imp := req.Impression
	if imp == "" {
		imp = newImpressionID()
	}
	out := Response{Query: req.Query, Accepted: accepted, Total: res.Total, Impression: imp,
		Results: []Result{}, Expanded: expanded}
	salt := ""
	if len(marked) > 0 {
		salt = "useful:" + strings.Join(cleanAccepted(req.Useful), ",")
	}
	cached := req.Rules == nil && req.AcceptWeight == 0 // a trial's settings must not reach live lists
	out.Suggestions = f.suggestions(s, m, view, req.Viewer, q, accepted, fbRes, out.Impression, salt, eff, len(marked), cached)
	if depth > 0 {
		out.Ranking = make([]string, 0, min(depth, len(res.Hits)))
		for _, h := range res.Hits[:min(depth, len(res.Hits))] {
			out.Ranking = append(out.Ranking, h.ID)
		}
	}
	if req.WithResults {
		hits := res.Hits
		if len(hits) > f.opts.Results {
			hits = hits[:f.opts.Results]
		}
		if out.Results, err = f.render(ctx, s.h.ix, view, full, hits); err != nil {
			return Response{}, err
		}
	}
	return out, nil
}

// suggestions offers terms from the viewer's own top results, cached per
// viewer scope, query and accepted terms; m is the learned model of the
// request (nil: none).
func (f *Finder) suggestions(s *state, m *prefs.Model, view *index.View, v access.Viewer, q []index.QueryTerm, accepted []string, res index.Result, impression, salt string, eff curate.Effect, marked int, cached bool) []suggest.Suggestion {
	cached = cached && !f.noCache
	key := strconv.FormatUint(s.seq, 10) + "\x00" + v.Key() + "\x00" + canonical(q) + "\x00" + strings.Join(accepted, "|") + "\x00" + salt
	if c, ok := f.cache.Get(key); ok && cached {
		return c.([]suggest.Suggestion)
	}
	sq := toSuggest(q)
	for _, a := range accepted { // accepted terms count as query terms: never offered again
		sq = append(sq, suggest.QueryTerm{Key: a, Weight: 0.3})
	}
	fb := feedback(res.Hits, f.opts.FeedbackDocs)
	k := f.opts.Suggestions
	if m != nil {
		k *= 6 // a wider pool, so learning can lift a term the content score ranks lower
	}
	req := suggest.Request{Query: sq, Viewer: v, Feedback: fb, K: k}
	if len(eff.Blocked) > 0 {
		req.Exclude = eff.Blocks
	}
	if m != nil {
		// The wide pool also holds the mined phrases of its 20 strongest
		// words (not 8), so learning can offer "employee assistance" where
		// content alone offers "assistance". On the demo's simulation this
		// lifted people-culture's acceptance from 0.79 to 0.88 of the
		// oracle's and health-safety-environment's from 0.80 to 0.87.
		req.StrongCandidates = 20
	}
	sugs := s.eng.Suggest(view, req)
	if m != nil && marked == 0 {
		// An ambiguous query ("leak": water mains or data) ranks another
		// department's documents first; suggestions drawn from the
		// searcher's own department's results join the pool, so learning
		// can find the department's sense (it-service-desk: 0.60 to 0.84 of
		// the oracle's acceptance on the demo's simulation).
		if dfb := departmentFeedback(view, v.Department, res.Hits, f.opts.FeedbackDocs, f.opts.DepartmentDocs); dfb != nil && !sameDocs(dfb, fb) {
			dreq := req
			dreq.Feedback = dfb
			sugs = interleave(sugs, s.eng.Suggest(view, dreq))
		}
	}
	if m != nil {
		sugs = withSnippets(view, m, v.Department, canonical(q), q, accepted, req.Exclude, sugs)
		sugs = f.learnOrder(m, v.Department, canonical(q), sugs, impression)
	}
	sugs = applyRules(view, eff, q, accepted, sugs, f.opts.Suggestions)
	if sugs == nil {
		sugs = []suggest.Suggestion{}
	}
	if cached && (f.opts.CacheEntries < 0 || f.cache.ItemCount() < f.opts.CacheEntries) {
		f.cache.SetDefault(key, sugs)
	}
	return sugs
}

// feedback is the first n hits (marked useful documents come first).
func feedback(hits []index.Hit, n int) []suggest.Hit {
	fb := make([]suggest.Hit, 0, n)
	for _, h := range hits {
		if len(fb) == n {
			break
		}
		fb = append(fb, suggest.Hit{Doc: h.Doc, Score: h.Score})
	}
	return fb
}

// departmentFeedback is up to n of the hits from department dept, in rank
// order, or nil when fewer than min are.
func departmentFeedback(view *index.View, dept string, hits []index.Hit, n, min int) []suggest.Hit {
	if dept == "" || min < 0 {
		return nil
	}
	var fb []suggest.Hit
	for _, h := range hits {
		if len(fb) == n {
			break
		}
		if view.DocDept(h.Doc) == dept {
			fb = append(fb, suggest.Hit{Doc: h.Doc, Score: h.Score})
		}
	}
	if len(fb) < max(min, 1) {
		return nil
	}
	return fb
}

func sameDocs(a, b []suggest.Hit) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i].Doc != b[i].Doc {
			return false
		}
	}
	return true
}

// interleave merges two suggestion lists, alternating, first list first,
// dropping repeated keys.
func interleave(a, b []suggest.Suggestion) []suggest.Suggestion {
	seen := make(map[string]bool, len(a)+len(b))
	out := make([]suggest.Suggestion, 0, len(a)+len(b))
	for i := 0; i < max(len(a), len(b)); i++ {
		for _, l := range [][]suggest.Suggestion{a, b} {
			if i < len(l) && !seen[l[i].Term] {
				seen[l[i].Term] = true
				out = append(out, l[i])
			}
		}
	}
	return out
}

// learnOrder re-ranks a pool of suggestions with the department's learned
// acceptance (smoothed toward the organisation-wide estimate while its own
// evidence is thin) and keeps the configured number.
func (f *Finder) learnOrder(m *prefs.Model, dept, query string, pool []suggest.Suggestion, impression string) []suggest.Suggestion {
	cands := make([]prefs.Candidate, len(pool))
	byTerm := make(map[string]suggest.Suggestion, len(pool))
	for i, s := range pool {
		cands[i] = prefs.Candidate{Term: s.Term, Content: s.Score}
		byTerm[s.Term] = s
	}
	var out []suggest.Suggestion
	for _, r := range m.Rank(dept, query, cands, impression) {
		if len(out) == f.opts.Suggestions {
			break
		}
		s := byTerm[r.Term]
		s.Evidence.Parts = cloneParts(s.Evidence.Parts)
		s.Evidence.Parts["learned"] = r.Learned
		s.Evidence.Parts["content"] = r.Content
		if src := r.Evidence.Source; src == "department" || src == "organisation" || src == "query-term" {
			s.Evidence.Sources = append(append([]string(nil), s.Evidence.Sources...), "learned:"+src)
		}
		s.Score = r.Score
		out = append(out, s)
	}
	return out
}

func cloneParts(p map[string]float64) map[string]float64 {
	out := make(map[string]float64, len(p)+2)
	for k, v := range p {
		out[k] = v
	}
	return out
}

func (f *Finder) render(ctx context.Context, ix *index.Index, view *index.View, q []index.QueryTerm, hits []index.Hit) ([]Result, error) {
	nums := make([]uint32, len(hits))
	for i, h := range hits {
		nums[i] = h.Doc
	}
	docs, err := view.Stored(ctx, ix, nums)
	if err != nil {
		return nil, err
	}
	byID := map[string]int{}
	for i, d := range docs {
		byID[d.ID] = i
	}
	out := []Result{}
	for _, h := range hits {
		i, ok := byID[h.ID]
		if !ok {
			continue
		}
		d := docs[i]
		sn := index.MakeSnippet(f.p, d.Body, d.Language, q, f.opts.SnippetTokens)
		out = append(out, Result{Rank: len(out) + 1, ID: d.ID, Title: d.Title, URL: d.URL, Department: d.Department,
			Snippet: sn.Text, Segments: segments(sn), Score: h.Score})
	}
	return out, nil
}

// cleanAccepted trims, de-duplicates and caps accepted keys.
func cleanAccepted(in []string) []string {
	seen := map[string]bool{}
	var out []string
	for _, a := range in {
		a = strings.Join(strings.Fields(a), " ")
		if a == "" || seen[a] || len(a) > 128 {
			continue
		}
		seen[a] = true
		out = append(out, a)
		if len(out) == 16 {
			break
		}
	}
	return out
}

func toSuggest(q []index.QueryTerm) []suggest.QueryTerm {
	out := make([]suggest.QueryTerm, len(q))
	for i, t := range q {
		out[i] = suggest.QueryTerm{Key: t.Key, Weight: t.Weight}
	}
	return out
}

// withMarkedFirst puts the marked documents at the head of the feedback
// list (keeping the result order for display apart: only suggestions read
// this), scored above every result.
func withMarkedFirst(res index.Result, marked []suggest.Hit) index.Result {
	top := 0.0
	if len(res.Hits) > 0 {
		top = res.Hits[0].Score
	}
	seen := map[uint32]bool{}
	out := index.Result{Total: res.Total}
	for _, m := range marked {
		seen[m.Doc] = true
		out.Hits = append(out.Hits, index.Hit{Doc: m.Doc, Score: top + 1})
	}
	for _, h := range res.Hits {
		if !seen[h.Doc] {
			out.Hits = append(out.Hits, h)
		}
	}
	return out
}

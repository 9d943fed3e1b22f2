// Package suggest is Kinword's suggestion engine: it picks the few related
// terms offered to a searcher beside the results. Candidates come from
// pseudo-relevance feedback over the viewer's own top results (a feedback
// model of internal/prf), from the mined association table (internal/assoc,
// read for the viewer only) and from mined phrases that join a candidate to
// a query word. Candidates are filtered (stopwords, the query's own terms,
// too common or too rare terms, numbers and short tokens, and the
// collection's generic words found by residual IDF), scored by a weighted
// sum of normalised parts (by default chiefly Robertson's offer weight over
// the feedback documents), and chosen for diversity by maximal marginal
// relevance. Every suggestion carries its evidence.
//
// Access control: every statistic comes from the Corpus passed in, which
// must be the viewer's own view (counts over readable documents only), the
// association table is asked with the request's viewer, and feedback
// documents the corpus says the viewer cannot read are dropped. A term of a
// document the viewer may not read therefore cannot surface.
//
// The package is pure logic. It must not import internal/index, bleve, gin
// or database drivers; its Kinword dependencies are internal/prf,
// internal/assoc, internal/access and internal/text.
package suggest

import (
	"errors"

	"kinword/internal/access"
	"kinword/internal/assoc"
	"kinword/internal/prf"
	"kinword/internal/text"
)

// Sentinel errors of New.
var (
	// ErrBadOptions reports an option value outside its documented range.
	ErrBadOptions = errors.New("suggest: bad options")
	// ErrUnknownModel reports a feedback model name other than rm3,
	// mixture or rocchio.
	ErrUnknownModel = errors.New("suggest: unknown feedback model")
)

// Corpus is the collection as one viewer sees it: every count is over the
// documents that viewer may read. The index's per-viewer View has these
// methods.
type Corpus interface {
	prf.Stats
	// TermID returns the ID of a stem, if the collection has it.
	TermID(stem string) (uint32, bool)
	// Term returns the stem of a term ID.
	Term(id uint32) string
	// CanRead reports whether the viewer may read document d.
	CanRead(d uint32) bool
	// DocLen is the length of document d in tokens.
	DocLen(d uint32) int
	// Tokens returns document d's term IDs in order (not modified) and its
	// paragraph starts (unused here).
	Tokens(d uint32) ([]uint32, []int32)
	// KeyDF is the number of readable documents containing a stem or a
	// phrase key (its words as consecutive tokens).
	KeyDF(key string) int
	// Display is the commonest surface form of a stem or phrase key among
	// readable documents, or the key itself when it has none.
	Display(key string) string
}

// QueryTerm is one weighted term of the query: a stem ("valv") or a phrase
// key of stems joined by single spaces ("main break").
type QueryTerm struct {
	Key    string  `json:"key"`
	Weight float64 `json:"weight"`
}

// Hit is one of the viewer's top results, used as pseudo-relevant feedback.
type Hit struct {
	Doc   uint32  `json:"doc"`
	Score float64 `json:"score"`
}

// Request is one suggestion request.
type Request struct {
	// Query is the searcher's query; terms of non-positive weight are
	// ignored and repeated keys are merged by adding weights.
	Query []QueryTerm
	// Viewer is who is searching; the association table is read for it.
	Viewer access.Viewer
	// Feedback is the viewer's own top results, best first. Documents the
	// Corpus reports unreadable are dropped.
	Feedback []Hit
	// K is the number of suggestions wanted; 0 means Options.K.
	K int
	// Exclude, when set, names keys never to offer (a librarian's blocks):
	// such candidates are dropped with the other filters, before scoring,
	// so the next best take their places. nil excludes nothing.
	Exclude func(key string) bool
	// MinShare, when not 0, replaces Options.MinShare for this request (a
	// negative value means 0): a caller that re-ranks a wide pool, as
	// learning does, asks for weaker candidates too.
	MinShare float64
	// StrongCandidates, when not 0, replaces Options.StrongCandidates for
	// this request (negative: 0): a wide pool for learning also holds the
	// mined phrases of more of its single-word candidates.
	StrongCandidates int
}

// Engine makes suggestions from one association table. It is immutable and
// safe for concurrent use; build a new one when the table is re-mined.
type Engine struct {
	tbl        *assoc.Table
	opt        Options
	sugg       modelSetup // the model behind suggestions (Options.Model)
	auto       modelSetup // the model of AutoExpand (Options.AutoModel)
	stop       text.Stopwords
	tableMinDF int
}

// modelSetup is a feedback model with the numbers its callers need.
type modelSetup struct {
	name     string // rm3, mixture, blend or rocchio
	model    feedbackModel
	origCoef float64 // λ (rm3, mixture, blend) or α (rocchio), see AutoExpand
	fbDocs   int     // feedback documents the model uses
}

// feedbackModel is the method the prf models share.
type feedbackModel interface {
	Expand(q []prf.QueryTerm, docs []prf.Doc, st prf.Stats) prf.Result
}

// New returns an engine over tbl (nil: no association or phrase
// candidates) with opt's defaults filled in. Errors wrap ErrBadOptions or
// ErrUnknownModel, or the prf package's ErrBadOptions.
func New(tbl *assoc.Table, opt Options) (*Engine, error) {
	o, err := opt.resolve()
	if err != nil {
		return nil, err
	}
	e := &Engine{tbl: tbl, opt: o, stop: text.StopwordsFor(o.Language)}
	if err := e.buildModel(); err != nil {
		return nil, err
	}
	if tbl != nil {
		e.tableMinDF = tbl.Info().Params.MinDF
	}
	return e, nil
}

// Options returns the engine's options with every default filled in.
func (e *Engine) Options() Options { return e.opt }

// Suggest returns up to req.K suggestions for req from the viewer's corpus
// c (the index's View for req.Viewer), in the order maximal marginal
// relevance picks them: the best-scoring first, then each trading score
// against similarity to those already picked. The output is a
// deterministic function of the inputs (ties are broken by key); it is
// empty, not nil, when nothing passes the filters.
func (e *Engine) Suggest(c Corpus, req Request) []Suggestion {
	k := req.K
	if k <= 0 {
		k = e.opt.K
	}
	r := e.prepare(c, req)
	if len(r.query) == 0 {
		return []Suggestion{}
	}
	r.feedbackCandidates(e.sugg.run(r))
	r.associationCandidates()
	r.queryPhraseCandidates()
	r.filter()
	r.strongPhraseCandidates()
	chosen := r.selectMMR(r.score(), k)
	out := make([]Suggestion, len(chosen))
	for i, cd := range chosen {
		out[i] = r.suggestion(cd)
	}
	return out
}

package suggest

import (
	"cmp"
	"math"
	"slices"
	"strings"

	"kinword/internal/assoc"
	"kinword/internal/prf"
)

// Source bits of a candidate.
const (
	srcFeedback uint8 = 1 << iota
	srcAssoc
	srcPhrase
)

// cand is one candidate term or phrase.
type cand struct {
	key   string
	words []string  // the key's stems; one for a single word
	one   [1]string // words' backing array for a single word
	id    uint32    // corpus ID of a single word
	hasID bool

	src        uint8
	fbRaw      float64  // feedback-model weight (a phrase: best of its words)
	asRaw      float64  // Σ_q w_q/Σw · LLR(q, cand)
	neighbours []string // query keys that proposed it by association or phrase
	bestLLR    float64
	bestNPMI   float64
	bestPair   string
	tblDisplay string // the table's display, if any
	dispSafe   bool   // tblDisplay comes from open text
	inTable    bool   // the viewer's scopes of the table have it

	docSet  []uint64  // feedback documents containing it (bit i: r.docs[i])
	set     [1]uint64 // docSet's backing array for up to 64 feedback documents
	ndocs   int
	haveSet bool

	display string  // chosen display, set by run.display
	phrase  float64 // phrase part
	parts   [numParts]float64
	score   float64
}

// fbDoc is one feedback document.
type fbDoc struct {
	d     uint32
	score float64
	terms []prf.TermFreq // sorted by term
	toks  []uint32
}

// run is the state of one request.
type run struct {
	e       *Engine
	c       Corpus
	req     Request
	query   []QueryTerm // merged, positive weights, input order
	qsum    float64
	qstems  map[string]bool
	docs    []fbDoc
	fbByKey map[string]float64 // feedback-model weight of each stem
	cands   map[string]*cand
	slab    []cand  // where get allocates candidates, a chunk at a time
	list    []*cand // candidates passing the filters, sorted by key
}

// candChunk is how many candidates get allocates at once, and the size
// hint of a run's maps: a request sees some tens to a hundred and more
// (the feedback model's terms, the association neighbours, phrases).
const candChunk = 32

// prepare merges the query and selects the readable feedback documents:
// the suggestion model's FeedbackDocs best by score (ties: earlier first),
// repeats dropped.
func (e *Engine) prepare(c Corpus, req Request) *run { return e.prepareFor(c, req, e.sugg.fbDocs) }

// prepareFor is prepare keeping the fbDocs best feedback documents.
func (e *Engine) prepareFor(c Corpus, req Request, fbDocs int) *run {
	r := &run{e: e, c: c, req: req, qstems: map[string]bool{}, cands: make(map[string]*cand, 2*candChunk), fbByKey: make(map[string]float64, candChunk)}
	r.query = mergeQuery(req.Query)
	for _, q := range r.query {
		r.qsum += q.Weight
		for _, w := range strings.Fields(q.Key) {
			r.qstems[w] = true
		}
	}
	seen := map[uint32]bool{}
	hits := make([]Hit, 0, len(req.Feedback))
	for _, h := range req.Feedback {
		if !seen[h.Doc] && c.CanRead(h.Doc) {
			seen[h.Doc] = true
			hits = append(hits, h)
		}
	}
	slices.SortStableFunc(hits, func(a, b Hit) int { return cmp.Compare(b.Score, a.Score) })
	if len(hits) > fbDocs {
		hits = hits[:fbDocs]
	}
	orderer, _ := c.(termOrderer)
	for _, h := range hits {
		toks, _ := c.Tokens(h.Doc)
		var order []uint16
		if orderer != nil {
			order = orderer.TermOrder(h.Doc)
		}
		r.docs = append(r.docs, fbDoc{d: h.Doc, score: h.Score, terms: prf.TermVector(toks, order), toks: toks})
	}
	return r
}

// mergeQuery normalises keys (single spaces), drops non-positive or
// non-finite weights and merges repeated keys, keeping first-seen order.
func mergeQuery(q []QueryTerm) []QueryTerm {
	var out []QueryTerm
	at := map[string]int{}
	for _, t := range q {
		key := strings.Join(strings.Fields(t.Key), " ")
		if key == "" || !(t.Weight > 0) || math.IsInf(t.Weight, 1) {
			continue
		}
		if i, ok := at[key]; ok {
			out[i].Weight += t.Weight
			continue
		}
		at[key] = len(out)
		out = append(out, QueryTerm{key, t.Weight})
	}
	return out
}

// termOrderer is a Corpus that keeps each document's token positions in
// term order (Tokens[order[0]], Tokens[order[1]], ... ascending), so that a
// feedback document's term vector needs no sort; the index keeps it. nil
// means "sort the tokens".
type termOrderer interface {
	TermOrder(d uint32) []uint16
}

// modelQuery is the query as the feedback model sees it: one entry per
// known word, a phrase's words each carrying the phrase's weight.
func (r *run) modelQuery() []prf.QueryTerm {
	var out []prf.QueryTerm
	for _, q := range r.query {
		for _, w := range strings.Fields(q.Key) {
			if id, ok := r.c.TermID(w); ok {
				out = append(out, prf.QueryTerm{ID: id, Weight: q.Weight})
			}
		}
	}
	return out
}

// run runs the feedback model over the run's feedback documents.
func (m modelSetup) run(r *run) prf.Result {
	if len(r.docs) == 0 {
		return prf.Result{}
	}
	docs := make([]prf.Doc, len(r.docs))
	for i, d := range r.docs {
		docs[i] = prf.Doc{Terms: d.terms, Len: r.c.DocLen(d.d), Score: d.score}
	}
	return m.model.Expand(r.modelQuery(), docs, r.c)
}

// get returns the candidate for key, creating it.
func (r *run) get(key string) *cand {
	if cd, ok := r.cands[key]; ok {
		return cd
	}
	if len(r.slab) == cap(r.slab) {
		r.slab = make([]cand, 0, candChunk) // earlier chunks stay where they are
	}
	r.slab = append(r.slab, cand{key: key})
	cd := &r.slab[len(r.slab)-1]
	if strings.IndexByte(key, ' ') < 0 {
		cd.one[0] = key
		cd.words = cd.one[:]
	} else {
		cd.words = strings.Fields(key)
	}
	r.cands[key] = cd
	return cd
}

// feedbackCandidates adds the feedback model's terms.
func (r *run) feedbackCandidates(res prf.Result) {
	for _, w := range res.Feedback {
		key := r.c.Term(w.ID)
		r.fbByKey[key] = w.Weight
		cd := r.get(key)
		cd.id, cd.hasID = w.ID, true
		cd.fbRaw = w.Weight
		cd.src |= srcFeedback
	}
}

// associationCandidates adds the viewer's association neighbours of every
// query term (stem or phrase) with a positive LLR.
func (r *run) associationCandidates() {
	if r.e.tbl == nil {
		return
	}
	for _, q := range r.query {
		for _, n := range r.e.tbl.Related(r.req.Viewer, q.Key, assoc.MeasureLLR, r.e.opt.NeighboursPerTerm) {
			if !(n.LLR > 0) {
				continue
			}
			cd := r.get(n.Term)
			cd.src |= srcAssoc
			cd.inTable = true
			cd.asRaw += q.Weight / r.qsum * n.LLR
			cd.addNeighbour(q.Key)
			if n.LLR > cd.bestLLR {
				cd.bestLLR, cd.bestNPMI, cd.bestPair = n.LLR, n.NPMI, q.Key
				cd.tblDisplay, cd.dispSafe = n.Display, n.Scope == assoc.OpenScope
			}
		}
	}
}

func (cd *cand) addNeighbour(q string) {
	if !slices.Contains(cd.neighbours, q) {
		cd.neighbours = append(cd.neighbours, q)
	}
}

// ratio is a/b, or 0 when b is not positive.
func ratio(a, b float64) float64 {
	if !(b > 0) {
		return 0
	}
	return a / b
}

package index

import (
	"context"
	"strings"

	"kinword/internal/rank"
)

// QueryTerm is one weighted term of a query: a stem ("pipe") or a phrase
// key of stems separated by single spaces ("main break"), matched as
// consecutive indexed tokens.
type QueryTerm struct {
	Key    string  `json:"key"`
	Weight float64 `json:"weight"`
}

// Hit is one ranked document.
type Hit struct {
	Doc   uint32  `json:"-"`
	ID    string  `json:"id"`
	Score float64 `json:"score"`
}

// Result is a ranked list and how many readable documents matched.
type Result struct {
	Hits  []Hit `json:"hits"`
	Total int   `json:"total"`
}

// accumulator holds per-document scores for one search; pooled per
// snapshot so searches do not allocate a collection-sized array each time.
type accumulator struct {
	score   []float64
	touched []uint32
}

func newAccumulator(n int) *accumulator { return &accumulator{score: make([]float64, n)} }

func (a *accumulator) reset() {
	for _, d := range a.touched {
		a.score[d] = 0
	}
	a.touched = a.touched[:0]
}

// postings returns the documents and frequencies of a query key in the
// snapshot (all documents; callers filter by view).
func (w *View) postings(key string) (docs, tfs []uint32) {
	w.s.postings()
	parts := splitKey(key)
	if len(parts) == 1 {
		id, ok := w.s.termID[parts[0]]
		if !ok {
			return nil, nil
		}
		o, e := w.s.off[id], w.s.off[id+1]
		return w.s.pdocs[o:e], w.s.ptf[o:e]
	}
	return w.phrasePostings(parts)
}

// KeyDF returns the readable document frequency of a stem or phrase key.
func (w *View) KeyDF(key string) int {
	parts := splitKey(key)
	switch len(parts) {
	case 0:
		return 0
	case 1:
		id, ok := w.s.termID[parts[0]]
		if !ok {
			return 0
		}
		return w.DF(id)
	}
	n := 0
	d := w.phraseClassDF(parts) // builds the postings on first use
	for _, c := range w.sc.classes {
		n += int(d[c])
	}
	return n
}

// Search ranks the viewer's readable documents by BM25 (the textbook sum
// over query terms of weight x idf x tf part, statistics from the viewer's
// scope only) and returns the top k with the count of matching documents.
func (w *View) Search(ctx context.Context, q []QueryTerm, p rank.BM25, k int) (Result, error) {
	p = p.Resolve()
	s := w.s
	acc := s.accs.Get().(*accumulator)
	defer func() { acc.reset(); s.accs.Put(acc) }()
	N := float64(w.sc.n)
	avgdl := w.AvgDL()
	for qi, qt := range q {
		if qi%8 == 7 {
			if err := ctx.Err(); err != nil {
				return Result{}, err
			}
		}
		docs, tfs := w.postings(qt.Key)
		n := 0
		for _, d := range docs {
			if w.sc.visible[s.docClass[d]] {
				n++
			}
		}
		if n == 0 || qt.Weight == 0 {
			continue
		}
		idf := rank.IDF(N, float64(n))
		for i, d := range docs {
			if !w.sc.visible[s.docClass[d]] {
				continue
			}
			if acc.score[d] == 0 {
				acc.touched = append(acc.touched, d)
			}
			acc.score[d] += qt.Weight * idf * p.TF(float64(tfs[i]), float64(s.docLen[d]), avgdl)
			if acc.score[d] == 0 { // keep touched unique even if a weight cancels
				acc.score[d] = 1e-300
			}
		}
	}
	top := rank.NewTopK(k)
	for _, d := range acc.touched {
		top.Push(rank.Scored{Doc: d, Score: acc.score[d]})
	}
	res := Result{Total: len(acc.touched)}
	for _, sd := range top.Sorted() {
		res.Hits = append(res.Hits, Hit{Doc: sd.Doc, ID: s.docs[sd.Doc].ID, Score: sd.Score})
	}
	return res, nil
}

func splitKey(key string) []string {
	if strings.IndexByte(key, ' ') < 0 {
		return []string{key}
	}
	return strings.Fields(key)
}

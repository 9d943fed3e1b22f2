package prf

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// arrayStats are Zipf-shaped statistics over a dense vocabulary.
type arrayStats struct {
	n     int
	total int64
	df    []int
	cf    []int64
}

func (s *arrayStats) N() int             { return s.n }
func (s *arrayStats) TotalLen() int64    { return s.total }
func (s *arrayStats) AvgDL() float64     { return float64(s.total) / float64(s.n) }
func (s *arrayStats) DF(id uint32) int   { return s.df[id] }
func (s *arrayStats) CF(id uint32) int64 { return s.cf[id] }

// benchInput is a 50,000-term vocabulary with collection frequency ∝ 1/rank
// over 20,000 documents, a 3-term query and 10 feedback documents of 200
// distinct terms each (fixed seed).
func benchInput() ([]QueryTerm, []Doc, *arrayStats) {
	const vocab, nDocs, perDoc = 50000, 20000, 200
	st := &arrayStats{n: nDocs, df: make([]int, vocab), cf: make([]int64, vocab)}
	for i := range vocab {
		st.cf[i] = 1 + int64(2_000_000/(i+1))
		st.df[i] = int(min(st.cf[i], nDocs))
		st.total += st.cf[i]
	}
	r := rand.New(rand.NewPCG(42, 42))
	docs := make([]Doc, 10)
	for d := range docs {
		seen := map[uint32]bool{}
		for len(docs[d].Terms) < perDoc {
			u := r.Float64()
			id := uint32(u * u * u * vocab)
			if !seen[id] {
				seen[id] = true
				tf := 1 + r.IntN(4)
				docs[d].Terms = append(docs[d].Terms, TermFreq{id, tf})
				docs[d].Len += tf
			}
		}
		slices.SortFunc(docs[d].Terms, func(a, b TermFreq) int { return int(a.Term) - int(b.Term) })
		docs[d].Score = float64(10 - d)
	}
	q := []QueryTerm{{docs[0].Terms[3].Term, 1}, {docs[1].Terms[10].Term, 1}, {docs[2].Terms[50].Term, 1}}
	return q, docs, st
}

func benchModel(b *testing.B, m expander) {
	q, docs, st := benchInput()
	b.ReportAllocs()
	var res Result
	for b.Loop() {
		res = m.Expand(q, docs, st)
	}
	b.ReportMetric(float64(res.Iterations), "em-iters")
}

func BenchmarkRM3(b *testing.B)     { benchModel(b, must(NewRM3(RM3Options{}))) }
func BenchmarkMixture(b *testing.B) { benchModel(b, must(NewMixture(MixtureOptions{}))) }
func BenchmarkBlend(b *testing.B)   { benchModel(b, must(NewBlend(BlendOptions{}))) }
func BenchmarkRocchio(b *testing.B) { benchModel(b, must(NewRocchio(RocchioOptions{}))) }

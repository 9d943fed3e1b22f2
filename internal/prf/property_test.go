package prf

import (
	"errors"
	"math"
	"reflect"
	"testing"

	"kinword/internal/rank"
)

type expander interface {
	Expand(q []QueryTerm, docs []Doc, st Stats) Result
}

// models returns one instance of each model with default options and
// whether its outputs are probability distributions.
func models() []struct {
	name  string
	m     expander
	distr bool
} {
	return []struct {
		name  string
		m     expander
		distr bool
	}{
		{"rm3", must(NewRM3(RM3Options{})), true},
		{"mixture", must(NewMixture(MixtureOptions{})), true},
		{"blend", must(NewBlend(BlendOptions{})), true},
		{"rocchio", must(NewRocchio(RocchioOptions{})), false},
	}
}

// TestProperties checks, on random collections with fixed seeds, what
// every model promises: sorted distinct positive weights, at most
// FeedbackTerms feedback terms, distributions summing to 1 (a property of
// the models' definitions), and the same output for the same input.
func TestProperties(t *testing.T) {
	for _, md := range models() {
		t.Run(md.name, func(t *testing.T) {
			for seed := uint64(1); seed <= 20; seed++ {
				all, st := randomCollection(seed, 50, 2000, 200)
				docs := all[:15] // more than FeedbackDocs
				q := []QueryTerm{{uint32(seed), 1}, {uint32(seed * 3), 2}, {uint32(seed * 7), 0.5}}
				res := md.m.Expand(q, docs, st)
				checkSorted(t, "feedback", res.Feedback)
				checkSorted(t, "query", res.Query)
				limit := DefaultFeedbackTerms
				if md.name == "blend" {
					limit *= 3 // each of the three parts keeps FeedbackTerms
				}
				if len(res.Feedback) == 0 || len(res.Feedback) > limit {
					t.Errorf("seed %d: %d feedback terms", seed, len(res.Feedback))
				}
				if md.distr {
					for _, s := range []float64{sum(res.Feedback), sum(res.Query)} {
						if math.Abs(s-1) > 1e-12 {
							t.Errorf("seed %d: sums to %v", seed, s)
						}
					}
				}
				if again := md.m.Expand(q, docs, st); !reflect.DeepEqual(again, res) {
					t.Errorf("seed %d: second run differs", seed)
				}
			}
		})
	}
}

// TestEmptyFeedback: without usable feedback documents every model returns
// the original query (RM3 and Mixture as the distribution P(t|Q), Rocchio
// as α·q with α 1), repeated terms merged and unusable weights dropped.
func TestEmptyFeedback(t *testing.T) {
	q := []QueryTerm{{7, 1}, {3, 2}, {7, 1}, {9, 0}, {5, math.NaN()}, {4, -1}}
	empties := map[string][]Doc{
		"nil":      nil,
		"no terms": {{Len: 5, Score: 1}},
		"zero tf":  {{Terms: []TermFreq{{1, 0}}, Score: 1}},
	}
	for _, md := range models() {
		want := []Weighted{{3, 2}, {7, 2}}
		if md.distr {
			want = []Weighted{{3, 0.5}, {7, 0.5}}
		}
		for name, docs := range empties {
			t.Run(md.name+"/"+name, func(t *testing.T) {
				res := md.m.Expand(q, docs, nil)
				if res.Feedback != nil {
					t.Errorf("feedback %v", res.Feedback)
				}
				checkWeights(t, "query", res.Query, want, 0)
			})
		}
	}
}

// TestUncleanTermLists: unsorted term lists with repeats and non-positive
// entries give the same result as the clean list.
func TestUncleanTermLists(t *testing.T) {
	docs, st := tiny()
	messy := make([]Doc, len(docs))
	for i, d := range docs {
		messy[i] = d
		messy[i].Terms = nil
		for j := len(d.Terms) - 1; j >= 0; j-- {
			tf := d.Terms[j]
			messy[i].Terms = append(messy[i].Terms, TermFreq{tf.Term, 1}, TermFreq{99, 0})
			if tf.TF > 1 {
				messy[i].Terms = append(messy[i].Terms, TermFreq{tf.Term, tf.TF - 1})
			}
		}
	}
	q := []QueryTerm{{pump, 1}, {leak, 1}}
	for _, md := range models() {
		t.Run(md.name, func(t *testing.T) {
			want := md.m.Expand(q, docs, st)
			got := md.m.Expand(q, messy, st)
			checkWeights(t, "feedback", got.Feedback, want.Feedback, 1e-15)
			checkWeights(t, "query", got.Query, want.Query, 1e-15)
		})
	}
}

func TestBadOptions(t *testing.T) {
	cases := []struct {
		name string
		err  error
	}{
		{"rm3 negative FeedbackDocs", second(NewRM3(RM3Options{FeedbackDocs: -1}))},
		{"rm3 negative FeedbackTerms", second(NewRM3(RM3Options{FeedbackTerms: -1}))},
		{"rm3 OrigWeight above 1", second(NewRM3(RM3Options{OrigWeight: 1.5}))},
		{"rm3 OrigWeight NaN", second(NewRM3(RM3Options{OrigWeight: math.NaN()}))},
		{"rm3 negative Mu", second(NewRM3(RM3Options{Mu: -1}))},
		{"rm3 infinite Mu", second(NewRM3(RM3Options{Mu: math.Inf(1)}))},
		{"mixture Background 1", second(NewMixture(MixtureOptions{Background: 1}))},
		{"mixture OrigWeight above 1", second(NewMixture(MixtureOptions{OrigWeight: 2}))},
		{"mixture negative Tolerance", second(NewMixture(MixtureOptions{Tolerance: -1e-9}))},
		{"mixture negative MaxIterations", second(NewMixture(MixtureOptions{MaxIterations: -1}))},
		{"mixture negative FeedbackDocs", second(NewMixture(MixtureOptions{FeedbackDocs: -3}))},
		{"rocchio infinite Beta", second(NewRocchio(RocchioOptions{Beta: math.Inf(1)}))},
		{"rocchio NaN Alpha", second(NewRocchio(RocchioOptions{Alpha: math.NaN()}))},
		{"rocchio BM25 B above 1", second(NewRocchio(RocchioOptions{BM25: rank.BM25{B: 2}}))},
		{"rocchio negative FeedbackTerms", second(NewRocchio(RocchioOptions{FeedbackTerms: -1}))},
		{"rm3 unknown DocWeights", second(NewRM3(RM3Options{DocWeights: "scores"}))},
		{"blend RM3Share above 1", second(NewBlend(BlendOptions{RM3Share: 1.5}))},
		{"blend RocchioShare above 1", second(NewBlend(BlendOptions{RocchioShare: 1.5}))},
		{"blend RocchioShare NaN", second(NewBlend(BlendOptions{RocchioShare: math.NaN()}))},
		{"blend OrigWeight NaN", second(NewBlend(BlendOptions{OrigWeight: math.NaN()}))},
		{"blend Background 1", second(NewBlend(BlendOptions{Background: 1}))},
		{"blend negative Mu", second(NewBlend(BlendOptions{Mu: -5}))},
		{"blend negative FeedbackDocs", second(NewBlend(BlendOptions{FeedbackDocs: -1}))},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if !errors.Is(c.err, ErrBadOptions) {
				t.Errorf("got %v, want ErrBadOptions", c.err)
			}
		})
	}
	for name, err := range map[string]error{
		"rm3":     second(NewRM3(RM3Options{OrigWeight: 1, Mu: 3})),
		"mixture": second(NewMixture(MixtureOptions{Background: 0.99, Tolerance: 1})),
		"rocchio": second(NewRocchio(RocchioOptions{Alpha: -1, Gamma: 2})),
		"blend":   second(NewBlend(BlendOptions{RM3Share: 1, OrigWeight: 1, DocWeights: DocWeightsGeometric})),
	} {
		if err != nil {
			t.Errorf("%s: valid options rejected: %v", name, err)
		}
	}
}

func second[T any](_ T, err error) error { return err }

// FuzzExpand feeds arbitrary documents (unsorted, repeated, zero and
// negative frequencies, odd lengths and scores) to every model: none may
// panic, and the outputs keep their invariants.
func FuzzExpand(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9}, uint8(3))
	f.Add([]byte{0, 0, 0, 255, 255, 1}, uint8(0))
	f.Fuzz(func(t *testing.T, data []byte, ndocs uint8) {
		docs := make([]Doc, int(ndocs%12)+1)
		for i, b := range data {
			d := &docs[i%len(docs)]
			d.Terms = append(d.Terms, TermFreq{uint32(b % 16), int(b/16) - 3})
			d.Len += int(b%5) - 1
			d.Score += float64(b%7) - 3
		}
		st := statsOf(docs)
		q := []QueryTerm{{1, 1}, {uint32(len(data) % 16), 2}}
		for _, md := range models() {
			res := md.m.Expand(q, docs, st)
			checkSorted(t, md.name+" feedback", res.Feedback)
			checkSorted(t, md.name+" query", res.Query)
			if md.distr && math.Abs(sum(res.Query)-1) > 1e-9 {
				t.Errorf("%s: query sums to %v", md.name, sum(res.Query))
			}
		}
	})
}

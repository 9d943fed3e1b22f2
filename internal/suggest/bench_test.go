package suggest

import (
	"math/rand/v2"
	"strings"
	"sync"
	"testing"

	"kinword/internal/access"
	"kinword/internal/assoc"
)

// letterWord spells k in base 26 after a "q" ("qaab"), so that no filler
// word is a number or short.
func letterWord(k int) string {
	b := []byte{'q', 0, 0, 0}
	for i := 3; i > 0; i-- {
		b[i] = byte('a' + k%26)
		k /= 26
	}
	return string(b)
}

var benchOpts = Options{}

type benchSet struct {
	f   *fakeCorpus
	tbl *assoc.Table
}

var (
	benchOnce sync.Once
	bench     benchSet
)

// benchCorpus is 3,000 documents of 200 tokens: background words from a
// Zipf law (s = 1.1) over 9,000 words, an eighth of the tokens from the
// document's topic (60 topics of 20 words). Fixed seed. Its table has
// about 10k terms.
func benchCorpus(b *testing.B) benchSet {
	benchOnce.Do(func() {
		r := rand.New(rand.NewPCG(3, 4))
		z := rand.NewZipf(rand.New(rand.NewPCG(3, 5)), 1.1, 8, 26*26*26-1)
		f := newFakeCorpus()
		words := make([]string, 200)
		for d := range 3000 {
			topic := d % 60
			for i := range words {
				if r.IntN(8) == 0 {
					words[i] = letterWord(16000 + topic*20 + r.IntN(20))
				} else {
					words[i] = letterWord(int(z.Uint64()) % 9000)
				}
			}
			f.add(nil, strings.Join(words, " "))
		}
		bench = benchSet{f: f, tbl: f.table(b)}
	})
	return bench
}

// BenchmarkSuggest is one suggestion request as a search makes it: 10
// feedback documents of 200 tokens, a one-word query, the default RM3
// model and a table of about 10k terms.
func BenchmarkSuggest(b *testing.B) {
	bs := benchCorpus(b)
	v := bs.f.view(access.Anonymous)
	e, err := New(bs.tbl, benchOpts)
	if err != nil {
		b.Fatal(err)
	}
	q := letterWord(16000 + 5*20 + 3)
	req := Request{Query: []QueryTerm{{key(q), 1}}, Feedback: v.rank(q, 10)}
	if len(e.Suggest(v, req)) == 0 {
		b.Fatal("no suggestions")
	}
	terms := bs.tbl.Info().Terms
	b.ReportAllocs()
	for b.Loop() {
		e.Suggest(v, req)
	}
	b.ReportMetric(float64(terms), "table-terms")
}

// BenchmarkAutoExpand is the automatic mode on the same request.
func BenchmarkAutoExpand(b *testing.B) {
	bs := benchCorpus(b)
	v := bs.f.view(access.Anonymous)
	e, _ := New(bs.tbl, Options{})
	q := letterWord(16000 + 5*20 + 3)
	req := Request{Query: []QueryTerm{{key(q), 1}}, Feedback: v.rank(q, 10)}
	b.ReportAllocs()
	for b.Loop() {
		e.AutoExpand(v, req)
	}
}

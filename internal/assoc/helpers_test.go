package assoc

import (
	"fmt"
	"math/rand/v2"
	"strings"
)

// fakeStem is a tiny stand-in for the Snowball stemmer: it strips a plural
// "s" ("pumps" -> "pump") so that Display differs from the stem.
func fakeStem(w string) string {
	if len(w) > 3 && strings.HasSuffix(w, "s") && !strings.HasSuffix(w, "ss") {
		return w[:len(w)-1]
	}
	return w
}

// synthDoc is the recipe of one generated document.
type synthSpec struct {
	docs   int
	vocab  int     // distinct background words
	topics int     // topics, each with its own small word set
	paraLo int     // paragraph length range, tokens
	paraHi int     //
	paras  int     // max paragraphs per document
	seed   uint64  //
	zipfS  float64 // Zipf exponent (> 1)
	groups func(i int) []string
}

// synthCorpus generates a deterministic corpus: background words drawn from
// a Zipf law, mixed with topic words so that real associations exist.
func synthCorpus(s synthSpec) *MemCorpus {
	r := rand.New(rand.NewPCG(s.seed, 0x5eed))
	z := rand.NewZipf(rand.New(rand.NewPCG(s.seed, 1)), s.zipfS, 1, uint64(s.vocab-1))
	c := NewMemCorpus(fakeStem)
	for i := 0; i < s.docs; i++ {
		topic := r.IntN(s.topics)
		np := 1 + r.IntN(s.paras)
		paras := make([][]string, np)
		for p := range paras {
			n := s.paraLo + r.IntN(s.paraHi-s.paraLo+1)
			words := make([]string, n)
			for k := range words {
				if r.IntN(3) == 0 {
					words[k] = fmt.Sprintf("topic%02dword%02d", topic, r.IntN(12))
				} else {
					words[k] = fmt.Sprintf("w%05d", z.Uint64())
				}
			}
			paras[p] = words
		}
		var g []string
		if s.groups != nil {
			g = s.groups(i)
		}
		c.AddDoc(g, paras...)
	}
	return c
}

func smallSpec() synthSpec {
	return synthSpec{docs: 300, vocab: 400, topics: 6, paraLo: 5, paraHi: 40, paras: 4, seed: 7, zipfS: 1.2}
}

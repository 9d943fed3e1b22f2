package index

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"

	"kinword/internal/access"
	"kinword/internal/doc"
)

// TestPhrasePostingsMatchScan checks the intersect-then-scan phrase
// postings, cached and uncached, against the plain definition (count the
// consecutive runs in every document's tokens), on random documents over a
// small vocabulary so that words repeat and overlap ("pipe pipe pipe"
// holds "pipe pipe" twice). Common practice: a property test against a
// naive reference.
func TestPhrasePostingsMatchScan(t *testing.T) {
	words := []string{"pipe", "main", "break", "valve", "street", "crew", "meter", "flush"}
	rng := rand.New(rand.NewPCG(3, 5))
	var docs []doc.Document
	for i := range 300 {
		var b strings.Builder
		for range 5 + rng.IntN(40) {
			b.WriteString(words[rng.IntN(len(words))] + " ")
		}
		docs = append(docs, doc.Document{ID: fmt.Sprintf("d%03d", i), Title: "t", Body: b.String()})
	}
	ix := openTest(t, docs)
	v := ix.View(access.Anonymous)
	p := ix.Pipeline()
	var phrases [][]string
	for range 60 {
		n := 2 + rng.IntN(2)
		var ph []string
		for range n {
			ph = append(ph, p.Stem(words[rng.IntN(len(words))], ""))
		}
		phrases = append(phrases, ph)
	}
	naive := func(parts []string) map[uint32]uint32 {
		ids := make([]uint32, len(parts))
		for i, w := range parts {
			ids[i], _ = v.TermID(w)
		}
		out := map[uint32]uint32{}
		for d := range uint32(v.NumDocs()) {
			toks, _ := v.Tokens(d)
			if n := countRun(toks, ids); n > 0 {
				out[d] = n
			}
		}
		return out
	}
	var wg sync.WaitGroup
	for round := range 3 { // the second and third rounds hit the cache, concurrently
		for _, ph := range phrases {
			wg.Add(1)
			go func() {
				defer wg.Done()
				docs, tfs := v.phrasePostings(ph)
				want := naive(ph)
				if len(docs) != len(want) {
					t.Errorf("round %d %q: %d documents, want %d", round, ph, len(docs), len(want))
					return
				}
				for i, d := range docs {
					if want[d] != tfs[i] || (i > 0 && docs[i-1] >= d) {
						t.Errorf("round %d %q: doc %d tf %d, want %d (ascending)", round, ph, d, tfs[i], want[d])
					}
				}
			}()
		}
		wg.Wait()
	}
}

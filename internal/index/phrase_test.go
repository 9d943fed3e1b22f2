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
	ix := openTest(t, randomDocs(rng, words, 300, 5, 40, nil))
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

// TestKeyDFPerViewer checks KeyDF, whose phrase counts are kept per
// document class, against the plain definition (readable documents holding
// the word or the consecutive run) for viewers of different groups, before
// and after the phrase postings are cached. Common practice: a property
// test against a naive reference.
func TestKeyDFPerViewer(t *testing.T) {
	words := []string{"pipe", "main", "break", "valve", "street"}
	groups := [][]string{nil, {"finance"}, {"legal"}, {"finance", "legal"}}
	rng := rand.New(rand.NewPCG(9, 2))
	ix := openTest(t, randomDocs(rng, words, 200, 3, 20, groups))
	p := ix.Pipeline()
	viewers := []access.Viewer{access.Anonymous, {Groups: []string{"finance"}}, {Groups: []string{"legal", "finance"}}}
	keys := []string{"", p.Key("pipe", ""), p.Key("main break", ""), p.Key("break main", ""), p.Key("pipe pipe", ""), p.Key("valve street main", ""), "unknownword", "unknownword pipe"}
	for round := range 2 {
		for _, v := range viewers {
			w := ix.View(v)
			for _, key := range keys {
				parts := strings.Fields(key)
				ids := make([]uint32, len(parts))
				known := true
				for i, s := range parts {
					var ok bool
					if ids[i], ok = w.TermID(s); !ok {
						known = false
					}
				}
				want := 0
				for d := range uint32(w.NumDocs()) {
					if !known || len(ids) == 0 || !w.CanRead(d) {
						continue
					}
					toks, _ := w.Tokens(d)
					if countRun(toks, ids) > 0 {
						want++
					}
				}
				if got := w.KeyDF(key); got != want {
					t.Errorf("round %d, groups %v, %q: KeyDF %d, want %d", round, v.Groups, key, got, want)
				}
			}
		}
	}
}

// randomDocs makes n documents of min to min+spread-1 words drawn from
// words, each readable by one of groups drawn at random (nil: all open).
func randomDocs(rng *rand.Rand, words []string, n, min, spread int, groups [][]string) []doc.Document {
	var docs []doc.Document
	for i := range n {
		var b strings.Builder
		for range min + rng.IntN(spread) {
			b.WriteString(words[rng.IntN(len(words))] + " ")
		}
		d := doc.Document{ID: fmt.Sprintf("d%03d", i), Title: "t", Body: b.String()}
		if groups != nil {
			d.Groups = groups[rng.IntN(len(groups))]
		}
		docs = append(docs, d)
	}
	return docs
}

package assoc

import (
	"context"
	"testing"
)

// gapCorpus marks a removed word before every token at offset 1 of each
// document, as the index does for "subjected to aerodynamic".
type gapCorpus struct{ *MemCorpus }

func (g gapCorpus) Doc(i int) DocTerms {
	d := g.MemCorpus.Doc(i)
	d.Gaps = []int32{1}
	return d
}

// TestPhrasesNeverSpanRemovedWords: adjacency after stopword removal is not
// adjacency in the text (common practice in collocation extraction, which
// counts only truly adjacent words).
func TestPhrasesNeverSpanRemovedWords(t *testing.T) {
	mc := NewMemCorpus(nil)
	for i := 0; i < 12; i++ {
		mc.AddDoc(nil, []string{"subject", "aerodynam", "heat", "filler"})
	}
	tbl, err := Mine(context.Background(), gapCorpus{mc}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	keys := map[string]bool{}
	for _, p := range tbl.Phrases() {
		keys[p.Key] = true
	}
	if keys["subject aerodynam"] || keys["subject aerodynam heat"] {
		t.Errorf("phrase spans a removed word: %v", keys)
	}
	if !keys["aerodynam heat"] && !keys["aerodynam heat filler"] {
		t.Errorf("adjacent phrase missing: %v", keys)
	}
}

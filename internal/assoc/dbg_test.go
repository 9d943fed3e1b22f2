package assoc

import (
	"context"
	"testing"
)

func TestDbg(t *testing.T) {
	tb, _ := Mine(context.Background(), scopedCorpus(true), Options{MinPhraseCount: 3})
	t.Logf("%+v", tb.Info())
	for i := range uint32(tb.numTerms()) {
		t.Logf("%d %q %v", i, tb.term(i), []uint32{tb.scopes[0].df[i], tb.scopes[1].df[i], tb.scopes[2].df[i]})
	}
}

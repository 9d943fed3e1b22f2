package assoc

import (
	"context"
	"reflect"
	"testing"

	"kinword/internal/access"
)

// TestPhrasesWith: the phrases containing a stem, per viewer, most
// documents first; cached results are per visible scope set and callers
// may modify what they get.
func TestPhrasesWith(t *testing.T) {
	tb, err := Mine(context.Background(), scopedCorpus(true), Options{MinPhraseCount: 3})
	if err != nil {
		t.Fatal(err)
	}
	insider := access.Viewer{Groups: []string{"hr"}}
	cases := []struct {
		name string
		v    access.Viewer
		stem string
		want []string // phrase keys, in order
	}{
		{"insider sees the group phrase", insider, "merger", []string{"merger plan"}},
		{"anonymous does not", access.Anonymous, "merger", nil},
		{"other group does not", access.Viewer{Groups: []string{"ops"}}, "plan", nil},
		{"unknown stem", insider, "nosuchstem", nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			for round := range 2 { // second round is served from the cache
				got := tb.PhrasesWith(tc.v, tc.stem)
				var keys []string
				for _, p := range got {
					keys = append(keys, p.Key)
				}
				if !reflect.DeepEqual(keys, tc.want) {
					t.Fatalf("round %d: %q, want %q", round, keys, tc.want)
				}
				for i := range got { // must not corrupt the cache
					got[i].Key = "changed"
					got[i].Scopes[0] = "changed"
				}
			}
		})
	}
	got := tb.PhrasesWith(insider, "merger")
	if len(got) != 1 || got[0].Docs != 7 || !reflect.DeepEqual(got[0].Scopes, []string{"hr"}) {
		t.Errorf("merger plan = %+v, want 7 documents in scope hr", got)
	}
}

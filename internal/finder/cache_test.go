package finder

import (
	"context"
	"fmt"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"kinword/internal/doc"
	"kinword/internal/suggest"
	"kinword/internal/text"
)

// TestCacheEntriesBound: the suggestion cache stops storing at
// CacheEntries lists (further queries are computed, answered alike and not
// kept), keeps serving the lists it holds, and a negative bound lifts it.
func TestCacheEntriesBound(t *testing.T) {
	p, _ := text.NewPipeline("")
	ctx := context.Background()
	queries := []string{"kakakan", "kalokan", "lokalon", "lolomin", "mikamin", "nukanun"}
	cases := []struct {
		name    string
		entries int
		want    int
	}{
		{"bounded", 2, 2},
		{"unbounded", -1, len(queries)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f, err := Open(ctx, writeDataDir(t, cacheDocs()), p, Options{CacheEntries: c.entries})
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			first := map[string][]string{}
			for _, q := range queries {
				r, err := f.Search(ctx, Request{Query: q, WithResults: true})
				if err != nil {
					t.Fatal(err)
				}
				first[q] = suggest.Keys(r.Suggestions)
			}
			if len(first["kakakan"]) == 0 {
				t.Fatal("no suggestions for kakakan; the test is weak")
			}
			if n := f.cache.ItemCount(); n != c.want {
				t.Fatalf("%d lists cached, want %d", n, c.want)
			}
			for _, q := range queries {
				r, err := f.Search(ctx, Request{Query: q, WithResults: true})
				if err != nil {
					t.Fatal(err)
				}
				if got := suggest.Keys(r.Suggestions); !reflect.DeepEqual(got, first[q]) {
					t.Errorf("%q: second answer %v, first %v", q, got, first[q])
				}
			}
			if n := f.cache.ItemCount(); n != c.want {
				t.Errorf("after repeats %d lists cached, want %d", n, c.want)
			}
		})
	}
	if d := (Options{}).resolve().CacheEntries; d != 10000 {
		t.Errorf("default bound %d, want 10000", d)
	}
}

// cacheDocs is a small invented collection: 80 documents over four topics
// of 25 made-up words each (fixed seed), so words have the mid document
// frequencies suggestions are drawn from.
func cacheDocs() []doc.Document {
	syl := []string{"ka", "lo", "mi", "nu", "pe", "ra", "si", "to", "ve", "zu"}
	word := func(topic, i int) string { return syl[topic] + syl[i%10] + syl[(i/10+topic)%10] + "n" }
	r := rand.New(rand.NewPCG(3, 4))
	var out []doc.Document
	for i := range 80 {
		topic := i % 4
		var b strings.Builder
		for range 40 {
			b.WriteString(word(topic, r.IntN(25)) + " ")
		}
		out = append(out, doc.Document{ID: fmt.Sprintf("d%02d", i), Title: word(topic, i%25), Body: b.String()})
	}
	return out
}

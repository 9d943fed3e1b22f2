package curate

import (
	"fmt"
	"slices"
	"testing"
	"time"

	"kinword/internal/text"
)

// TestPreview: the expected lists follow the finder's documented order of
// rule offers (pins, related terms, refinements, then the engine's list; a
// block beats every other rule on its term: Set.For), worked out by hand
// for each case. The effects come from Compile and For, so the test also
// covers the path the preview route takes (one draft rule, one query).
func TestPreview(t *testing.T) {
	now := time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC)
	cases := []struct {
		name  string
		rules []Rule
		query string
		dept  string
		shown []string
		want  []string
	}{
		{"no rules keep the list", nil, "burst pipe", "", []string{"leak", "main break"}, []string{"leak", "main break"}},
		{"block removes the shown term", []Rule{{Kind: Block, Query: "burst", Term: "leak"}}, "burst pipe", "",
			[]string{"leak", "main break", "valv"}, []string{"main break", "valv"}},
		{"block without a query applies to every query", []Rule{{Kind: Block, Term: "leak"}}, "hydrant", "",
			[]string{"flush", "leak"}, []string{"flush"}},
		{"pin goes first and the list keeps its length", []Rule{{Kind: Pin, Query: "burst", Term: "main break"}}, "burst pipe", "",
			[]string{"leak", "valv", "main break"}, []string{"main break", "leak", "valv"}},
		{"relate pushes the last shown term out", []Rule{{Kind: Relate, Query: "burst", Term: "isolation valve"}}, "burst pipe", "",
			[]string{"leak", "valv"}, []string{"isol valv", "leak"}},
		{"refinement is offered", []Rule{{Kind: Narrower, Query: "pipe", Term: "trunk main"}}, "burst pipe", "",
			[]string{"leak"}, []string{"trunk main"}},
		{"nothing shown allows PreviewLen offers", []Rule{{Kind: Relate, Query: "burst", Term: "leak"}}, "burst pipe", "",
			nil, []string{"leak"}},
		{"rule of another department does not fire", []Rule{{Kind: Block, Query: "burst", Term: "leak", Department: "customer-care"}}, "burst pipe", "field-operations",
			[]string{"leak"}, []string{"leak"}},
		{"query stems must all be present", []Rule{{Kind: Pin, Query: "burst pipe", Term: "valve"}}, "burst", "",
			[]string{"leak"}, []string{"leak"}},
		{"use rules change the query, not the list", []Rule{{Kind: Use, Query: "burst", Term: "main break"}}, "burst", "",
			[]string{"leak"}, []string{"leak"}},
	}
	p := defaultPipeline()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			set, err := Compile(c.rules, p)
			if err != nil {
				t.Fatal(err)
			}
			shown := slices.Clone(c.shown)
			got := Preview(shown, set.For(c.dept, p.Terms(c.query, ""), now))
			if !slices.Equal(got, c.want) {
				t.Errorf("Preview = %q, want %q", got, c.want)
			}
			if !slices.Equal(shown, c.shown) {
				t.Errorf("Preview modified its input: %q", shown)
			}
		})
	}
}

// TestPreviewCut: with nothing shown the list holds at most PreviewLen
// offers, pins before related terms (the finder's order).
func TestPreviewCut(t *testing.T) {
	var eff Effect
	for _, k := range []string{"a", "b", "c"} {
		eff.Relates = append(eff.Relates, Offer{Key: "rel " + k})
		eff.Pins = append(eff.Pins, Offer{Key: "pin " + k})
	}
	got := Preview(nil, eff)
	want := []string{"pin a", "pin b", "pin c", "rel a", "rel b"}
	if !slices.Equal(got, want) {
		t.Errorf("Preview = %q, want %q", got, want)
	}
}

// BenchmarkPreview: one impression of a preview walk (the route runs it
// once per impression of the last 30 days).
func BenchmarkPreview(b *testing.B) {
	p := defaultPipeline()
	set, err := Compile([]Rule{{Kind: Block, Query: "burst", Term: "leak"}}, p)
	if err != nil {
		b.Fatal(err)
	}
	stems := p.Terms("burst pipe near school", "")
	shown := []string{"leak", "valv", "main break", "hydrant", "flush"}
	now := time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC)
	for b.Loop() {
		Preview(shown, set.For("", stems, now))
	}
}

// ExamplePreview: what one draft rule does to one shown list.
func ExamplePreview() {
	p, _ := text.NewPipeline(text.English)
	set, _ := Compile([]Rule{
		{Kind: Block, Query: "burst", Term: "leak"},
		{Kind: Pin, Query: "burst", Term: "stop valve"},
	}, p)
	eff := set.For("", p.Terms("burst pipe", ""), time.Now())
	fmt.Println(Preview([]string{"leak", "main break", "hydrant"}, eff))
	// Output: [stop valv main break hydrant]
}

package curate_test

import (
	"fmt"
	"os"
	"strings"
	"time"

	"kinword/internal/curate"
	"kinword/internal/text"
)

// A librarian's rules for the Tarnwick water utility, applied to one query
// from the billing department.
func ExampleSet_For() {
	p, _ := text.NewPipeline(text.English)
	set, err := curate.Compile([]curate.Rule{
		{ID: "pin-1", Kind: curate.Pin, Query: "burst pipes", Term: "emergency repairs"},
		{ID: "use-1", Kind: curate.Use, Query: "water outage", Term: "supply interruption"},
		{ID: "block-1", Kind: curate.Block, Term: "leak detection", Department: "billing"},
	}, p)
	if err != nil {
		fmt.Println(err)
		return
	}
	now := time.Date(2026, 5, 4, 9, 0, 0, 0, time.UTC)
	e := set.For("billing", p.Terms("Burst pipe and water outage near the school", ""), now)
	fmt.Println(e.Pins[0].Display, "|", e.Equivalents[0].Display, "|", e.Blocks(p.Key("leak detection", "")), e.Rules)
	// Output: emergency repairs | supply interruption | true [block-1 pin-1 use-1]
}

// Exporting rules as CSV: sorted, IDs left out.
func ExampleExportCSV() {
	rules := []curate.Rule{
		{Kind: curate.Relate, Query: "boil notice", Term: "water quality"},
		{Kind: curate.Pin, Query: "burst pipes", Term: "emergency repairs", Department: "ops",
			Start: time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC), Reason: "winter plan"},
	}
	if err := curate.ExportCSV(os.Stdout, rules, curate.Options{}); err != nil {
		fmt.Println(err)
	}
	// Output:
	// kind,query,term,department,start,expiry,reason,lang
	// pin,burst pipes,emergency repairs,ops,2026-01-01T00:00:00Z,,winter plan,
	// relate,boil notice,water quality,,,,,
}

// Importing SKOS: an alternative label becomes a use rule.
func ExampleImportNTriples() {
	in := `<http://www.example.com/animals> <http://www.w3.org/2004/02/skos/core#prefLabel> "animals"@en .
<http://www.example.com/animals> <http://www.w3.org/2004/02/skos/core#altLabel> "creatures"@en .
`
	rules, rep, err := curate.ImportNTriples(strings.NewReader(in), curate.Options{})
	if err != nil {
		fmt.Println(err, rep.Rejected)
		return
	}
	for _, r := range rules {
		fmt.Println(r.Kind, r.Query, "->", r.Term, r.Lang)
	}
	// Output: use creatures -> animals en
}

package suggest

import (
	"fmt"

	"kinword/internal/access"
)

// Example suggests related terms for a search on "leak" in the invented
// utility's intranet of the tests, from the anonymous viewer's top ten
// results and the association table mined from the same documents, then
// builds the query a searcher gets by accepting the first two.
func Example() {
	f := utilityCorpus()
	tbl, err := f.mine()
	if err != nil {
		panic(err)
	}
	view := f.view(access.Anonymous) // the index's View(viewer) in production

	e, err := New(tbl, Options{})
	if err != nil {
		panic(err)
	}
	req := Request{
		Query:    []QueryTerm{{Key: "leak", Weight: 1}},
		Viewer:   access.Anonymous,
		Feedback: view.rank("leak", 10),
	}
	got := e.Suggest(view, req)
	for _, s := range got {
		fmt.Printf("%-10s %v, in %d of the top 10\n", s.Display, s.Evidence.Sources, s.Evidence.FeedbackDocs)
	}
	fmt.Println(Expand(req.Query, Keys(got[:2]), 0))
	// Output:
	// main break [feedback association phrase], in 10 of the top 10
	// logger     [feedback association], in 8 of the top 10
	// burst      [feedback association], in 7 of the top 10
	// leakage    [feedback association], in 7 of the top 10
	// night flow [feedback association phrase], in 6 of the top 10
	// [{leak 1} {main break 0.3} {logger 0.3}]
}

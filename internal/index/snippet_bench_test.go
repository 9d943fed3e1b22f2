package index

import (
	"strings"
	"testing"

	"kinword/internal/text"
)

// snippetBody is an invented report paragraph of about the length of a
// synthetic-corpus document (1,200 bytes), with the query's words far apart.
var snippetBody = strings.Repeat("The network controller logged the event and the crew attended within the hour. ", 6) +
	"Crews isolated the valve after a main break on the trunk main and reinstated the carriageway. " +
	strings.Repeat("Customers in the district metered area were told by text message, and the flushing ran overnight. ", 6)

// BenchmarkMakeSnippet is the per-result cost of a snippet: every search
// with results pays it ten times.
func BenchmarkMakeSnippet(b *testing.B) {
	p, _ := text.NewPipeline("")
	q, _ := ParseQuery(p, "main break valve", QueryLimits{})
	b.SetBytes(int64(len(snippetBody)))
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		MakeSnippet(p, snippetBody, "", q, 30)
	}
}

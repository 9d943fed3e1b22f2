package ingest_test

import (
	"errors"
	"fmt"

	"kinword/internal/ingest"
)

func ExampleParseMarkdown() {
	title, body, meta, err := ingest.ParseMarkdown([]byte("---\ngroups: Staff, ops\n---\n# Valve Checks\n\nTurn each valve\nfully once a month.\n"))
	if err != nil {
		panic(err)
	}
	fmt.Println(title)
	fmt.Println(meta.Groups)
	fmt.Println(body)
	// Output:
	// Valve Checks
	// [ops staff]
	// Valve Checks
	//
	// Turn each valve fully once a month.
}

func ExampleSummary_Line() {
	sum := ingest.Summary{Indexed: 12, Unchanged: 30, Removed: 1, Skipped: []ingest.Skip{
		{Path: "docs/logo.png", Reason: ingest.ErrUnsupported},
		{Path: "docs/export.jsonl#L3", Reason: fmt.Errorf("missing id: %w", ingest.ErrMalformedLine)},
	}}
	fmt.Println(sum.Line())
	fmt.Println(errors.Is(sum.Skipped[1], ingest.ErrMalformedLine))
	// Output:
	// indexed 12, unchanged 30, removed 1, skipped 2 (malformed line: docs/export.jsonl#L3; unsupported: docs/logo.png)
	// true
}

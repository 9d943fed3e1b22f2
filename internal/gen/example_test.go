package gen_test

import (
	"context"
	"fmt"
	"strings"

	"kinword/internal/doc"
	"kinword/internal/gen"
)

// Stream a small corpus and look at the shape of each document.
func ExampleGenerate() {
	opts := gen.Options{Docs: 4, Seed: 42, MeanWords: 60, RestrictedShare: 0.5}
	err := gen.Generate(context.Background(), opts, func(d doc.Document) error {
		fmt.Printf("%s %s %v %d words: %s\n", d.ID, d.Department, d.Groups, len(strings.Fields(d.Body)), d.Title)
		return nil
	})
	if err != nil {
		fmt.Println(err)
	}
	// Output:
	// gen-000001 it-service-desk [it-security] 43 words: Foumgeath Domguskex Zupouve Mer Fasgall Imshor Jisgaltine
	// gen-000002 it-service-desk [] 60 words: Lail Verjall Pojaind
	// gen-000003 asset-engineering [people-confidential] 60 words: Ge Joasdell Flanluzu Carbi Britanmust Con
	// gen-000004 customer-care [] 58 words: Thoumis Peex Asvinkur
}

// Write a corpus in the ingest JSON-lines format, with a canary term in
// some executive-only documents.
func ExampleWriteJSONL() {
	var out strings.Builder
	opts := gen.Options{Docs: 200, MeanWords: 40, CanaryTerms: map[string]string{"executive": "zz9canary"}}
	if err := gen.WriteJSONL(context.Background(), opts, &out, nil); err != nil {
		fmt.Println(err)
		return
	}
	lines := strings.Split(strings.TrimSuffix(out.String(), "\n"), "\n")
	fmt.Println(len(lines), "lines")
	fmt.Println(lines[0][:len(`{"id":"gen-000001"`)])
	fmt.Println(strings.Count(out.String(), "zz9canary") > 0)
	// Output:
	// 200 lines
	// {"id":"gen-000001"
	// true
}

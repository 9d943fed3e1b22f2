package gen

import (
	"context"
	"io"
	"testing"

	"kinword/internal/doc"
)

const benchDocs = 1000

func BenchmarkGenerate(b *testing.B) {
	g := mustNew(b, Options{Docs: benchDocs})
	ctx := context.Background()
	b.ReportAllocs()
	for b.Loop() {
		if err := g.Generate(ctx, func(doc.Document) error { return nil }); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchDocs*b.N)/b.Elapsed().Seconds(), "docs/s")
}

func BenchmarkWriteJSONL(b *testing.B) {
	g := mustNew(b, Options{Docs: benchDocs})
	ctx := context.Background()
	b.ReportAllocs()
	for b.Loop() {
		if err := g.WriteJSONL(ctx, io.Discard, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchDocs*b.N)/b.Elapsed().Seconds(), "docs/s")
}

func BenchmarkNew(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		mustNew(b, Options{})
	}
}

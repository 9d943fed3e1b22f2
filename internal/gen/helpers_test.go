package gen

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"kinword/internal/doc"
)

// collect generates the whole corpus of opts into memory (tests only).
func collect(t testing.TB, opts Options) []doc.Document {
	t.Helper()
	var docs []doc.Document
	err := Generate(context.Background(), opts, func(d doc.Document) error {
		docs = append(docs, d)
		return nil
	})
	if err != nil {
		t.Fatalf("Generate: %v", err)
	}
	return docs
}

// jsonl returns the WriteJSONL output of opts.
func jsonl(t testing.TB, opts Options) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteJSONL(context.Background(), opts, &buf, nil); err != nil {
		t.Fatalf("WriteJSONL: %v", err)
	}
	return buf.Bytes()
}

// tokens splits text into lowercase runs of letters and digits, the way a
// plain analyser would.
func tokens(text string) []string {
	return strings.FieldsFunc(strings.ToLower(text), func(r rune) bool {
		return (r < 'a' || r > 'z') && (r < '0' || r > '9')
	})
}

// mustNew is New for options the test knows to be valid.
func mustNew(t testing.TB, opts Options) *Generator {
	t.Helper()
	g, err := New(opts)
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	return g
}

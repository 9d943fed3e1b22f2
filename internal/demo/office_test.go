package demo

import (
	"bytes"
	"context"
	"flag"
	"os"
	"path/filepath"
	"testing"
)

const tarnwick = "../../testdata/tarnwick"

var update = flag.Bool("update", false, "rewrite the committed office files from their sources")

// TestCommittedOfficeFilesAreReproducible rebuilds every DOCX and PDF of the
// demo corpus from its Markdown source and compares bytes with the committed
// file, so every binary in testdata has a known origin. Run
// `go test ./internal/demo -run Office -update` to refresh them after
// editing a source.
func TestCommittedOfficeFilesAreReproducible(t *testing.T) {
	if *update {
		if _, err := BuildOffice(context.Background(), filepath.Join(tarnwick, "office"), filepath.Join(tarnwick, "docs")); err != nil {
			t.Fatal(err)
		}
	}
	srcs, err := ReadOfficeSources(filepath.Join(tarnwick, "office"))
	if err != nil {
		t.Fatal(err)
	}
	if len(srcs) < 8 {
		t.Fatalf("only %d office sources", len(srcs))
	}
	for _, s := range srcs {
		t.Run(s.Out, func(t *testing.T) {
			a, err := s.Build()
			if err != nil {
				t.Fatal(err)
			}
			b, _ := s.Build()
			if !bytes.Equal(a, b) {
				t.Fatal("build is not deterministic")
			}
			committed, err := os.ReadFile(filepath.Join(tarnwick, "docs", filepath.FromSlash(s.Out)))
			if err != nil {
				t.Fatalf("committed file missing (run go test ./internal/demo -update): %v", err)
			}
			if !bytes.Equal(a, committed) {
				t.Errorf("committed %s differs from its source's build", s.Out)
			}
		})
	}
}

func TestBuildOfficeWrites(t *testing.T) {
	out := t.TempDir()
	paths, err := BuildOffice(context.Background(), filepath.Join(tarnwick, "office"), out)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range paths {
		b, _ := os.ReadFile(p)
		switch filepath.Ext(p) {
		case ".pdf":
			if !bytes.HasPrefix(b, []byte("%PDF-")) {
				t.Errorf("%s is not a PDF", p)
			}
		case ".docx":
			if !bytes.HasPrefix(b, []byte("PK\x03\x04")) {
				t.Errorf("%s is not a zip", p)
			}
		}
	}
}

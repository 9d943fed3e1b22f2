package ingest

import (
	"bytes"
	"context"
	"errors"
	"os/exec"
	"strings"
	"testing"

	"github.com/go-pdf/fpdf"
)

// makePDF writes a two-page PDF with the reference generator go-pdf/fpdf.
func makePDF(t testing.TB) []byte {
	t.Helper()
	p := fpdf.New("P", "mm", "A4", "")
	p.SetFont("Helvetica", "", 12)
	p.AddPage()
	p.Cell(40, 10, "Reservoir Safety Plan")
	p.Ln(20)
	p.Cell(40, 10, "Inspect the spillway weekly.")
	p.AddPage()
	p.Cell(40, 10, "Second page: gauges.")
	var buf bytes.Buffer
	if err := p.Output(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func TestParsePDF(t *testing.T) {
	pdfData := makePDF(t)
	tool, lookErr := exec.LookPath("pdftotext")
	cases := []struct {
		name     string
		tool     string
		data     []byte
		needTool bool
		title    string
		words    []string // must appear in the body
		err      error
	}{
		{name: "pdftotext", tool: tool, data: pdfData, needTool: true, title: "Reservoir Safety Plan",
			words: []string{"Reservoir Safety Plan", "Inspect the spillway weekly.", "Second page: gauges."}},
		{name: "built-in reader", tool: "", data: pdfData,
			words: []string{"Reservoir", "spillway", "gauges"}},
		{name: "corrupt with pdftotext", tool: tool, data: []byte("%PDF-1.4\ngarbage"), needTool: true, err: ErrCorrupt},
		{name: "corrupt without pdftotext", tool: "", data: []byte("%PDF-1.4\ngarbage"), err: ErrNoExtractor},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.needTool && lookErr != nil {
				t.Skipf("pdftotext not on PATH (%v): install poppler-utils to test this path", lookErr)
			}
			title, body, _, err := ParsePDF(context.Background(), c.data, c.tool)
			if c.err != nil {
				if !errors.Is(err, c.err) {
					t.Fatalf("err = %v, want %v", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if c.title != "" && title != c.title {
				t.Errorf("title = %q, want %q", title, c.title)
			}
			for _, w := range c.words {
				if !strings.Contains(body, w) {
					t.Errorf("body %q lacks %q", body, w)
				}
			}
		})
	}
	t.Run("tool message kept", func(t *testing.T) {
		if lookErr != nil {
			t.Skip("pdftotext not on PATH: install poppler-utils to test this path")
		}
		_, _, _, err := ParsePDF(context.Background(), []byte("not a pdf at all"), tool)
		if err == nil || !strings.Contains(err.Error(), "pdftotext:") {
			t.Fatalf("err = %v, want the pdftotext message", err)
		}
	})
}

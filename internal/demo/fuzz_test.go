package demo

import (
	"bytes"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"unicode/utf8"

	"kinword/internal/ingest"
)

// plainBlock is text that no stage between an office source and ingestion
// rewrites: ASCII words and single spaces.
var plainBlock = regexp.MustCompile(`^[A-Za-z0-9.,]+( [A-Za-z0-9.,]+)*$`)

// officeSeeds are the two smallest committed office sources and hand-made
// edge cases of front matter, blocks and bytes.
func officeSeeds(f *testing.F) {
	for _, p := range []string{"legal-compliance/regulatory-reporting-calendar-2026.pdf.md", "asset-engineering/condition-assessment-manual.docx.md"} {
		b, err := os.ReadFile(filepath.Join(tarnwick, "office", filepath.FromSlash(p)))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	for _, s := range []string{
		"---\ntitle: Valve log\nmodified: 2026-02-03\n---\n# Valve log\n\nCrews **checked** the valve.\n\n- one\n* two\n",
		"---\r\ntitle: crlf\r\n---\r\nbody\r\n",
		"---\ntitle: x\n", "---\n---\n", "---\n\n---", "---\nmodified: 2026-13-01\n---\n", "---\nmodified: 20\n---\n",
		"---\n: [\n---\n", "---\ntitle: [a, b]\n---\n", "#\n\n##  \n\n-  \n\n__a__\n", "no front matter\nsecond line\n\n\n\nthird",
		"\ufeff---\ntitle: bom\n---\n", "Caf\xe9 \x00 \u00e9t\u00e9 \u2022\n",
	} {
		f.Add([]byte(s))
	}
}

// FuzzParseOfficeSource feeds fuzzed Markdown to the office-source parser
// and checks:
//   - parsing never panics, and fails only for input that opens with front
//     matter ("---" line), the one part that can be malformed;
//   - an accepted source is valid UTF-8 (the PDF builder's library panics
//     on anything else), has a modification date, and every block is one
//     line;
//   - the ingest DOCX reader accepts the DOCX built from it, and for
//     sources of plain words gives back the blocks as paragraphs (headings
//     without their "# ") and the title.
func FuzzParseOfficeSource(f *testing.F) {
	officeSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		src, err := parseSource(data)
		if err != nil {
			if !strings.HasPrefix(strings.ReplaceAll(string(data), "\r\n", "\n"), "---\n") {
				t.Fatalf("error %v for input without front matter", err)
			}
			return
		}
		if src.Modified.IsZero() {
			t.Fatal("accepted source has no modification date")
		}
		if !utf8.ValidString(src.Title) || !utf8.ValidString(strings.Join(src.Blocks, "")) {
			t.Fatalf("accepted source is not valid UTF-8: %q %q", src.Title, src.Blocks)
		}
		for _, b := range src.Blocks {
			if strings.Contains(b, "\n") { // a lone "\r" is kept as written
				t.Fatalf("block %q is not one line", b)
			}
			// Blocks are not always trimmed or non-empty: emphasis markers
			// are removed after trimming, so a line "**" gives an empty
			// block and "** a" gives " a" (reported, not asserted).
		}
		src.Kind = "docx"
		built, err := src.Build()
		if err != nil {
			t.Fatalf("docx build failed: %v", err)
		}
		title, body, _, err := ingest.ParseDOCX(built)
		if err != nil {
			t.Fatalf("ingest rejects the built DOCX: %v", err)
		}
		var want []string
		for _, b := range src.Blocks {
			b = strings.TrimPrefix(b, "# ")
			if !plainBlock.MatchString(b) {
				return
			}
			want = append(want, b)
		}
		if body != strings.Join(want, "\n\n") {
			t.Fatalf("DOCX body %q, want blocks %q", body, want)
		}
		if plainBlock.MatchString(src.Title) && title != src.Title {
			t.Fatalf("DOCX title %q, want %q", title, src.Title)
		}
	})
}

// FuzzBuildOffice builds DOCX and PDF files from fuzzed sources and checks
// the builders never fail or panic on a parsed source and are
// deterministic (same source, same bytes: the package's promise that the
// committed binaries can be rebuilt).
func FuzzBuildOffice(f *testing.F) {
	officeSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		src, err := parseSource(data)
		if err != nil {
			return
		}
		for _, kind := range []string{"docx", "pdf"} {
			src.Kind = kind
			b1, err1 := src.Build()
			b2, err2 := src.Build()
			if err1 != nil || err2 != nil {
				t.Fatalf("%s build failed: %v, %v", kind, err1, err2)
			}
			if !bytes.Equal(b1, b2) {
				t.Fatalf("%s build is not deterministic", kind)
			}
		}
	})
}

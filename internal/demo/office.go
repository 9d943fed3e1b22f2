// Package demo builds the demonstration intranet of the invented utility
// Tarnwick Water & Power: it turns the Markdown sources under
// testdata/tarnwick/office into the DOCX and PDF files the corpus ships,
// deterministically, so that no binary in the repository is of unknown
// origin. It must not import bleve, gin or database drivers.
package demo

import (
	"archive/zip"
	"bytes"
	"context"
	"encoding/xml"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"github.com/go-pdf/fpdf"
	"gopkg.in/yaml.v3"
)

// OfficeSource is one office document's source: a Markdown file named
// NAME.docx.md or NAME.pdf.md with front matter title and modified.
type OfficeSource struct {
	Path     string    // source path
	Out      string    // output path relative to the docs folder
	Kind     string    // "docx" or "pdf"
	Title    string    // from front matter
	Modified time.Time // from front matter; zero = 2026-01-01
	Blocks   []string  // paragraphs; headings start with "# "
}

// ReadOfficeSources lists and parses every source under dir (the office
// folder), sorted by path.
func ReadOfficeSources(dir string) ([]OfficeSource, error) {
	var out []OfficeSource
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		name := d.Name()
		var kind string
		switch {
		case strings.HasSuffix(name, ".docx.md"):
			kind = "docx"
		case strings.HasSuffix(name, ".pdf.md"):
			kind = "pdf"
		default:
			return nil
		}
		rel, _ := filepath.Rel(dir, p)
		b, err := os.ReadFile(p)
		if err != nil {
			return fmt.Errorf("demo: %w", err)
		}
		src, err := parseSource(b)
		if err != nil {
			return fmt.Errorf("demo: %s: %w", p, err)
		}
		src.Path, src.Kind = p, kind
		src.Out = strings.TrimSuffix(filepath.ToSlash(rel), ".md")
		out = append(out, src)
		return nil
	})
	sort.Slice(out, func(i, j int) bool { return out[i].Path < out[j].Path })
	return out, err
}

func parseSource(b []byte) (OfficeSource, error) {
	var s OfficeSource
	text := strings.ReplaceAll(strings.ToValidUTF8(string(b), "\uFFFD"), "\r\n", "\n") // fpdf panics on invalid UTF-8
	if strings.HasPrefix(text, "---\n") {
		end := strings.Index(text[4:], "\n---")
		if end < 0 {
			return s, fmt.Errorf("unterminated front matter")
		}
		var fm struct {
			Title    string `yaml:"title"`
			Modified string `yaml:"modified"`
		}
		if err := yaml.Unmarshal([]byte(text[4:4+end]), &fm); err != nil {
			return s, fmt.Errorf("front matter: %w", err)
		}
		s.Title = fm.Title
		if fm.Modified != "" {
			t, err := time.Parse("2006-01-02", fm.Modified[:min(10, len(fm.Modified))])
			if err != nil {
				return s, fmt.Errorf("modified: %w", err)
			}
			s.Modified = t
		}
		text = text[4+end+4:]
	}
	if s.Modified.IsZero() {
		s.Modified = time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	}
	for _, blk := range strings.Split(text, "\n\n") {
		lines := strings.Split(strings.TrimSpace(blk), "\n")
		var para []string
		flush := func() {
			if len(para) > 0 {
				s.Blocks = append(s.Blocks, strings.Join(para, " "))
				para = nil
			}
		}
		for _, l := range lines {
			l = strings.TrimSpace(l)
			switch {
			case l == "":
			case strings.HasPrefix(l, "#"):
				flush()
				s.Blocks = append(s.Blocks, "# "+strings.TrimSpace(strings.TrimLeft(l, "#")))
			case strings.HasPrefix(l, "- ") || strings.HasPrefix(l, "* "):
				flush()
				s.Blocks = append(s.Blocks, "• "+strings.TrimSpace(l[2:]))
			default:
				para = append(para, strings.ReplaceAll(strings.ReplaceAll(l, "**", ""), "__", ""))
			}
		}
		flush()
	}
	if s.Title == "" && len(s.Blocks) > 0 {
		s.Title = strings.TrimPrefix(s.Blocks[0], "# ")
	}
	return s, nil
}

// Build renders one source to bytes.
func (s OfficeSource) Build() ([]byte, error) {
	if s.Kind == "docx" {
		return buildDOCX(s)
	}
	return buildPDF(s)
}

// BuildOffice renders every source under officeDir into docsDir and returns
// the paths written.
func BuildOffice(ctx context.Context, officeDir, docsDir string) ([]string, error) {
	srcs, err := ReadOfficeSources(officeDir)
	if err != nil {
		return nil, err
	}
	var written []string
	for _, s := range srcs {
		if err := ctx.Err(); err != nil {
			return written, err
		}
		b, err := s.Build()
		if err != nil {
			return written, fmt.Errorf("demo: build %s: %w", s.Path, err)
		}
		out := filepath.Join(docsDir, filepath.FromSlash(s.Out))
		if err := os.MkdirAll(filepath.Dir(out), 0o755); err != nil {
			return written, fmt.Errorf("demo: %w", err)
		}
		if err := os.WriteFile(out, b, 0o644); err != nil {
			return written, fmt.Errorf("demo: %w", err)
		}
		written = append(written, out)
	}
	return written, nil
}

func xmlEscape(s string) string {
	var b bytes.Buffer
	_ = xml.EscapeText(&b, []byte(s))
	return b.String()
}

func buildDOCX(s OfficeSource) ([]byte, error) {
	var body strings.Builder
	for _, blk := range s.Blocks {
		if strings.HasPrefix(blk, "# ") {
			fmt.Fprintf(&body, `<w:p><w:r><w:rPr><w:b/></w:rPr><w:t xml:space="preserve">%s</w:t></w:r></w:p>`, xmlEscape(blk[2:]))
			continue
		}
		fmt.Fprintf(&body, `<w:p><w:r><w:t xml:space="preserve">%s</w:t></w:r></w:p>`, xmlEscape(blk))
	}
	stamp := s.Modified.UTC().Format(time.RFC3339)
	parts := []struct{ name, data string }{
		{"[Content_Types].xml", `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/word/document.xml" ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.document.main+xml"/><Override PartName="/docProps/core.xml" ContentType="application/vnd.openxmlformats-package.core-properties+xml"/></Types>`},
		{"_rels/.rels", `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="word/document.xml"/><Relationship Id="rId2" Type="http://schemas.openxmlformats.org/package/2006/relationships/metadata/core-properties" Target="docProps/core.xml"/></Relationships>`},
		{"docProps/core.xml", `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><cp:coreProperties xmlns:cp="http://schemas.openxmlformats.org/package/2006/metadata/core-properties" xmlns:dc="http://purl.org/dc/elements/1.1/" xmlns:dcterms="http://purl.org/dc/terms/" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance"><dc:title>` + xmlEscape(s.Title) + `</dc:title><dc:creator>Tarnwick Water &amp; Power</dc:creator><dcterms:modified xsi:type="dcterms:W3CDTF">` + stamp + `</dcterms:modified></cp:coreProperties>`},
		{"word/document.xml", `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><w:document xmlns:w="http://schemas.openxmlformats.org/wordprocessingml/2006/main"><w:body>` + body.String() + `</w:body></w:document>`},
	}
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, p := range parts {
		w, err := zw.CreateHeader(&zip.FileHeader{Name: p.name, Method: zip.Deflate, Modified: s.Modified.UTC()})
		if err != nil {
			return nil, err
		}
		if _, err := w.Write([]byte(p.data)); err != nil {
			return nil, err
		}
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

func buildPDF(s OfficeSource) ([]byte, error) {
	pdf := fpdf.New("P", "mm", "A4", "")
	pdf.SetCatalogSort(true) // deterministic object order
	pdf.SetCreationDate(s.Modified.UTC())
	pdf.SetModificationDate(s.Modified.UTC())
	pdf.SetTitle(s.Title, true)
	pdf.SetAuthor("Tarnwick Water & Power", true)
	tr := pdf.UnicodeTranslatorFromDescriptor("")
	pdf.AddPage()
	pdf.SetFont("Helvetica", "B", 15)
	pdf.MultiCell(0, 8, tr(s.Title), "", "L", false)
	pdf.Ln(3)
	for i, blk := range s.Blocks {
		if i == 0 && strings.TrimPrefix(blk, "# ") == s.Title {
			continue
		}
		if strings.HasPrefix(blk, "# ") {
			pdf.SetFont("Helvetica", "B", 12)
			pdf.MultiCell(0, 6, tr(blk[2:]), "", "L", false)
		} else {
			pdf.SetFont("Helvetica", "", 10.5)
			pdf.MultiCell(0, 5, tr(blk), "", "L", false)
		}
		pdf.Ln(2.5)
	}
	var buf bytes.Buffer
	if err := pdf.Output(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

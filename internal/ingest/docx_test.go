package ingest

import (
	"archive/zip"
	"bytes"
	"errors"
	"testing"
)

// docxXML wraps body content in a WordprocessingML document element with
// the transitional namespace (ECMA-376 Part 1, 17.2.3 document; section from memory).
func docxXML(body string) string {
	return `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<w:document xmlns:w="http://schemas.openxmlformats.org/wordprocessingml/2006/main"><w:body>` + body + `</w:body></w:document>`
}

// coreXML is a docProps/core.xml with a dc:title (ECMA-376 Part 2, 11.1
// core properties, Dublin Core namespace; section from memory).
func coreXML(title string) string {
	return `<?xml version="1.0" encoding="UTF-8"?>
<cp:coreProperties xmlns:cp="http://schemas.openxmlformats.org/package/2006/metadata/core-properties" xmlns:dc="http://purl.org/dc/elements/1.1/"><dc:title>` + title + `</dc:title></cp:coreProperties>`
}

// makeDOCX builds a DOCX archive from part name -> content.
func makeDOCX(t testing.TB, parts map[string]string) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, name := range []string{"[Content_Types].xml", "word/document.xml", "docProps/core.xml"} {
		content, ok := parts[name]
		if !ok {
			continue
		}
		w, err := zw.Create(name)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := w.Write([]byte(content)); err != nil {
			t.Fatal(err)
		}
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func TestParseDOCX(t *testing.T) {
	para := func(runs string) string { return "<w:p><w:r>" + runs + "</w:r></w:p>" }
	cases := []struct {
		name        string
		parts       map[string]string
		title, body string
		err         error
	}{
		{name: "paragraphs, tab, break and core title",
			parts: map[string]string{
				"word/document.xml": docxXML(para("<w:t>Chlorine</w:t><w:tab/><w:t>dosing</w:t>") +
					para("<w:t xml:space=\"preserve\">Check </w:t><w:t>daily</w:t><w:br/><w:t>at 07:00 &amp; 19:00.</w:t>")),
				"docProps/core.xml": coreXML("Dosing Procedure"),
			},
			title: "Dosing Procedure", body: "Chlorine dosing\n\nCheck daily at 07:00 & 19:00."},
		{name: "title from first paragraph", parts: map[string]string{"word/document.xml": docxXML(para("<w:t>Minutes</w:t>") + para("<w:t>Agreed.</w:t>"))},
			title: "Minutes", body: "Minutes\n\nAgreed."},
		// w:br w:type="page" is a page break (ECMA-376 Part 1, 17.3.3.1 br; from memory).
		{name: "page break ends paragraph", parts: map[string]string{"word/document.xml": docxXML(para(`<w:t>one</w:t><w:br w:type="page"/><w:t>two</w:t>`))},
			title: "one", body: "one\n\ntwo"},
		{name: "deleted text and field codes dropped", parts: map[string]string{"word/document.xml": docxXML(
			para(`<w:delText>old</w:delText><w:instrText>PAGE</w:instrText><w:t>new</w:t>`))},
			title: "new", body: "new"},
		{name: "table cells are paragraphs", parts: map[string]string{"word/document.xml": docxXML(
			"<w:tbl><w:tr><w:tc>" + para("<w:t>A1</w:t>") + "</w:tc><w:tc>" + para("<w:t>B1</w:t>") + "</w:tc></w:tr></w:tbl>")},
			title: "A1", body: "A1\n\nB1"},
		{name: "strict namespace", parts: map[string]string{"word/document.xml": `<w:document xmlns:w="http://purl.oclc.org/ooxml/wordprocessingml/main"><w:body><w:p><w:r><w:t>strict</w:t></w:r></w:p></w:body></w:document>`},
			title: "strict", body: "strict"},
		{name: "missing document part", parts: map[string]string{"[Content_Types].xml": "<Types/>"}, err: ErrCorrupt},
		{name: "broken xml", parts: map[string]string{"word/document.xml": "<w:document><w:body><w:p>"}, err: ErrCorrupt},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			title, body, _, err := ParseDOCX(makeDOCX(t, c.parts))
			if c.err != nil {
				if !errors.Is(err, c.err) {
					t.Fatalf("err = %v, want %v", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if title != c.title || body != c.body {
				t.Errorf("got title %q body %q\nwant title %q body %q", title, body, c.title, c.body)
			}
		})
	}
	t.Run("not a zip", func(t *testing.T) {
		if _, _, _, err := ParseDOCX([]byte("PK\x03\x04 truncated")); !errors.Is(err, ErrCorrupt) {
			t.Fatalf("err = %v, want ErrCorrupt", err)
		}
	})
}

package ingest

import (
	"archive/zip"
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"strings"
)

// maxDOCXPart bounds the decompressed size of one DOCX part read, against
// zip bombs (a house limit).
const maxDOCXPart = 256 << 20

// WordprocessingML namespaces: transitional (ECMA-376 Part 1, 17.2) and
// strict (ISO/IEC 29500-1:2016).
const (
	nsWordTransitional = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
	nsWordStrict       = "http://purl.oclc.org/ooxml/wordprocessingml/main"
	nsDublinCore       = "http://purl.org/dc/elements/1.1/"
)

var errPartMissing = errors.New("part missing")

// ParseDOCX extracts the text of word/document.xml: each w:p is a
// paragraph, w:t is text, w:tab a space, w:br and w:cr line breaks (joined
// within the paragraph), a page break ends the paragraph. The title is
// dc:title in docProps/core.xml, else the first paragraph when short.
// A damaged archive or XML gives ErrCorrupt.
func ParseDOCX(data []byte) (title, body string, meta Meta, err error) {
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		return "", "", Meta{}, reason(ErrCorrupt, "docx: %v", err)
	}
	part, err := readPart(zr, "word/document.xml")
	if err != nil {
		return "", "", Meta{}, err
	}
	paras, err := docxParagraphs(part)
	if err != nil {
		return "", "", Meta{}, reason(ErrCorrupt, "docx: word/document.xml: %v", err)
	}
	if core, err := readPart(zr, "docProps/core.xml"); err == nil {
		title = coreTitle(core)
	}
	if title == "" && len(paras) > 0 && len([]rune(paras[0])) <= maxTitleRunes {
		title = paras[0]
	}
	return title, strings.Join(paras, "\n\n"), Meta{}, nil
}

// readPart returns the decompressed bytes of a named archive member.
func readPart(zr *zip.Reader, name string) ([]byte, error) {
	for _, f := range zr.File {
		if f.Name != name {
			continue
		}
		rc, err := f.Open()
		if err != nil {
			return nil, reason(ErrCorrupt, "docx: %s: %v", name, err)
		}
		defer rc.Close()
		b, err := io.ReadAll(io.LimitReader(rc, maxDOCXPart+1))
		if err != nil {
			return nil, reason(ErrCorrupt, "docx: %s: %v", name, err)
		}
		if len(b) > maxDOCXPart {
			return nil, reason(ErrTooLarge, "docx: %s over %d bytes uncompressed", name, maxDOCXPart)
		}
		return b, nil
	}
	return nil, reason(ErrCorrupt, "docx: %s: %v", name, errPartMissing)
}

func isWord(n xml.Name) bool { return n.Space == nsWordTransitional || n.Space == nsWordStrict }

// docxParagraphs streams the document part into collapsed paragraphs.
func docxParagraphs(data []byte) ([]string, error) {
	dec := xml.NewDecoder(bytes.NewReader(data))
	var out paras
	inText := 0
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if !isWord(t.Name) {
				continue
			}
			switch t.Name.Local {
			case "p":
				out.Break()
			case "t":
				inText++
			case "tab", "cr":
				out.WriteString(" ")
			case "br":
				if attr(t, "type") == "page" {
					out.Break()
				} else {
					out.WriteString(" ")
				}
			}
		case xml.EndElement:
			if !isWord(t.Name) {
				continue
			}
			switch t.Name.Local {
			case "p":
				out.Break()
			case "t":
				inText = max(inText-1, 0)
			}
		case xml.CharData:
			if inText > 0 {
				out.WriteString(string(t))
			}
		}
	}
	out.Break()
	return out.done, nil
}

func attr(t xml.StartElement, local string) string {
	for _, a := range t.Attr {
		if a.Name.Local == local {
			return a.Value
		}
	}
	return ""
}

// coreTitle returns dc:title from docProps/core.xml, or "".
func coreTitle(data []byte) string {
	dec := xml.NewDecoder(bytes.NewReader(data))
	for {
		tok, err := dec.Token()
		if err != nil {
			return ""
		}
		if s, ok := tok.(xml.StartElement); ok && s.Name.Space == nsDublinCore && s.Name.Local == "title" {
			var v string
			if err := dec.DecodeElement(&v, &s); err != nil {
				return ""
			}
			return collapse(v)
		}
	}
}

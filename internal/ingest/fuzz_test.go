package ingest

import (
	"context"
	"os"
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"
)

// checkOutput asserts the invariants every parser keeps: valid UTF-8, no
// control characters but the paragraph newlines, paragraphs separated by
// exactly one blank line and trimmed.
func checkOutput(t *testing.T, title, body string, meta Meta) {
	t.Helper()
	for _, s := range append([]string{title, body, meta.ID, meta.Title, meta.URL, meta.Department, meta.Language}, meta.Groups...) {
		if !utf8.ValidString(s) {
			t.Fatalf("invalid UTF-8 in output %q", s)
		}
	}
	if strings.Contains(body, "\n\n\n") || strings.TrimSpace(body) != body {
		t.Fatalf("badly separated paragraphs: %q", body)
	}
	for _, p := range strings.Split(body, "\n\n") {
		if strings.TrimSpace(p) != p || strings.ContainsFunc(p, func(r rune) bool { return unicode.IsControl(r) || r == '\n' }) {
			t.Fatalf("paragraph %q is not collapsed", p)
		}
	}
	if strings.ContainsFunc(title, unicode.IsControl) {
		t.Fatalf("title %q has control characters", title)
	}
}

func FuzzParseHTML(f *testing.F) {
	if b, err := os.ReadFile("testdata/boilerplate.html"); err == nil {
		f.Add(b)
	}
	for _, s := range []string{"<title>x</title><p>a<br>b", "<nav><p>n</nav><h1>H</h1>", "<svg><title>t</title></svg>",
		"<p hidden>a</p><div aria-hidden=TRUE>b", "&amp;&#0;&#xD800;<table><td>c", "\xef\xbb\xbf<p>bom"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		title, body, meta, err := ParseHTML(data)
		if err == nil {
			checkOutput(t, title, body, meta)
		} else if KindOf(err) == nil {
			t.Fatalf("error %v wraps no sentinel", err)
		}
	})
}

func FuzzParseMarkdown(f *testing.F) {
	for _, s := range []string{"# T\n\npara\n- a\n- b", "---\ntitle: x\ngroups: a,b\n---\nbody", "Foo\n===\n> q\n\n```\ncode\n```",
		"| a | b |\n|---|---|\n| 1 | 2 |", "&copy; \\* <b>x</b> ![i](p.png) [l](u)", "---\n---\n", "* * *\n1. x\n   > y"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		title, body, meta, err := ParseMarkdown(data)
		if err == nil {
			checkOutput(t, title, body, meta)
		} else if KindOf(err) == nil {
			t.Fatalf("error %v wraps no sentinel", err)
		}
	})
}

func FuzzParseDOCX(f *testing.F) {
	f.Add(makeDOCX(f, map[string]string{"word/document.xml": docxXML("<w:p><w:r><w:t>a</w:t><w:tab/><w:br/></w:r></w:p>"),
		"docProps/core.xml": coreXML("T")}))
	f.Add(makeDOCX(f, map[string]string{"word/document.xml": "<w:document>"}))
	f.Add([]byte("PK\x03\x04"))
	f.Fuzz(func(t *testing.T, data []byte) {
		title, body, meta, err := ParseDOCX(data)
		if err == nil {
			checkOutput(t, title, body, meta)
		} else if KindOf(err) == nil {
			t.Fatalf("error %v wraps no sentinel", err)
		}
	})
}

func FuzzParseJSONLine(f *testing.F) {
	for _, s := range []string{`{"id":"a","text":"b\n\nc","groups":["X","x"],"modified":"2024-01-01"}`, `{"id":1e400,"text":""}`,
		`{"id":"a","text":"\u0000\ud800"}`, `[]`, `{"id":{"x":1},"text":"t"}`, `{"id":"a","text":"t","groups":"a, b"}`} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		title, body, meta, err := ParseJSONLine(data)
		if err == nil {
			checkOutput(t, title, body, meta)
			if meta.ID == "" {
				t.Fatal("accepted a line without id")
			}
		} else if KindOf(err) == nil {
			t.Fatalf("error %v wraps no sentinel", err)
		}
	})
}

func FuzzFrontMatter(f *testing.F) {
	for _, s := range []string{"---\ntitle: x\ngroups: [a, b]\nmodified: 2024-01-01\n---\nrest", "---\n&a [*a, *a]\n---\n",
		"---\nid: 3\n...\n", "---\r\ntitle: crlf\r\n---\r\n", "---\n- list\n---\n", "no front matter"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		meta, rest, err := ParseFrontMatter(data)
		if err != nil {
			if KindOf(err) != ErrBadMeta {
				t.Fatalf("error %v is not ErrBadMeta", err)
			}
			return
		}
		checkOutput(t, "", "", meta)
		if len(rest) > len(data) {
			t.Fatal("rest longer than input")
		}
	})
}

func FuzzParseText(f *testing.F) {
	for _, s := range []string{"Title\n\nbody\r\nmore", "\f\v\t", "\xef\xbb\xbfx", "a\x00"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		title, body, meta, err := ParseText(data)
		if err == nil {
			checkOutput(t, title, body, meta)
		}
	})
}

func FuzzParseSidecar(f *testing.F) {
	for _, s := range []string{"title = \"x\"\ngroups = [\"a\"]\nmodified = 1979-05-27T07:32:00Z", "groups = \"a,b\"", "url_prefix = 3", "[t]\nx=1"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if meta, err := ParseSidecar(data); err == nil {
			checkOutput(t, "", "", meta)
		}
		if meta, _, err := ParseFolderDefaults(data); err == nil {
			checkOutput(t, "", "", meta)
		}
	})
}

// FuzzParsePDF exercises the built-in reader only (no external tool).
func FuzzParsePDF(f *testing.F) {
	f.Add(makePDF(f))
	f.Add([]byte("%PDF-1.4\n%%EOF"))
	f.Fuzz(func(t *testing.T, data []byte) {
		title, body, meta, err := ParsePDF(context.Background(), data, "")
		if err == nil {
			checkOutput(t, title, body, meta)
		}
	})
}

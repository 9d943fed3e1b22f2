package ingest

import (
	"errors"
	"os"
	"testing"
)

// TestParseHTMLBoilerplate checks chrome stripping against a hand-written
// expectation (testdata/boilerplate.txt, the text a reader sees in the main
// content of testdata/boilerplate.html).
func TestParseHTMLBoilerplate(t *testing.T) {
	in, err := os.ReadFile("testdata/boilerplate.html")
	if err != nil {
		t.Fatal(err)
	}
	want, err := os.ReadFile("testdata/boilerplate.txt")
	if err != nil {
		t.Fatal(err)
	}
	title, body, _, err := ParseHTML(in)
	if err != nil {
		t.Fatal(err)
	}
	// &ndash; is U+2013 (WHATWG HTML, named character references table).
	if wantTitle := "Tarnwick Water & Power \u2013 Winter Mains Flushing"; title != wantTitle {
		t.Errorf("title = %q, want %q", title, wantTitle)
	}
	if body != string(want) {
		t.Errorf("body:\n%s\n--- want:\n%s", body, want)
	}
}

func TestParseHTML(t *testing.T) {
	cases := []struct {
		name, in    string
		title, body string
		err         error
	}{
		{name: "h1 when no title", in: "<body><h1>Pump <i>Rota</i></h1><p>Monday</p></body>", title: "Pump Rota", body: "Pump Rota\n\nMonday"},
		{name: "h1 inside header as last resort", in: "<header><h1>Logo</h1></header><p>text</p>", title: "Logo", body: "text"},
		{name: "inline elements do not break", in: "<p>con<b>tin</b>uous <a href=x>link</a></p>", body: "continuous link"},
		// Numeric references: WHATWG HTML, 13.2.5.80 numeric character reference end
		// state (section number from memory); U+00E9 is é (Unicode code charts).
		{name: "numeric references", in: "<p>caf&#233; &#x1F4A7;</p>", body: "café \U0001F4A7"},
		{name: "role tokens", in: "<div role='menu navigation'>menu</div><div role=main>kept</div>", body: "kept"},
		{name: "aria-hidden false kept", in: "<p aria-hidden=false>shown</p>", body: "shown"},
		{name: "svg title not page title", in: "<p><svg><title>icon</title></svg>Text</p>", title: "", body: "Text"},
		{name: "comments dropped", in: "<p>a<!-- secret -->b</p>", body: "ab"},
		{name: "unclosed tags tolerated", in: "<p>one<p>two<div>three", body: "one\n\ntwo\n\nthree"},
		{name: "binary", in: "<p>\x00</p>", err: ErrBinary},
		{name: "invalid UTF-8", in: "<p>\xe9t\xe9</p>", err: ErrInvalidUTF8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			title, body, _, err := ParseHTML([]byte(c.in))
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
}

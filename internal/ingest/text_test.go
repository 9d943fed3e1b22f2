package ingest

import (
	"errors"
	"strings"
	"testing"
	"unicode/utf8"
)

func TestParseText(t *testing.T) {
	long := strings.Repeat("word ", 30)
	cases := []struct {
		name, in    string
		title, body string
		err         error
	}{
		{name: "title line and paragraphs", in: "Reservoir levels\n\nThe east basin\nis at 80%.\n\n\nWest basin  is low.\n",
			title: "Reservoir levels", body: "Reservoir levels\n\nThe east basin is at 80%.\n\nWest basin is low."},
		{name: "leading blank lines", in: "\n \n  Outage notice \nPumps off.", title: "Outage notice", body: "Outage notice Pumps off."},
		{name: "long first line is no title", in: long + "\n\nmore", title: "", body: strings.TrimSpace(long) + "\n\nmore"},
		{name: "CRLF line ends", in: "Memo\r\n\r\nline one\r\nline two", title: "Memo", body: "Memo\n\nline one line two"},
		// UTF-8 BOM EF BB BF: Unicode Standard 15.0, section 23.8.
		{name: "byte order mark dropped", in: "\xEF\xBB\xBFMemo\n\nbody", title: "Memo", body: "Memo\n\nbody"},
		{name: "form feed breaks paragraphs", in: "page one\fpage two", title: "page one", body: "page one\n\npage two"},
		{name: "NUL means binary", in: "abc\x00def", err: ErrBinary},
		{name: "control characters mean binary", in: "a\x01\x02\x03b\x04\x05c", err: ErrBinary},
		// 0xC3 0x28 is an invalid 2-byte sequence and 0xFF never occurs in
		// UTF-8 (RFC 3629, section 1 and section 3).
		{name: "invalid two-byte sequence", in: "caf\xC3\x28", err: ErrInvalidUTF8},
		{name: "byte FF", in: "ok \xFF", err: ErrInvalidUTF8},
		// Overlong encoding of "/" (C0 AF) is forbidden by RFC 3629, section 3.
		{name: "overlong slash", in: "a\xC0\xAFb", err: ErrInvalidUTF8},
		{name: "empty", in: "", title: "", body: ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			title, body, _, err := ParseText([]byte(c.in))
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

func TestCollapse(t *testing.T) {
	cases := []struct{ name, in, want string }{
		{"runs of space", "  a \t\n b  ", "a b"},
		// U+00A0 NO-BREAK SPACE has White_Space=yes (Unicode PropList.txt).
		{"no-break space", "a\u00a0\u00a0b", "a b"},
		{"controls dropped", "a\x07b\u200bc", "abc"},
		{"invalid bytes replaced", "a\xffb", "a\uFFFDb"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := collapse(c.in); got != c.want || !utf8.ValidString(got) {
				t.Errorf("collapse(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

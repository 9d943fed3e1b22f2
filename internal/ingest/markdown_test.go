package ingest

import (
	"errors"
	"reflect"
	"testing"
	"time"
)

func TestParseMarkdown(t *testing.T) {
	cases := []struct {
		name, in    string
		title, body string
	}{
		{name: "heading paragraphs list",
			in:    "# Leak Response\n\nCall the *duty* engineer\nat once.\n\n- close valve\n- log it\n",
			title: "Leak Response", body: "Leak Response\n\nCall the duty engineer at once.\n\nclose valve\n\nlog it"},
		// Setext heading: CommonMark 0.31.2, section 4.3, example 80 (from memory).
		{name: "setext h1", in: "Foo *bar*\n=========\n\ntext", title: "Foo bar", body: "Foo bar\n\ntext"},
		{name: "first h1 after h2", in: "## Intro\n\n# Main\n\nx", title: "Main", body: "Intro\n\nMain\n\nx"},
		// Entity references: CommonMark 0.31.2, section 2.5, example 25
		// ("&nbsp; &amp; &copy; ..." render as the characters; from memory).
		{name: "entities decoded", in: "&amp; &copy; &#35; &#x22;", body: "& © # \""},
		// Backslash escapes: CommonMark 0.31.2, section 2.4, example 12 (from memory).
		{name: "backslash escapes", in: `\*not emphasized\*`, body: "*not emphasized*"},
		{name: "code blocks dropped, code spans kept", in: "run `pumpctl stop`\n\n```\nsecret code\n```\n\n    indented code\n",
			body: "run pumpctl stop"},
		{name: "raw html and images dropped", in: "<div>\nraw\n</div>\n\nsee ![diagram](d.png) <b>here</b>", body: "see here"},
		{name: "links keep text", in: "read [the policy](https://example.invalid/p) now", body: "read the policy now"},
		{name: "block quote and nested list", in: "> quoted\n> line\n\n1. one\n   - nested\n", body: "quoted line\n\none\n\nnested"},
		// GFM tables: GitHub Flavored Markdown spec 0.29, section 4.10, example 198 (from memory).
		{name: "gfm table cells", in: "| foo | bar |\n| --- | --- |\n| baz | bim |\n", body: "foo\n\nbar\n\nbaz\n\nbim"},
		{name: "front matter title wins", in: "---\ntitle: From Front\n---\n# Heading\n\nbody", title: "From Front", body: "Heading\n\nbody"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			title, body, _, err := ParseMarkdown([]byte(c.in))
			if err != nil {
				t.Fatal(err)
			}
			if title != c.title || body != c.body {
				t.Errorf("got title %q body %q\nwant title %q body %q", title, body, c.title, c.body)
			}
		})
	}
}

func TestParseFrontMatter(t *testing.T) {
	cases := []struct {
		name, in string
		want     Meta
		rest     string
		err      error
	}{
		// Flow and block sequences: YAML 1.2.2, examples 2.1 and 2.5 (from memory).
		{name: "all keys, flow list", in: "---\nid: ops-42\ntitle: Valve Guide\ndepartment: Field-Operations\ngroups: [Staff, it-security, staff]\nurl: https://intranet.invalid/v\nlanguage: french\nmodified: 2024-03-05\n---\nbody\n",
			want: Meta{ID: "ops-42", Title: "Valve Guide", Department: "field-operations", Groups: []string{"it-security", "staff"},
				URL: "https://intranet.invalid/v", Language: "french", Modified: time.Date(2024, 3, 5, 0, 0, 0, 0, time.UTC)},
			rest: "body\n"},
		{name: "block list and comma string", in: "---\ngroups:\n  - b\n  - a\n---\nx", want: Meta{Groups: []string{"a", "b"}}, rest: "x"},
		{name: "comma string groups", in: "---\ngroups: hr, Payroll\n---\n", want: Meta{Groups: []string{"hr", "payroll"}}, rest: ""},
		{name: "explicitly open", in: "---\ngroups: []\n---\n", want: Meta{Groups: []string{}}, rest: ""},
		// YAML 1.2.2 document end marker "..." (section 9.1.4).
		{name: "dots close", in: "---\ntitle: T\n...\nrest", want: Meta{Title: "T"}, rest: "rest"},
		{name: "numeric id", in: "---\nid: 42\n---\n", want: Meta{ID: "42"}, rest: ""},
		{name: "timestamp with zone", in: "---\nmodified: 2024-03-05T10:00:00+02:00\n---\n", want: Meta{Modified: time.Date(2024, 3, 5, 8, 0, 0, 0, time.UTC)}, rest: ""},
		{name: "unknown keys ignored", in: "---\nauthor: someone\n---\nx", want: Meta{}, rest: "x"},
		{name: "no front matter", in: "# Title\n---\n", want: Meta{}, rest: "# Title\n---\n"},
		{name: "unclosed is content", in: "---\ntitle: x\n", want: Meta{}, rest: "---\ntitle: x\n"},
		{name: "bad yaml", in: "---\ntitle: [unclosed\n---\n", err: ErrBadMeta},
		{name: "groups of maps", in: "---\ngroups: [{a: 1}]\n---\n", err: ErrBadMeta},
		{name: "not a mapping", in: "---\n- a\n- b\n---\n", err: ErrBadMeta},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			meta, rest, err := ParseFrontMatter([]byte(c.in))
			if c.err != nil {
				if !errors.Is(err, c.err) {
					t.Fatalf("err = %v, want %v", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			meta.Warnings = nil
			if !reflect.DeepEqual(meta, c.want) || string(rest) != c.rest {
				t.Errorf("got %+v rest %q\nwant %+v rest %q", meta, rest, c.want, c.rest)
			}
		})
	}
}

package ingest

import (
	"bytes"
	"strings"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/text"
	"github.com/yuin/goldmark/util"
	"gopkg.in/yaml.v3"
)

// mdParser is safe for concurrent use (goldmark parsers keep no state
// between Parse calls).
var mdParser = goldmark.New(goldmark.WithExtensions(extension.GFM)).Parser()

// ParseFrontMatter splits a leading YAML front matter block ("---" line,
// YAML, then a "---" or "..." line) off data. Without one it returns data
// unchanged and an empty Meta. Keys: id, title, url, department, groups
// (list or comma-separated string), language, modified; others are ignored.
// Unparseable YAML or wrongly typed keys give ErrBadMeta.
func ParseFrontMatter(data []byte) (meta Meta, rest []byte, err error) {
	data = bytes.TrimPrefix(data, utf8BOM)
	first, after, ok := cutLine(data)
	if !ok || strings.TrimRight(string(first), " \t\r") != "---" {
		return Meta{}, data, nil
	}
	for off := 0; ; {
		line, _, more := cutLine(after[off:])
		if l := strings.TrimRight(string(line), " \t\r"); l == "---" || l == "..." {
			rest = after[off+len(line):]
			if more {
				rest = rest[1:]
			}
			return frontMatterMeta(after[:off], rest)
		}
		if !more {
			break
		}
		off += len(line) + 1
	}
	return Meta{}, data, nil // no closing line: not front matter
}

// cutLine returns the first line of b (without "\n"), the rest, and whether
// b had a newline.
func cutLine(b []byte) (line, rest []byte, ok bool) {
	if i := bytes.IndexByte(b, '\n'); i >= 0 {
		return b[:i], b[i+1:], true
	}
	return b, nil, false
}

func frontMatterMeta(block, rest []byte) (meta Meta, _ []byte, err error) {
	defer func() {
		if r := recover(); r != nil {
			meta, err = Meta{}, reason(ErrBadMeta, "front matter: %v", r)
		}
	}()
	var m map[string]any
	if err := yaml.Unmarshal(block, &m); err != nil {
		return Meta{}, nil, reason(ErrBadMeta, "front matter: %v", err)
	}
	meta, err = metaFromMap(m, metaKeys, false)
	if err != nil {
		return Meta{}, nil, reason(ErrBadMeta, "front matter: %v", err)
	}
	return meta, rest, nil
}

// ParseMarkdown renders Markdown (CommonMark plus GFM tables, strikethrough
// and task lists) to plain text: paragraphs, headings, list items, table
// cells and block quotes become paragraphs; code blocks, raw HTML and image
// alt text are dropped. The title is the front matter title, else the first
// level-1 heading. meta is the front matter.
func ParseMarkdown(data []byte) (title, body string, meta Meta, err error) {
	data, err = checkText(data)
	if err != nil {
		return "", "", Meta{}, err
	}
	meta, rest, err := ParseFrontMatter(data)
	if err != nil {
		return "", "", Meta{}, err
	}
	r := mdRenderer{src: rest}
	r.block(mdParser.Parse(text.NewReader(rest)))
	title = meta.Title
	if title == "" {
		title = r.h1
	}
	return title, r.out.String(), meta, nil
}

type mdRenderer struct {
	src []byte
	out paras
	h1  string
}

func (r *mdRenderer) block(n ast.Node) {
	switch n.Kind() {
	case ast.KindFencedCodeBlock, ast.KindCodeBlock, ast.KindHTMLBlock:
		return
	}
	if c := n.FirstChild(); c != nil && c.Type() == ast.TypeInline {
		var b strings.Builder
		r.inline(n, &b)
		r.out.Break()
		r.out.WriteString(b.String())
		r.out.Break()
		if h, ok := n.(*ast.Heading); ok && h.Level == 1 && r.h1 == "" {
			r.h1 = collapse(b.String())
		}
		return
	}
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		r.block(c)
		r.out.Break()
	}
}

func (r *mdRenderer) inline(n ast.Node, b *strings.Builder) {
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		switch x := c.(type) {
		case *ast.Text:
			v := x.Segment.Value(r.src)
			if !x.IsRaw() {
				v = util.ResolveNumericReferences(util.ResolveEntityNames(util.UnescapePunctuations(v)))
			}
			b.Write(v)
			if x.SoftLineBreak() || x.HardLineBreak() {
				b.WriteByte(' ')
			}
		case *ast.String:
			b.Write(x.Value)
		case *ast.AutoLink:
			b.Write(x.Label(r.src))
		case *ast.RawHTML, *ast.Image:
			// not visible text
		default:
			r.inline(c, b)
		}
	}
}

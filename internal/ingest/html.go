package ingest

import (
	"bytes"
	"strings"

	"golang.org/x/net/html"
	"golang.org/x/net/html/atom"
)

// htmlDropped are elements whose content is not the page's own visible
// text: scripts and styles, templates, and page chrome (navigation, banner,
// footer, sidebars, forms). head is dropped too; its <title> is read apart.
var htmlDropped = map[atom.Atom]bool{
	atom.Script: true, atom.Style: true, atom.Noscript: true, atom.Template: true,
	atom.Nav: true, atom.Header: true, atom.Footer: true, atom.Aside: true,
	atom.Form: true, atom.Head: true, atom.Svg: true, atom.Math: true,
	atom.Iframe: true, atom.Object: true, atom.Embed: true, atom.Canvas: true,
}

// htmlDroppedRoles are WAI-ARIA 1.2 landmark roles equivalent to the chrome
// elements above (navigation = nav, banner = header, contentinfo = footer,
// complementary = aside; W3C WAI-ARIA 1.2, section 5.3.4).
var htmlDroppedRoles = map[string]bool{
	"navigation": true, "banner": true, "contentinfo": true, "complementary": true,
}

// htmlBlocks are elements that start and end a paragraph.
var htmlBlocks = map[atom.Atom]bool{
	atom.Address: true, atom.Article: true, atom.Blockquote: true, atom.Br: true,
	atom.Caption: true, atom.Dd: true, atom.Details: true, atom.Dialog: true,
	atom.Div: true, atom.Dl: true, atom.Dt: true, atom.Fieldset: true,
	atom.Figcaption: true, atom.Figure: true, atom.H1: true, atom.H2: true,
	atom.H3: true, atom.H4: true, atom.H5: true, atom.H6: true, atom.Hgroup: true,
	atom.Hr: true, atom.Li: true, atom.Main: true, atom.Ol: true, atom.P: true,
	atom.Pre: true, atom.Section: true, atom.Summary: true, atom.Table: true,
	atom.Tbody: true, atom.Td: true, atom.Tfoot: true, atom.Th: true,
	atom.Thead: true, atom.Tr: true, atom.Ul: true, atom.Body: true, atom.Html: true,
}

// ParseHTML extracts the visible text of an HTML page. The title is the
// <title>, else the first visible <h1>, else the first <h1> anywhere.
// Dropped: the elements in htmlDropped, elements with a chrome landmark role,
// aria-hidden="true" or the hidden attribute. Block elements (and <br>)
// break paragraphs; character references are decoded. Meta is empty.
func ParseHTML(data []byte) (title, body string, meta Meta, err error) {
	data, err = checkText(data)
	if err != nil {
		return "", "", Meta{}, err
	}
	root, err := html.Parse(bytes.NewReader(data))
	if err != nil {
		return "", "", Meta{}, reason(ErrCorrupt, "html: %v", err)
	}
	var h htmlText
	h.walk(root)
	title = h.title
	if title == "" {
		title = h.h1
	}
	if title == "" {
		if n := findElement(root, atom.H1); n != nil {
			title = collapse(textOf(n))
		}
	}
	return title, h.out.String(), Meta{}, nil
}

type htmlText struct {
	out   paras
	title string // first <title> in the HTML namespace
	h1    string // first visible <h1>
}

func (h *htmlText) walk(n *html.Node) {
	switch n.Type {
	case html.TextNode:
		h.out.WriteString(n.Data)
		return
	case html.ElementNode:
		if n.DataAtom == atom.Title && n.Namespace == "" && h.title == "" {
			h.title = collapse(textOf(n))
		}
		if n.DataAtom == atom.Head {
			if t := findElement(n, atom.Title); t != nil && h.title == "" {
				h.title = collapse(textOf(t))
			}
		}
		if htmlHidden(n) {
			return
		}
		if n.DataAtom == atom.H1 && h.h1 == "" {
			h.h1 = collapse(textOf(n))
		}
	case html.CommentNode, html.DoctypeNode:
		return
	}
	block := n.Type == html.ElementNode && htmlBlocks[n.DataAtom]
	if block {
		h.out.Break()
	}
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		h.walk(c)
	}
	if block {
		h.out.Break()
	}
}

// htmlHidden reports whether an element's content is not visible page text.
func htmlHidden(n *html.Node) bool {
	if htmlDropped[n.DataAtom] || n.DataAtom == atom.Title {
		return true
	}
	for _, a := range n.Attr {
		switch strings.ToLower(a.Key) {
		case "hidden":
			return true
		case "aria-hidden":
			if strings.EqualFold(strings.TrimSpace(a.Val), "true") {
				return true
			}
		case "role":
			for _, r := range strings.Fields(strings.ToLower(a.Val)) {
				if htmlDroppedRoles[r] {
					return true
				}
			}
		}
	}
	return false
}

// findElement returns the first element a below n in document order.
func findElement(n *html.Node, a atom.Atom) *html.Node {
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		if c.Type == html.ElementNode && c.DataAtom == a && c.Namespace == "" {
			return c
		}
		if f := findElement(c, a); f != nil {
			return f
		}
	}
	return nil
}

// textOf concatenates the text nodes below n.
func textOf(n *html.Node) string {
	var b strings.Builder
	var rec func(*html.Node)
	rec = func(n *html.Node) {
		if n.Type == html.TextNode {
			b.WriteString(n.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			rec(c)
		}
	}
	rec(n)
	return b.String()
}

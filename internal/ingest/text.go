package ingest

import (
	"bytes"
	"strings"
	"unicode"
	"unicode/utf8"
)

// maxTitleRunes is the longest first line still taken as a title for plain
// text and PDF (a house choice: longer first lines are prose, not titles).
const maxTitleRunes = 100

// controlShare is the share of control bytes above which a text format is
// treated as binary (a house heuristic; NUL bytes always mean binary).
const controlShare = 0.10

var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// checkText rejects binary or non-UTF-8 input of a text format and returns
// the data without a UTF-8 byte order mark.
func checkText(data []byte) ([]byte, error) {
	data = bytes.TrimPrefix(data, utf8BOM)
	if err := checkBinary(data); err != nil {
		return nil, err
	}
	if err := checkUTF8(data); err != nil {
		return nil, err
	}
	return data, nil
}

// checkBinary reports ErrBinary for NUL bytes or a high share of control
// characters (tab, newlines, form feed and escape are not counted).
func checkBinary(data []byte) error {
	if i := bytes.IndexByte(data, 0); i >= 0 {
		return reason(ErrBinary, "NUL byte at offset %d", i)
	}
	ctrl := 0
	for _, c := range data {
		if (c < 0x20 && c != '\t' && c != '\n' && c != '\r' && c != '\f' && c != '\v' && c != 0x1b) || c == 0x7f {
			ctrl++
		}
	}
	if len(data) > 0 && float64(ctrl)/float64(len(data)) > controlShare {
		return reason(ErrBinary, "%d of %d bytes are control characters", ctrl, len(data))
	}
	return nil
}

// checkUTF8 reports ErrInvalidUTF8 with the offset of the first bad byte.
func checkUTF8(data []byte) error {
	if utf8.Valid(data) {
		return nil
	}
	off := 0
	for off < len(data) {
		r, n := utf8.DecodeRune(data[off:])
		if r == utf8.RuneError && n <= 1 {
			break
		}
		off += n
	}
	return reason(ErrInvalidUTF8, "first invalid byte at offset %d", off)
}

// collapse returns s as one line: valid UTF-8, control and zero-width
// characters dropped, every whitespace run turned into one space, trimmed.
func collapse(s string) string {
	s = strings.ToValidUTF8(s, "\uFFFD")
	var b strings.Builder
	b.Grow(len(s))
	space := false
	for _, r := range s {
		switch {
		case unicode.IsSpace(r):
			space = true
			continue
		case unicode.IsControl(r), r == '\uFEFF', r == '\u200B':
			continue
		}
		if space && b.Len() > 0 {
			b.WriteByte(' ')
		}
		space = false
		b.WriteRune(r)
	}
	return b.String()
}

// paras accumulates visible text into paragraphs; the zero value is ready.
type paras struct {
	done []string
	cur  strings.Builder
}

// WriteString appends text to the current paragraph.
func (p *paras) WriteString(s string) { p.cur.WriteString(s) }

// Break ends the current paragraph (empty paragraphs are dropped).
func (p *paras) Break() {
	if p.cur.Len() == 0 {
		return
	}
	if c := collapse(p.cur.String()); c != "" {
		p.done = append(p.done, c)
	}
	p.cur.Reset()
}

// String ends the current paragraph and joins all with blank lines.
func (p *paras) String() string {
	p.Break()
	return strings.Join(p.done, "\n\n")
}

// splitParagraphs splits plain text on blank lines (and form feeds), joining
// the lines inside a paragraph with spaces.
func splitParagraphs(text string) string {
	var p paras
	for _, line := range strings.Split(text, "\n") {
		for i, part := range strings.Split(line, "\f") {
			if i > 0 {
				p.Break()
			}
			if strings.TrimSpace(part) == "" {
				p.Break()
				continue
			}
			p.WriteString(part)
			p.WriteString(" ")
		}
	}
	return p.String()
}

// firstLineTitle returns the first non-empty line of text, collapsed, when
// it has at most maxTitleRunes runes; otherwise "".
func firstLineTitle(text string) string {
	for _, line := range strings.FieldsFunc(text, func(r rune) bool { return r == '\n' || r == '\f' }) {
		if t := collapse(line); t != "" {
			if utf8.RuneCountInString(t) <= maxTitleRunes {
				return t
			}
			return ""
		}
	}
	return ""
}

// ParseText reads a plain-text file: paragraphs are separated by blank
// lines; the first non-empty line is the title when it is short. The body
// keeps that line too. Meta is always empty.
func ParseText(data []byte) (title, body string, meta Meta, err error) {
	data, err = checkText(data)
	if err != nil {
		return "", "", Meta{}, err
	}
	text := strings.ReplaceAll(string(data), "\r\n", "\n")
	text = strings.ReplaceAll(text, "\r", "\n")
	return firstLineTitle(text), splitParagraphs(text), Meta{}, nil
}

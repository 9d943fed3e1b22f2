package curate

import (
	"errors"
	"strconv"
	"strings"
	"unicode/utf8"
)

// The parser follows the grammar of W3C RDF 1.1 N-Triples (Carothers &
// Seaborne, 2014, section 7); rule numbers below are that grammar's.

// lexer walks one line.
type lexer struct {
	s string
	i int
}

// parseLine parses one N-Triples line. ok is false for a blank or comment
// line.
func parseLine(line string) (t triple, ok bool, err error) {
	if !utf8.ValidString(line) {
		return t, false, errors.New("not valid UTF-8")
	}
	lx := &lexer{s: line}
	lx.space()
	if lx.done() || lx.peek() == '#' {
		return t, false, nil
	}
	if t.s, err = lx.subject(); err != nil {
		return t, false, err
	}
	lx.space()
	if lx.peek() != '<' {
		return t, false, lx.fail("the predicate must be an IRI")
	}
	if t.p, err = lx.iri(); err != nil {
		return t, false, err
	}
	lx.space()
	if t.o, err = lx.object(); err != nil {
		return t, false, err
	}
	lx.space()
	if lx.peek() != '.' {
		return t, false, lx.fail("expected '.' to end the triple")
	}
	lx.i++
	lx.space()
	if !lx.done() && lx.peek() != '#' {
		return t, false, lx.fail("unexpected text after '.'")
	}
	return t, true, nil
}

func (lx *lexer) done() bool { return lx.i >= len(lx.s) }

func (lx *lexer) peek() byte {
	if lx.done() {
		return 0
	}
	return lx.s[lx.i]
}

// space skips spaces and tabs.
func (lx *lexer) space() {
	for !lx.done() && (lx.s[lx.i] == ' ' || lx.s[lx.i] == '\t') {
		lx.i++
	}
}

func (lx *lexer) fail(msg string) error {
	return errors.New(msg + " at column " + strconv.Itoa(lx.i+1))
}

// subject is rule 3: IRIREF | BLANK_NODE_LABEL.
func (lx *lexer) subject() (node, error) {
	switch lx.peek() {
	case '<':
		return lx.iri()
	case '_':
		return lx.blank()
	}
	return node{}, lx.fail("the subject must be an IRI or a blank node")
}

// object is rule 5: IRIREF | BLANK_NODE_LABEL | literal.
func (lx *lexer) object() (node, error) {
	switch lx.peek() {
	case '<':
		return lx.iri()
	case '_':
		return lx.blank()
	case '"':
		return lx.literal()
	}
	return node{}, lx.fail("the object must be an IRI, a blank node or a literal")
}

// iri is rule 8, IRIREF, which must be absolute.
func (lx *lexer) iri() (node, error) {
	lx.i++ // '<'
	var b strings.Builder
	for {
		if lx.done() {
			return node{}, lx.fail("unterminated IRI")
		}
		c := lx.s[lx.i]
		switch {
		case c == '>':
			lx.i++
			if !absoluteIRI(b.String()) {
				return node{}, lx.fail("not an absolute IRI")
			}
			return iri(b.String()), nil
		case c == '\\':
			r, err := lx.uchar()
			if err != nil {
				return node{}, err
			}
			b.WriteRune(r)
		case c <= 0x20 || strings.IndexByte("<\"{}|^`", c) >= 0:
			return node{}, lx.fail("character not allowed in an IRI")
		default:
			b.WriteByte(c)
			lx.i++
		}
	}
}

// uchar is rule 10: \uXXXX or \UXXXXXXXX, a Unicode scalar value.
func (lx *lexer) uchar() (rune, error) {
	n := 0
	switch {
	case strings.HasPrefix(lx.s[lx.i:], `\u`):
		n = 4
	case strings.HasPrefix(lx.s[lx.i:], `\U`):
		n = 8
	default:
		return 0, lx.fail(`expected \u or \U`)
	}
	if lx.i+2+n > len(lx.s) {
		return 0, lx.fail("short Unicode escape")
	}
	v, err := strconv.ParseUint(lx.s[lx.i+2:lx.i+2+n], 16, 32)
	r := rune(v)
	if err != nil || !utf8.ValidRune(r) {
		return 0, lx.fail("bad Unicode escape")
	}
	lx.i += 2 + n
	return r, nil
}

// blank is rule 141s, BLANK_NODE_LABEL.
func (lx *lexer) blank() (node, error) {
	if !strings.HasPrefix(lx.s[lx.i:], "_:") {
		return node{}, lx.fail("expected _: to start a blank node")
	}
	lx.i += 2
	start := lx.i
	for !lx.done() {
		r, w := utf8.DecodeRuneInString(lx.s[lx.i:])
		first := lx.i == start
		if !(pnCharsU(r) || r >= '0' && r <= '9' || !first && (pnChars(r) || r == '.')) {
			break
		}
		lx.i += w
	}
	for lx.i > start && lx.s[lx.i-1] == '.' { // a label cannot end in '.'
		lx.i--
	}
	if lx.i == start {
		return node{}, lx.fail("empty blank node label")
	}
	return node{kind: blankNode, value: lx.s[start:lx.i]}, nil
}

// pnCharsU is rule 158s, PN_CHARS_U (PN_CHARS_BASE, '_' or ':').
func pnCharsU(r rune) bool {
	switch {
	case r >= 'A' && r <= 'Z', r >= 'a' && r <= 'z', r == '_', r == ':',
		r >= 0xC0 && r <= 0xD6, r >= 0xD8 && r <= 0xF6, r >= 0xF8 && r <= 0x2FF,
		r >= 0x370 && r <= 0x37D, r >= 0x37F && r <= 0x1FFF, r >= 0x200C && r <= 0x200D,
		r >= 0x2070 && r <= 0x218F, r >= 0x2C00 && r <= 0x2FEF, r >= 0x3001 && r <= 0xD7FF,
		r >= 0xF900 && r <= 0xFDCF, r >= 0xFDF0 && r <= 0xFFFD, r >= 0x10000 && r <= 0xEFFFF:
		return true
	}
	return false
}

// pnChars is rule 160s, PN_CHARS.
func pnChars(r rune) bool {
	return pnCharsU(r) || r == '-' || r >= '0' && r <= '9' || r == 0xB7 ||
		r >= 0x300 && r <= 0x36F || r >= 0x203F && r <= 0x2040
}

// literal is rule 6: STRING_LITERAL_QUOTE ('^^' IRIREF | LANGTAG)?.
func (lx *lexer) literal() (node, error) {
	lx.i++ // '"'
	var b strings.Builder
	for {
		if lx.done() {
			return node{}, lx.fail("unterminated string")
		}
		c := lx.s[lx.i]
		if c == '"' {
			lx.i++
			break
		}
		if c != '\\' {
			b.WriteByte(c)
			lx.i++
			continue
		}
		if lx.i+1 >= len(lx.s) {
			return node{}, lx.fail("unterminated escape")
		}
		if e := strings.IndexByte(`tbnrf"'\`, lx.s[lx.i+1]); e >= 0 { // ECHAR, rule 153s
			b.WriteByte("\t\b\n\r\f\"'\\"[e])
			lx.i += 2
			continue
		}
		r, err := lx.uchar()
		if err != nil {
			return node{}, err
		}
		b.WriteRune(r)
	}
	v := b.String()
	switch {
	case strings.HasPrefix(lx.s[lx.i:], "^^"):
		lx.i += 2
		if lx.peek() != '<' {
			return node{}, lx.fail("expected a datatype IRI after ^^")
		}
		dt, err := lx.iri()
		if err != nil {
			return node{}, err
		}
		if dt.value == rdfLangString {
			return node{}, lx.fail("rdf:langString needs a language tag")
		}
		return node{kind: literalNode, value: v, datatype: dt.value}, nil
	case lx.peek() == '@': // LANGTAG, rule 144s
		lx.i++
		start := lx.i
		for !lx.done() && (isAlnum(lx.s[lx.i]) || lx.s[lx.i] == '-') {
			lx.i++
		}
		tag := strings.ToLower(lx.s[start:lx.i])
		if !langTagShape(tag) {
			return node{}, lx.fail("bad language tag")
		}
		return tagged(v, tag), nil
	}
	return plain(v), nil
}

func isAlnum(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9'
}

// langTagShape checks LANGTAG: [a-zA-Z]+ ('-' [a-zA-Z0-9]+)*, here lower case.
func langTagShape(tag string) bool {
	for i, sub := range strings.Split(tag, "-") {
		if sub == "" {
			return false
		}
		for j := 0; j < len(sub); j++ {
			if i == 0 && !(sub[j] >= 'a' && sub[j] <= 'z') {
				return false
			}
		}
	}
	return true
}

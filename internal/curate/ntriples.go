package curate

import (
	"bufio"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"
)

// ExportNTriples writes rules as a SKOS concept scheme in W3C RDF 1.1
// N-Triples (Carothers & Seaborne, W3C Recommendation 25 February 2014):
// one triple a line, lines sorted and distinct, UTF-8. It validates the
// rules first (ValidateSet with opts.Departments) and writes nothing when
// they fail.
func ExportNTriples(w io.Writer, rules []Rule, opts Options) error {
	o, err := opts.resolved()
	if err != nil {
		return err
	}
	ts, err := exportTriples(rules, o, "n-triples")
	if err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	for _, t := range ts {
		bw.WriteString(t.String())
		bw.WriteByte('\n')
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("curate: export n-triples: %w", err)
	}
	return nil
}

// ImportNTriples reads SKOS (and Kinword vocabulary) triples in N-Triples
// and returns the rules they say, sorted as exports sort them, each with ID
// set to its ContentID. It is all or nothing: any malformed line, triple
// outside the mapping's rules, or rule failing ValidateSet rejects the
// whole input with an error wrapping ErrImport and no rules; the Report
// lists every rejection with its line.
func ImportNTriples(r io.Reader, opts Options) ([]Rule, *Report, error) {
	o, rep, b, err := startImport(r, opts, "n-triples")
	if err != nil {
		return nil, rep, err
	}
	src := strings.ReplaceAll(string(b), "\r\n", "\n")
	src = strings.ReplaceAll(src, "\r", "\n")
	var ts []triple
	seen := make(map[string]bool)
	for i, line := range strings.Split(src, "\n") {
		t, ok, err := parseLine(line)
		switch {
		case err != nil:
			rep.reject(i+1, clip(line), err.Error())
		case ok && !seen[t.String()]:
			seen[t.String()] = true
			t.line = i + 1
			ts = append(ts, t)
		}
	}
	return finishImport(importTriples(ts, o, rep), o, rep, true)
}

// writeNode writes n in N-Triples syntax.
func writeNode(b *strings.Builder, n node) {
	switch n.kind {
	case iriNode:
		b.WriteByte('<')
		for _, r := range n.value {
			if r <= 0x20 || strings.ContainsRune("<>\"{}|^`\\", r) {
				fmt.Fprintf(b, "\\u%04X", r)
			} else {
				b.WriteRune(r)
			}
		}
		b.WriteByte('>')
	case blankNode:
		b.WriteString("_:" + n.value)
	case literalNode:
		b.WriteByte('"')
		for _, r := range n.value {
			switch r {
			case '"':
				b.WriteString(`\"`)
			case '\\':
				b.WriteString(`\\`)
			case '\n':
				b.WriteString(`\n`)
			case '\r':
				b.WriteString(`\r`)
			case '\t':
				b.WriteString(`\t`)
			default:
				if r < 0x20 || r == 0x7f {
					fmt.Fprintf(b, "\\u%04X", r)
				} else {
					b.WriteRune(r)
				}
			}
		}
		b.WriteByte('"')
		switch n.datatype {
		case rdfLangString:
			b.WriteString("@" + n.lang)
		case xsdString:
		default:
			b.WriteString("^^")
			writeNode(b, iri(n.datatype))
		}
	}
}

// nodeString is n in N-Triples syntax.
func nodeString(n node) string {
	var b strings.Builder
	writeNode(&b, n)
	return b.String()
}

// absoluteIRI reports whether s is an absolute IRI usable in N-Triples: a
// scheme (RFC 3986, 2005, section 3.1), then no character that IRIREF
// forbids (N-Triples 2014, grammar rule 8), valid UTF-8.
func absoluteIRI(s string) bool {
	colon := strings.IndexByte(s, ':')
	if colon < 1 || !utf8.ValidString(s) {
		return false
	}
	for i := 0; i < colon; i++ {
		c := s[i]
		letter := (c|0x20) >= 'a' && (c|0x20) <= 'z'
		if !letter && (i == 0 || !(c >= '0' && c <= '9' || c == '+' || c == '-' || c == '.')) {
			return false
		}
	}
	for _, r := range s {
		if r <= 0x20 || strings.ContainsRune("<>\"{}|^`\\", r) {
			return false
		}
	}
	return true
}

package text

import (
	"strings"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/cases"
	"golang.org/x/text/unicode/norm"
)

// folder performs full Unicode case folding (e.g. "Straße" -> "strasse").
// cases.Caser is not safe for concurrent use, so Fold copies it per call
// through a small per-goroutine-free fast path for ASCII.
var foldPrototype = cases.Fold()

// Fold returns the token in Kinword's canonical form: NFKC-normalised (so
// ligatures, full-width forms and compatibility characters unify), case
// folded, with typographic apostrophes replaced by ASCII ones. ASCII input
// takes a fast path that allocates only when it must lower-case.
func Fold(s string) string {
	if isASCII(s) {
		return asciiLower(s)
	}
	s = norm.NFKC.String(s)
	s = strings.Map(func(r rune) rune {
		switch r {
		case '\u2019', '\u2018', '\u02bc', '\uff07':
			return '\''
		case '\u2010', '\u2011', '\u2012', '\u2013', '\u2212':
			return '-'
		}
		return r
	}, s)
	c := foldPrototype // value copy: Caser holds per-use state
	return c.String(s)
}

func isASCII(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] >= utf8.RuneSelf {
			return false
		}
	}
	return true
}

func asciiLower(s string) string {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c >= 'A' && c <= 'Z' {
			b := []byte(s)
			for j := i; j < len(b); j++ {
				if b[j] >= 'A' && b[j] <= 'Z' {
					b[j] += 'a' - 'A'
				}
			}
			return string(b)
		}
	}
	return s
}

// isWordRune reports whether r can be part of a word or number token.
func isWordRune(r rune) bool {
	if r < utf8.RuneSelf {
		return 'a' <= r && r <= 'z' || 'A' <= r && r <= 'Z' || '0' <= r && r <= '9'
	}
	return unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.Is(unicode.Mn, r) || unicode.Is(unicode.Mc, r)
}

// isJoiner reports whether r may join two word runes inside one token:
// hyphens, apostrophes (ASCII and typographic) and, between digits, the
// decimal point and thousands comma.
func isJoiner(r rune) bool {
	switch r {
	case '-', '\'', '\u2019', '\u2010', '\u2011':
		return true
	}
	return false
}

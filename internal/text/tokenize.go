package text

import (
	"strings"
	"unicode"
	"unicode/utf8"
)

// Span is one raw token found in a text: byte offsets into the original
// string, its position among the tokens, and whether it starts a paragraph.
type Span struct {
	// Start and End are byte offsets of the token in the original text.
	Start, End int
	// Pos is the 0-based position of the token among all tokens.
	Pos int
	// ParaStart is true for the first token after a blank line (and the
	// first token of the text).
	ParaStart bool
}

// Tokenize splits s into word and number tokens and calls fn for each with
// its span and folded form (see Fold and the rules below). It allocates only
// for the folded strings it hands out.
//
// Rules: a token is a run of letters, digits and combining marks. A hyphen or
// apostrophe between two word runes stays inside the token ("o'clock",
// "e-mail", "iso-9001"); a period or comma between two digits too ("3.5",
// "1,200"). Hyphenated words are then split into their parts ("boundary-layer"
// gives "boundary", "layer") unless a part is a single letter ("e-mail" gives
// "email", "x-ray" gives "xray") or a part contains a digit ("iso-9001" and
// "covid-19" stay whole): this keeps compounds searchable by their words while
// codes stay intact. A leading or trailing apostrophe is dropped.
func Tokenize(s string, fn func(sp Span, folded string)) {
	pos := 0
	paraStart := true
	newlines := 0
	i := 0
	for i < len(s) {
		r, w := decodeRune(s, i)
		if !isWordRune(r) {
			if r == '\n' {
				newlines++
				if newlines >= 2 {
					paraStart = true
				}
			}
			i += w
			continue
		}
		start := i
		end := i + w
		prevDigit := unicode.IsDigit(r)
		for end < len(s) {
			r2, w2 := decodeRune(s, end)
			if isWordRune(r2) {
				prevDigit = unicode.IsDigit(r2)
				end += w2
				continue
			}
			joiner := isJoiner(r2) || (prevDigit && (r2 == '.' || r2 == ','))
			if !joiner || end+w2 >= len(s) {
				break
			}
			r3, _ := utf8.DecodeRuneInString(s[end+w2:])
			if !isWordRune(r3) || ((r2 == '.' || r2 == ',') && !unicode.IsDigit(r3)) {
				break
			}
			end += w2
		}
		emit(s, start, end, &pos, &paraStart, fn)
		newlines = 0
		i = end
	}
}

func emit(s string, start, end int, pos *int, paraStart *bool, fn func(Span, string)) {
	raw := s[start:end]
	if !hasHyphen(raw) {
		fn(Span{Start: start, End: end, Pos: *pos, ParaStart: *paraStart}, Fold(raw))
		*pos++
		*paraStart = false
		return
	}
	folded := Fold(raw)
	parts := strings.Split(folded, "-")
	keepWhole, join := false, false
	for _, p := range parts {
		if strings.IndexFunc(p, unicode.IsDigit) >= 0 {
			keepWhole = true
		}
		if utf8.RuneCountInString(p) == 1 {
			join = true
		}
	}
	switch {
	case keepWhole:
		fn(Span{Start: start, End: end, Pos: *pos, ParaStart: *paraStart}, folded)
		*pos++
		*paraStart = false
	case join:
		fn(Span{Start: start, End: end, Pos: *pos, ParaStart: *paraStart}, strings.Join(parts, ""))
		*pos++
		*paraStart = false
	default:
		// Split: report each part with its own byte span in the original.
		off := start
		rest := raw
		for rest != "" {
			j := strings.IndexAny(rest, "-\u2010\u2011")
			part := rest
			if j >= 0 {
				part = rest[:j]
			}
			if part != "" {
				fn(Span{Start: off, End: off + len(part), Pos: *pos, ParaStart: *paraStart}, Fold(part))
				*pos++
				*paraStart = false
			}
			if j < 0 {
				break
			}
			_, w := utf8.DecodeRuneInString(rest[j:])
			off += j + w
			rest = rest[j+w:]
		}
	}
}

// decodeRune is utf8.DecodeRuneInString(s[i:]) with a fast path for ASCII,
// which most text is.
func decodeRune(s string, i int) (rune, int) {
	if c := s[i]; c < utf8.RuneSelf {
		return rune(c), 1
	}
	return utf8.DecodeRuneInString(s[i:])
}

// hasHyphen reports whether raw holds a hyphen-minus or U+2010/U+2011; both
// of those encode with a leading E2 byte, so most words need only two byte
// scans.
func hasHyphen(raw string) bool {
	return strings.IndexByte(raw, '-') >= 0 ||
		strings.IndexByte(raw, 0xE2) >= 0 && strings.ContainsAny(raw, "\u2010\u2011")
}

// Words returns the folded tokens of s, a convenience for tests and tools.
func Words(s string) []string {
	var out []string
	Tokenize(s, func(_ Span, f string) { out = append(out, f) })
	return out
}

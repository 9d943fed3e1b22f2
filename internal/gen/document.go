package gen

import (
	"math"
	"math/rand/v2"
	"strconv"
	"time"
)

// Language is the Snowball language name every generated document carries.
const Language = "english"

// Modified dates are uniform over [modifiedFrom, modifiedTo), that is
// 2024 to 2026 inclusive, whole seconds, UTC.
var (
	modifiedFrom = time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC)
	modifiedTo   = time.Date(2027, 1, 1, 0, 0, 0, 0, time.UTC)
)

// Shape of a document body and title.
const (
	lengthSigma     = 0.45 // sigma of log(length)
	minLength       = 30   // words; upper clamp is 6*MeanWords
	minParagraph    = 40   // words
	maxParagraph    = 120  // words
	minSentence     = 6    // words
	maxSentence     = 18   // words
	phraseRate      = 0.12 // probability that a sentence carries a phrase
	titlePhraseRate = 0.25 // probability that a title carries a phrase
	connectorRate   = 0.15 // probability of a function word inside a title
	ctxEvery        = 256  // documents between context checks
)

var titleConnectors = []string{"of", "and", "for", "the", "in"}

// state is the reusable per-call scratch space: the random source (reseeded
// for every document, so a document depends only on Seed and its index)
// and the title and body buffers.
type state struct {
	rng
	norm  *rand.Rand
	title []byte
	body  []byte
	id    []byte
}

func (g *Generator) newState() *state {
	st := &state{
		title: make([]byte, 0, 128),
		body:  make([]byte, 0, 16*g.opts.MeanWords),
		id:    make([]byte, 0, 16),
	}
	st.norm = rand.New(&st.pcg)
	return st
}

// meta is what render decides about a document besides its text.
type meta struct {
	dept     *department
	group    int // index into Options.Groups; -1 for an open document
	modified int64
}

// render fills st.id, st.title and st.body for document i and returns the
// rest of its metadata.
func (g *Generator) render(i int, st *state) meta {
	st.seed(g.opts.Seed, mix64(uint64(i)))
	m := meta{dept: &g.depts[st.intn(len(g.depts))], group: -1}
	if st.float64() < g.opts.RestrictedShare {
		m.group = st.intn(len(g.opts.Groups))
	}
	from := modifiedFrom.Unix()
	m.modified = from + int64(st.intn(int(modifiedTo.Unix()-from)))
	n := g.length(st)
	canaryAt, canary := -1, ""
	if m.group >= 0 && g.canary[m.group] != "" && st.float64() < CanaryShare {
		canaryAt, canary = st.intn(n), g.canary[m.group]
	}
	st.id = appendID(st.id[:0], i)
	st.title = g.appendTitle(st.title[:0], st, m.dept)
	st.body = g.appendBody(st.body[:0], st, m.dept, n, canaryAt, canary)
	return m
}

// appendID appends "gen-" and the 1-based index, zero-padded to 6 digits.
func appendID(b []byte, i int) []byte {
	var tmp [20]byte
	digits := strconv.AppendInt(tmp[:0], int64(i+1), 10)
	b = append(b, "gen-"...)
	for range 6 - len(digits) {
		b = append(b, '0')
	}
	return append(b, digits...)
}

// length draws a body length: lognormal with mean MeanWords, clamped.
func (g *Generator) length(st *state) int {
	mu := math.Log(float64(g.opts.MeanWords)) - lengthSigma*lengthSigma/2
	n := int(math.Round(math.Exp(mu + lengthSigma*st.norm.NormFloat64())))
	return min(max(n, minLength), 6*g.opts.MeanWords)
}

// draw returns the rank of one body token of department d.
func (g *Generator) draw(st *state, d *department) int32 {
	if st.uint64() < g.bandCut {
		return d.band.draw(st.uint64())
	}
	return g.common.draw(st.uint64())
}

func (st *state) pickPhrase(d *department) []int32 {
	u := st.float64()
	for k, c := range d.phraseCum {
		if u < c {
			return d.phrases[k]
		}
	}
	return d.phrases[len(d.phrases)-1]
}

func (g *Generator) appendTitle(b []byte, st *state, d *department) []byte {
	n := 3 + st.intn(6)
	var ph []int32
	phraseAt, last := -1, int32(-1)
	if st.float64() < titlePhraseRate {
		ph = st.pickPhrase(d)
		phraseAt = st.intn(n - len(ph) + 1)
	}
	for j := 0; j < n; {
		if j > 0 {
			b = append(b, ' ')
		}
		if j == phraseAt {
			b = g.appendPhrase(b, ph, true)
			j += len(ph)
			last = ph[len(ph)-1]
			continue
		}
		if j > 0 && j < n-1 && st.float64() < connectorRate {
			b = append(b, st.pick(titleConnectors)...)
			last = -1
		} else {
			r := d.band.draw(st.uint64())
			for try := 0; r == last && try < 3; try++ { // no "Ge Ge"
				r = d.band.draw(st.uint64())
			}
			b = appendCapitalized(b, g.words[r])
			last = r
		}
		j++
	}
	return b
}

func (g *Generator) appendPhrase(b []byte, ph []int32, capitalize bool) []byte {
	for t, r := range ph {
		if t > 0 {
			b = append(b, ' ')
		}
		if capitalize {
			b = appendCapitalized(b, g.words[r])
		} else {
			b = append(b, g.words[r]...)
		}
	}
	return b
}

// appendBody writes n words in paragraphs of 40-120 words (a body shorter
// than 40 words is one paragraph) separated by blank lines. The word at
// position canaryAt, if any, is the canary term.
func (g *Generator) appendBody(b []byte, st *state, d *department, n, canaryAt int, canary string) []byte {
	k := 1
	if kmin, kmax := (n+maxParagraph-1)/maxParagraph, n/minParagraph; kmax > 1 {
		k = kmin + st.intn(kmax-kmin+1)
	}
	pos := 0
	for p := range k {
		size := n - pos
		if m := k - p; m > 1 {
			lo := max(minParagraph, size-maxParagraph*(m-1))
			hi := min(maxParagraph, size-minParagraph*(m-1))
			size = lo + st.intn(hi-lo+1)
		}
		if p > 0 {
			b = append(b, '\n', '\n')
		}
		b = g.appendParagraph(b, st, d, size, &pos, canaryAt, canary)
	}
	return b
}

// appendParagraph writes size words as sentences of 6-18 words (the last
// may run to 20), each capitalised and ending in a full stop; *pos counts
// body words written so far.
func (g *Generator) appendParagraph(b []byte, st *state, d *department, size int, pos *int, canaryAt int, canary string) []byte {
	for left := size; left > 0; {
		s := minSentence + st.intn(maxSentence-minSentence+1)
		if s > left || left-s < 3 {
			s = left
		}
		var ph []int32
		phraseAt := -1
		if st.float64() < phraseRate && (canaryAt < *pos || canaryAt >= *pos+s) {
			if ph = st.pickPhrase(d); len(ph) <= s {
				phraseAt = st.intn(s - len(ph) + 1)
			}
		}
		for j := 0; j < s; {
			if j > 0 {
				b = append(b, ' ')
			}
			switch {
			case j == phraseAt:
				start := len(b)
				b = g.appendPhrase(b, ph, false)
				if j == 0 && b[start] >= 'a' && b[start] <= 'z' {
					b[start] -= 'a' - 'A'
				}
				j += len(ph)
				*pos += len(ph)
				continue
			case *pos == canaryAt:
				b = append(b, canary...)
			case j == 0:
				b = appendCapitalized(b, g.words[g.draw(st, d)])
			default:
				b = append(b, g.words[g.draw(st, d)]...)
			}
			j++
			*pos++
		}
		b = append(b, '.')
		if left -= s; left > 0 {
			b = append(b, ' ')
		}
	}
	return b
}

package gen

import (
	"math/bits"
	"math/rand/v2"
	"slices"
)

// functionWords take the top ranks of every vocabulary, in roughly their
// English frequency order, so that stopword handling has real work to do.
var functionWords = []string{
	"the", "of", "and", "to", "a", "in", "is", "for", "that", "on",
	"with", "as", "by", "it", "be", "are", "at", "from", "or", "this",
	"an", "will", "not", "which", "have", "has", "all", "can", "should", "must",
	"each", "its", "we", "our", "their", "any", "into", "under", "per", "than",
}

func isFunctionWord(w string) bool { return slices.Contains(functionWords, w) }

// Syllable parts. A syllable is onset + nucleus + coda. Simple parts are
// common and clusters rare, and only the last syllable of a word may take a
// heavy coda, which keeps junctions such as "tar|vel" or "mos|trane"
// pronounceable.
var (
	singleOnsets  = []string{"b", "c", "d", "f", "g", "h", "j", "k", "l", "m", "n", "p", "r", "s", "t", "v", "w", "z"}
	clusterOnsets = []string{"br", "ch", "dr", "fl", "gr", "pl", "pr", "sh", "sk", "st", "th", "tr"}
	vowels        = []string{"a", "e", "i", "o", "u"}
	digraphs      = []string{"ai", "ea", "ee", "oa", "ou"}
	lightCodas    = []string{"", "", "", "", "n", "r", "l", "s", "m"}
	finalCodas    = []string{"", "n", "r", "l", "s", "m", "nd", "rt", "st", "ck", "x", "ne", "ve", "th", "ke", "ll"}
)

// Streams of the seed used for the lexicon and the topic layout; documents
// use stream mix64(index) instead, so the three never overlap in practice.
const (
	lexiconStream = 0x6c657869636f6e31 // "lexicon1"
	topicStream   = 0x746f706963733031 // "topics01"
)

// rng is a thin wrapper around a PCG source with the few derived draws the
// generator needs; it never allocates.
type rng struct{ pcg rand.PCG }

func (r *rng) seed(a, b uint64) { r.pcg.Seed(a, b) }

func (r *rng) uint64() uint64 { return r.pcg.Uint64() }

// intn returns a value in [0, n) by multiply-shift (Lemire 2019); the bias,
// below n/2^64, is irrelevant here.
func (r *rng) intn(n int) int {
	hi, _ := bits.Mul64(r.pcg.Uint64(), uint64(n))
	return int(hi)
}

// float64 returns a value in [0, 1) with 53 random bits.
func (r *rng) float64() float64 { return float64(r.pcg.Uint64()>>11) * 0x1p-53 }

// pick returns a random element of s.
func (r *rng) pick(s []string) string { return s[r.intn(len(s))] }

// buildLexicon returns size distinct lowercase words in rank order: the
// function words first, then pseudo-words. Frequent ranks get shorter
// words, as in natural language (Zipf 1949, law of abbreviation). Words in reserved are never produced.
func buildLexicon(seed uint64, size int, reserved map[string]bool) []string {
	words := make([]string, 0, size)
	seen := make(map[string]bool, size+len(reserved))
	for w := range reserved {
		seen[w] = true
	}
	for _, w := range functionWords {
		words = append(words, w)
		seen[w] = true
	}
	var r rng
	r.seed(seed, lexiconStream)
	buf := make([]byte, 0, 32)
	for len(words) < size {
		rank := len(words)
		buf = appendPseudoWord(buf[:0], &r, syllableCount(&r, rank))
		if seen[string(buf)] {
			continue
		}
		w := string(buf)
		seen[w] = true
		words = append(words, w)
	}
	return words
}

// syllableCount chooses the word length for a rank: 1-2 syllables near
// the top, 2-4 in the long tail.
func syllableCount(r *rng, rank int) int {
	u := r.float64()
	switch {
	case rank < 500:
		if u < 0.4 {
			return 1
		}
		return 2
	case rank < 5000:
		if u < 0.75 {
			return 2
		}
		return 3
	default:
		if u < 0.55 {
			return 2
		}
		return 3
	}
}

func appendPseudoWord(b []byte, r *rng, syllables int) []byte {
	for s := 0; s < syllables; s++ {
		u := r.float64()
		switch {
		case s == 0 && u < 0.12: // vowel-initial word
		case (s == 0 && u < 0.35) || u < 0.12:
			b = append(b, r.pick(clusterOnsets)...)
		default:
			b = append(b, r.pick(singleOnsets)...)
		}
		if r.float64() < 0.2 {
			b = append(b, r.pick(digraphs)...)
		} else {
			b = append(b, r.pick(vowels)...)
		}
		if s == syllables-1 {
			b = append(b, r.pick(finalCodas)...)
		} else {
			b = append(b, r.pick(lightCodas)...)
		}
	}
	return b
}

// appendCapitalized appends w with its first ASCII letter upper-cased.
func appendCapitalized(b []byte, w string) []byte {
	if w == "" {
		return b
	}
	c := w[0]
	if c >= 'a' && c <= 'z' {
		c -= 'a' - 'A'
	}
	b = append(b, c)
	return append(b, w[1:]...)
}

// mix64 is the SplitMix64 finaliser (Steele, Lea & Flood 2014), used to
// turn a document index into a well-spread PCG stream.
func mix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

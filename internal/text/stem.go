package text

import (
	"errors"
	"fmt"
	"sort"
	"sync"
	"sync/atomic"

	"github.com/kljensen/snowball"
)

// English is the default language.
const English = "english"

// Languages lists the Snowball languages the stemmer supports.
var Languages = []string{"english", "french", "hungarian", "norwegian", "russian", "spanish", "swedish"}

// ErrLanguage is returned for a language the stemmer does not support.
var ErrLanguage = errors.New("text: unsupported language")

// ValidLanguage reports whether lang is one of Languages.
func ValidLanguage(lang string) bool {
	for _, l := range Languages {
		if l == lang {
			return true
		}
	}
	return false
}

// Stemmer is a memoising Snowball stemmer for one language, safe for
// concurrent use. Stemming costs about a microsecond a token; the memo turns
// the repeat tokens of a corpus (most of them) into a map lookup.
type Stemmer struct {
	lang string
	memo sync.Map // string -> string
	size atomic.Int64
}

// memoLimit caps the memo (entries) so that a corpus full of unique tokens
// (codes, typos) cannot grow it without bound; past it, stems are computed.
const memoLimit = 1 << 21

// NewStemmer returns a stemmer for a Snowball language name ("" = English).
func NewStemmer(lang string) (*Stemmer, error) {
	if lang == "" {
		lang = English
	}
	if !ValidLanguage(lang) {
		return nil, fmt.Errorf("%w: %q (supported: %v)", ErrLanguage, lang, Languages)
	}
	return &Stemmer{lang: lang}, nil
}

// Language returns the stemmer's language.
func (s *Stemmer) Language() string { return s.lang }

// Stem returns the Snowball stem of the folded word w. Stopwords are stemmed
// too (the library's option to leave them alone is off), so Stem agrees with
// the Snowball reference vocabulary word for word.
func (s *Stemmer) Stem(w string) string {
	if v, ok := s.memo.Load(w); ok {
		return v.(string)
	}
	st, err := snowball.Stem(w, s.lang, true)
	if err != nil {
		st = w // unreachable: the language was validated
	}
	if s.size.Load() < memoLimit {
		if _, loaded := s.memo.LoadOrStore(w, st); !loaded {
			s.size.Add(1)
		}
	}
	return st
}

func sortStrings(s []string) { sort.Strings(s) }

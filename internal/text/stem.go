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
	// read is the published memo, never modified once stored, so lookups
	// take no lock; new stems collect in dirty and are published in bulk
	// (copy on write) once dirty holds a quarter of read's size. A corpus's
	// vocabulary settles quickly, so copies become rare.
	read  atomic.Pointer[map[string]string]
	mu    sync.Mutex
	dirty map[string]string
	size  int
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
	if m := s.read.Load(); m != nil {
		if v, ok := (*m)[w]; ok {
			return v
		}
	}
	s.mu.Lock()
	v, ok := s.dirty[w]
	s.mu.Unlock()
	if ok {
		return v
	}
	st, err := snowball.Stem(w, s.lang, true)
	if err != nil {
		st = w // unreachable: the language was validated
	}
	s.remember(w, st)
	return st
}

// remember adds a stem to the memo, publishing a new read map when enough
// new entries have gathered.
func (s *Stemmer) remember(w, st string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.size >= memoLimit {
		return
	}
	if s.dirty == nil {
		s.dirty = map[string]string{}
	}
	if _, ok := s.dirty[w]; ok {
		return
	}
	s.dirty[w] = st
	s.size++
	old := s.read.Load()
	n := 0
	if old != nil {
		n = len(*old)
	}
	if len(s.dirty) < max(64, n/4) {
		return
	}
	m := make(map[string]string, n+len(s.dirty))
	if old != nil {
		for k, v := range *old {
			m[k] = v
		}
	}
	for k, v := range s.dirty {
		m[k] = v
	}
	s.read.Store(&m)
	s.dirty = nil
}

func sortStrings(s []string) { sort.Strings(s) }

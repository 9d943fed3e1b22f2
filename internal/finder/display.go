package finder

import (
	"strings"

	"kinword/internal/access"
)

// DisplayKey is how a stem key or a canonical query key reads to people:
// the key as a phrase, or else each word, in its commonest surface form
// among the open documents (a key no open document holds stays as it is).
// It serves the admin's review, which shows words, never stems, where
// words can be shown.
func (f *Finder) DisplayKey(key string) string {
	s, err := f.acquire()
	if err != nil {
		return key
	}
	defer s.release()
	view := s.h.ix.View(access.Anonymous)
	if d := view.Display(key); d != "" && d != key {
		return d
	}
	words := strings.Fields(key)
	for i, w := range words {
		if d := view.Display(w); d != "" {
			words[i] = d
		}
	}
	return strings.Join(words, " ")
}

// Visible reports whether viewer v may read a document holding key: a
// stem, a phrase key, or a canonical query key (then every word of it must
// be in some readable document). The librarian's and admin's desks show
// only such terms, as the search page does.
func (f *Finder) Visible(v access.Viewer, key string) bool {
	s, err := f.acquire()
	if err != nil {
		return false
	}
	defer s.release()
	view := s.h.ix.View(v)
	if view.KeyDF(key) > 0 {
		return true
	}
	words := strings.Fields(key)
	if len(words) < 2 {
		return false
	}
	for _, w := range words {
		if view.KeyDF(w) == 0 {
			return false
		}
	}
	return true
}

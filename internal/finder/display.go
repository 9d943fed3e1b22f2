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

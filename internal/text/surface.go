package text

import (
	"sort"
	"strings"
	"sync"
)

// Surfaces records, for each stem, how often each surface form was seen, so
// that suggestions show "breaks" or "break" rather than the stem "break" or
// "reimburs". It is safe for concurrent use.
type Surfaces struct {
	mu sync.Mutex
	m  map[string]map[string]uint32
}

// NewSurfaces returns an empty table.
func NewSurfaces() *Surfaces { return &Surfaces{m: make(map[string]map[string]uint32)} }

// Add counts one sighting of surface for stem.
func (s *Surfaces) Add(stem, surface string) { s.AddN(stem, surface, 1) }

// AddN counts n sightings of surface for stem.
func (s *Surfaces) AddN(stem, surface string, n uint32) {
	s.mu.Lock()
	f := s.m[stem]
	if f == nil {
		f = make(map[string]uint32, 2)
		s.m[stem] = f
	}
	f[surface] += n
	s.mu.Unlock()
}

// Form is one surface form with its count.
type Form struct {
	Surface string `json:"surface"`
	Count   uint32 `json:"count"`
}

// Forms returns the forms of stem, most frequent first (ties: shorter, then
// alphabetical), so output is deterministic.
func (s *Surfaces) Forms(stem string) []Form {
	s.mu.Lock()
	f := s.m[stem]
	out := make([]Form, 0, len(f))
	for w, c := range f {
		out = append(out, Form{w, c})
	}
	s.mu.Unlock()
	sort.Slice(out, func(i, j int) bool {
		a, b := out[i], out[j]
		if a.Count != b.Count {
			return a.Count > b.Count
		}
		if len(a.Surface) != len(b.Surface) {
			return len(a.Surface) < len(b.Surface)
		}
		return a.Surface < b.Surface
	})
	return out
}

// Display returns the most common surface form of stem, or the stem itself
// when it was never seen. For a phrase key ("main break") it displays each
// word.
func (s *Surfaces) Display(key string) string {
	if strings.IndexByte(key, ' ') >= 0 {
		parts := strings.Fields(key)
		for i, p := range parts {
			parts[i] = s.Display(p)
		}
		return strings.Join(parts, " ")
	}
	if f := s.Forms(key); len(f) > 0 {
		return f[0].Surface
	}
	return key
}

// Len returns the number of stems recorded.
func (s *Surfaces) Len() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	return len(s.m)
}

// Each calls fn for every stem and form in sorted order (for persistence).
func (s *Surfaces) Each(fn func(stem, surface string, n uint32)) {
	s.mu.Lock()
	stems := make([]string, 0, len(s.m))
	for st := range s.m {
		stems = append(stems, st)
	}
	s.mu.Unlock()
	sort.Strings(stems)
	for _, st := range stems {
		for _, f := range s.Forms(st) {
			fn(st, f.Surface, f.Count)
		}
	}
}

// Merge adds every count of o into s.
func (s *Surfaces) Merge(o *Surfaces) {
	o.Each(func(stem, surface string, n uint32) { s.AddN(stem, surface, n) })
}

package index

import (
	"errors"
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"

	"kinword/internal/text"
)

// ErrBadQuery reports a query that cannot be searched (empty after
// analysis, over-long, too many terms, invalid UTF-8).
var ErrBadQuery = errors.New("index: bad query")

// QueryLimits bound what a query may ask for.
type QueryLimits struct {
	// MaxBytes is the longest query accepted; default 512.
	MaxBytes int
	// MaxTerms is the most distinct terms and phrases; default 32.
	MaxTerms int
}

func (l QueryLimits) resolve() QueryLimits {
	if l.MaxBytes <= 0 {
		l.MaxBytes = 512
	}
	if l.MaxTerms <= 0 {
		l.MaxTerms = 32
	}
	return l
}

// ParseQuery turns a searcher's text into weighted query terms through the
// shared pipeline. Words become stems; text in double quotes becomes one
// phrase key ("main break"); a term given twice gets weight 2. Terms are
// returned sorted by key so equal queries are equal.
func ParseQuery(p *text.Pipeline, s string, lim QueryLimits) ([]QueryTerm, error) {
	lim = lim.resolve()
	if !utf8.ValidString(s) {
		return nil, fmt.Errorf("%w: not valid UTF-8", ErrBadQuery)
	}
	if len(s) > lim.MaxBytes {
		return nil, fmt.Errorf("%w: %d bytes, the limit is %d", ErrBadQuery, len(s), lim.MaxBytes)
	}
	weights := map[string]float64{}
	for i, part := range strings.Split(s, `"`) {
		if i%2 == 1 { // inside quotes
			if key := p.Key(part, ""); key != "" {
				weights[key]++
			}
			continue
		}
		for _, st := range p.Terms(part, "") {
			weights[st]++
		}
	}
	if len(weights) == 0 {
		return nil, fmt.Errorf("%w: no searchable words in %q: every word is too common to search on (or has no letters or digits); add a more specific word", ErrBadQuery, s)
	}
	if len(weights) > lim.MaxTerms {
		return nil, fmt.Errorf("%w: %d terms, the limit is %d", ErrBadQuery, len(weights), lim.MaxTerms)
	}
	out := make([]QueryTerm, 0, len(weights))
	for k, w := range weights {
		out = append(out, QueryTerm{Key: k, Weight: w})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Key < out[j].Key })
	return out, nil
}

package index

import (
	"strings"

	"kinword/internal/text"
)

// Mark is a highlighted byte range of a snippet's text.
type Mark struct {
	Start int `json:"start"`
	End   int `json:"end"`
}

// Snippet is a short passage of a document around the query's matches.
type Snippet struct {
	Text  string `json:"text"`
	Marks []Mark `json:"marks,omitempty"`
}

// Render returns the snippet with each mark wrapped in open and close.
func (s Snippet) Render(open, close string) string {
	var b strings.Builder
	last := 0
	for _, m := range s.Marks {
		b.WriteString(s.Text[last:m.Start])
		b.WriteString(open)
		b.WriteString(s.Text[m.Start:m.End])
		b.WriteString(close)
		last = m.End
	}
	b.WriteString(s.Text[last:])
	return b.String()
}

// MakeSnippet picks the window of about width tokens of body holding the
// most distinct query stems (earliest on ties) and marks the matches. With
// no match it returns the opening words.
func MakeSnippet(p *text.Pipeline, body, lang string, q []QueryTerm, width int) Snippet {
	if width <= 0 {
		width = 30
	}
	want := map[string]bool{}
	for _, qt := range q {
		for _, part := range splitKey(qt.Key) {
			want[part] = true
		}
	}
	// all holds every token's byte range (compact: a snippet is built for
	// each of a page's results, and only the window's ends are read).
	all := make([][2]int32, 0, len(body)/6+1)
	var hits []snipHit
	p.Scan(body, lang, func(sp text.Span, _, stem string) {
		all = append(all, [2]int32{int32(sp.Start), int32(sp.End)})
		if stem != "" && want[stem] {
			hits = append(hits, snipHit{sp.Start, sp.End, sp.Pos, stem})
		}
	})
	if len(all) == 0 {
		return Snippet{}
	}
	from := 0
	if len(hits) > 0 {
		best, bestN := 0, -1
		for i := range hits {
			seen := map[string]bool{}
			for j := i; j < len(hits) && hits[j].pos < hits[i].pos+width; j++ {
				seen[hits[j].stem] = true
			}
			if len(seen) > bestN {
				best, bestN = i, len(seen)
			}
		}
		from = max(0, hits[best].pos-width/4)
	}
	to := min(len(all), from+width)
	start, end := int(all[from][0]), int(all[to-1][1])
	var s Snippet
	s.Text = strings.Join(strings.Fields(body[start:end]), " ")
	if from > 0 {
		s.Text = "… " + s.Text
	}
	if to < len(all) {
		s.Text += " …"
	}
	s.Marks = remark(s.Text, body, hits, start, end)
	return s
}

type snipHit struct {
	start, end, pos int
	stem            string
}

// remark finds the marked words, in order, in the whitespace-collapsed
// snippet text.
func remark(collapsed, body string, hits []snipHit, start, end int) []Mark {
	var out []Mark
	cur := 0
	for _, h := range hits {
		if h.start < start || h.end > end {
			continue
		}
		w := body[h.start:h.end]
		i := strings.Index(collapsed[cur:], w)
		if i < 0 {
			continue
		}
		out = append(out, Mark{cur + i, cur + i + len(w)})
		cur += i + len(w)
	}
	return out
}

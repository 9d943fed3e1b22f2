package text

import (
	"strings"
	"sync"
)

// MaxTokenBytes is the longest token kept; longer runs (base64, hashes,
// garbage) are dropped as noise.
const MaxTokenBytes = 64

// Token is one indexed term occurrence.
type Token struct {
	// Surface is the folded word as written ("breaks").
	Surface string
	// Stem is its Snowball stem ("break"): the indexed term.
	Stem string
	// Start and End are byte offsets in the analysed text.
	Start, End int
	// Pos is the position among all tokens, stopwords included, so phrase
	// adjacency survives stopword removal ("rate of return": 0 and 2).
	Pos int
	// ParaStart marks the first kept token of a paragraph.
	ParaStart bool
}

// Pipeline analyses text the same way everywhere: tokenize, fold, drop
// stopwords and noise, stem. It is safe for concurrent use; its stemmers
// memoise across calls.
type Pipeline struct {
	mu       sync.RWMutex
	stemmers map[string]*Stemmer
	def      string
}

// NewPipeline returns a pipeline whose default language is lang ("" means
// English). It fails for a language the stemmer does not support.
func NewPipeline(lang string) (*Pipeline, error) {
	if lang == "" {
		lang = English
	}
	st, err := NewStemmer(lang)
	if err != nil {
		return nil, err
	}
	return &Pipeline{stemmers: map[string]*Stemmer{lang: st}, def: lang}, nil
}

// DefaultLanguage returns the language used when a document names none.
func (p *Pipeline) DefaultLanguage() string { return p.def }

// stemmer returns the memoising stemmer for lang, falling back to the
// default language for "" or an unsupported name.
func (p *Pipeline) stemmer(lang string) *Stemmer {
	if lang == "" {
		lang = p.def
	}
	p.mu.RLock()
	st := p.stemmers[lang]
	p.mu.RUnlock()
	if st != nil {
		return st
	}
	st, err := NewStemmer(lang)
	if err != nil {
		return p.stemmer(p.def)
	}
	p.mu.Lock()
	if prev := p.stemmers[lang]; prev != nil {
		st = prev
	} else {
		p.stemmers[lang] = st
	}
	p.mu.Unlock()
	return st
}

// Keep reports whether a folded token is indexed in lang: not a stopword,
// not over-long.
func (p *Pipeline) Keep(folded, lang string) bool {
	if len(folded) > MaxTokenBytes || folded == "" {
		return false
	}
	return !StopwordsFor(p.lang(lang)).Has(folded)
}

func (p *Pipeline) lang(l string) string {
	if l == "" {
		return p.def
	}
	return l
}

// Stem returns the stem of a folded word in lang.
func (p *Pipeline) Stem(folded, lang string) string { return p.stemmer(lang).Stem(folded) }

// Analyze calls fn for every kept token of s in lang ("" = default).
// A paragraph start on a dropped token passes to the next kept one.
func (p *Pipeline) Analyze(s, lang string, fn func(Token)) {
	pendingPara := false
	p.Scan(s, lang, func(sp Span, folded, stem string) {
		if sp.ParaStart {
			pendingPara = true
		}
		if stem == "" {
			return
		}
		fn(Token{Surface: folded, Stem: stem, Start: sp.Start, End: sp.End, Pos: sp.Pos, ParaStart: pendingPara})
		pendingPara = false
	})
}

// Scan calls fn for every token of s in order with its span, folded form
// and stem, the stem empty for the tokens the pipeline drops (stopwords and
// over-long tokens): the one place that rule lives. Analyze keeps the
// stemmed ones; snippets place a window over all tokens and mark the
// matching ones in one pass over the text.
func (p *Pipeline) Scan(s, lang string, fn func(sp Span, folded, stem string)) {
	st := p.stemmer(lang)
	stop := StopwordsFor(st.Language())
	Tokenize(s, func(sp Span, folded string) {
		if len(folded) > MaxTokenBytes || stop.Has(folded) {
			fn(sp, folded, "")
			return
		}
		fn(sp, folded, st.Stem(folded))
	})
}

// Terms returns the stems of s in order, stopwords removed: the form a
// query takes.
func (p *Pipeline) Terms(s, lang string) []string {
	var out []string
	p.Analyze(s, lang, func(t Token) { out = append(out, t.Stem) })
	return out
}

// Key returns the canonical key of a word or phrase: its stems joined by
// single spaces ("Main Breaks" -> "main break"). Suggestions, curation rules
// and the association table all key terms this way.
func (p *Pipeline) Key(s, lang string) string { return strings.Join(p.Terms(s, lang), " ") }

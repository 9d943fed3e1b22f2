package index

import (
	"fmt"
	"sync"

	"github.com/blevesearch/bleve/v2/analysis"
	"github.com/blevesearch/bleve/v2/registry"

	"kinword/internal/text"
)

// analyzerName returns the registered bleve analyzer name for a language.
func analyzerName(lang string) string { return "kinword-" + lang }

// pipelineAnalyzer adapts the shared text pipeline to bleve's Analyzer
// interface, so bleve indexes exactly the stems Kinword scores and mines.
type pipelineAnalyzer struct {
	p    *text.Pipeline
	lang string
}

func (a pipelineAnalyzer) Analyze(input []byte) analysis.TokenStream {
	var ts analysis.TokenStream
	a.p.Analyze(string(input), a.lang, func(t text.Token) {
		ts = append(ts, &analysis.Token{
			Start: t.Start, End: t.End, Term: []byte(t.Stem),
			Position: t.Pos + 1, Type: analysis.AlphaNumeric,
		})
	})
	return ts
}

var (
	registerOnce sync.Once
	registered   *text.Pipeline
)

// registerAnalyzers registers one bleve analyzer per Snowball language. The
// bleve registry is process-global, so the first pipeline registered wins;
// every Kinword pipeline analyses identically for a language, so that is
// safe, and a mismatch in default language is caught by Open.
func registerAnalyzers(p *text.Pipeline) error {
	var err error
	registerOnce.Do(func() {
		registered = p
		for _, lang := range text.Languages {
			lang := lang
			e := registry.RegisterAnalyzer(analyzerName(lang), func(map[string]interface{}, *registry.Cache) (analysis.Analyzer, error) {
				return pipelineAnalyzer{p: registered, lang: lang}, nil
			})
			if e != nil && err == nil {
				err = fmt.Errorf("index: register analyzer: %w", e)
			}
		}
	})
	return err
}

package index

import (
	"context"
	"fmt"

	"github.com/blevesearch/bleve/v2"
	"github.com/blevesearch/bleve/v2/search/query"

	"kinword/internal/access"
)

// accessQuery matches documents open to everyone or to one of v's groups.
func accessQuery(v access.Viewer) query.Query {
	qs := []query.Query{termQuery(fieldGroups, openGroup)}
	for _, g := range v.Groups {
		qs = append(qs, termQuery(fieldGroups, g))
	}
	return query.NewDisjunctionQuery(qs)
}

func termQuery(field, term string) query.Query {
	q := query.NewTermQuery(term)
	q.SetField(field)
	return q
}

// BleveSearch runs bleve's own BM25 top-k search of the words over the
// content field, filtered to what v may read. Kinword ranks with View.Search;
// this exists for comparison (benchmarks and the scoring-difference test).
func (ix *Index) BleveSearch(ctx context.Context, v access.Viewer, words string, k int) ([]Hit, error) {
	mq := query.NewMatchQuery(words)
	mq.SetField(fieldContent)
	mq.Analyzer = analyzerName(ix.p.DefaultLanguage())
	// The access filter must restrict, not score: a boolean query's filter
	// clause does that (a zero boost on a disjunction is ignored by bleve
	// v2.6.3, which let group terms raise restricted documents' scores).
	q := query.NewBooleanQuery([]query.Query{mq}, nil, nil)
	q.AddFilter(accessQuery(v.Normalize()))
	req := bleve.NewSearchRequestOptions(q, k, 0, false)
	res, err := ix.b.SearchInContext(ctx, req)
	if err != nil {
		return nil, fmt.Errorf("index: bleve search: %w", err)
	}
	out := make([]Hit, 0, len(res.Hits))
	for _, h := range res.Hits {
		out = append(out, Hit{ID: h.ID, Score: h.Score})
	}
	return out, nil
}

package index

import (
	"context"
	"fmt"
	"time"

	"github.com/blevesearch/bleve/v2"
	"github.com/blevesearch/bleve/v2/search/query"

	"kinword/internal/doc"
)

// storedDoc rebuilds a document from bleve's stored fields.
func storedDoc(id string, f map[string]interface{}) doc.Document {
	d := doc.Document{ID: id}
	str := func(k string) string {
		if s, ok := f[k].(string); ok {
			return s
		}
		return ""
	}
	d.Title, d.Body, d.URL = str(fieldTitle), str(fieldBody), str(fieldURL)
	d.Department, d.Language = str(fieldDept), str(fieldLang)
	d.Source, d.Hash = str(fieldSource), str(fieldHash)
	switch g := f[fieldGroups].(type) {
	case string:
		if g != openGroup {
			d.Groups = []string{g}
		}
	case []interface{}:
		for _, x := range g {
			if s, ok := x.(string); ok && s != openGroup {
				d.Groups = append(d.Groups, s)
			}
		}
	}
	if m, ok := f[fieldModified].(string); ok {
		d.Modified, _ = time.Parse(time.RFC3339, m)
	}
	return d
}

// Stored fetches documents' stored fields by number, for result display.
// Only documents readable in the view are returned; others are skipped.
func (w *View) Stored(ctx context.Context, ix *Index, docs []uint32) ([]doc.Document, error) {
	ids := make([]string, 0, len(docs))
	for _, d := range docs {
		if w.CanRead(d) {
			ids = append(ids, w.DocID(d))
		}
	}
	if len(ids) == 0 {
		return nil, nil
	}
	req := bleve.NewSearchRequestOptions(query.NewDocIDQuery(ids), len(ids), 0, false)
	req.Fields = []string{"*"}
	res, err := ix.b.SearchInContext(ctx, req)
	if err != nil {
		return nil, fmt.Errorf("index: stored fields: %w", err)
	}
	byID := make(map[string]doc.Document, len(res.Hits))
	for _, h := range res.Hits {
		byID[h.ID] = storedDoc(h.ID, h.Fields)
	}
	out := make([]doc.Document, 0, len(ids))
	for _, id := range ids {
		if d, ok := byID[id]; ok {
			out = append(out, d)
		}
	}
	return out, nil
}

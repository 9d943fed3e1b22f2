package index

import (
	"time"

	"github.com/blevesearch/bleve/v2/analysis/analyzer/keyword"
	"github.com/blevesearch/bleve/v2/mapping"

	"kinword/internal/doc"
	"kinword/internal/text"
)

// Bleve field names.
const (
	fieldContent  = "content" // title + body, analysed by the pipeline, not stored
	fieldTitle    = "title"
	fieldBody     = "body"
	fieldURL      = "url"
	fieldDept     = "department"
	fieldGroups   = "groups"
	fieldLang     = "language"
	fieldModified = "modified"
	fieldSource   = "source"
	fieldHash     = "hash"
	// openGroup is indexed in fieldGroups for documents open to everyone,
	// so the access filter is one disjunction of group terms.
	openGroup = "_open"
)

// buildMapping returns the bleve mapping: BM25 scoring model, one document
// type per language whose content field uses that language's pipeline
// analyzer, keyword fields for metadata.
func buildMapping() *mapping.IndexMappingImpl {
	im := mapping.NewIndexMapping()
	im.ScoringModel = "bm25"
	im.TypeField = "_type"
	im.DefaultAnalyzer = analyzerName(text.English)
	for _, lang := range text.Languages {
		im.AddDocumentMapping(lang, docMapping(lang))
	}
	im.DefaultMapping = docMapping(text.English)
	return im
}

func docMapping(lang string) *mapping.DocumentMapping {
	dm := mapping.NewDocumentStaticMapping()
	content := mapping.NewTextFieldMapping()
	content.Analyzer = analyzerName(lang)
	content.Store = false
	content.IncludeTermVectors = false
	content.IncludeInAll = false
	dm.AddFieldMappingsAt(fieldContent, content)

	for _, f := range []string{fieldTitle, fieldBody, fieldSource, fieldHash, fieldURL} {
		sm := mapping.NewTextFieldMapping()
		sm.Index = false
		sm.Store = true
		sm.IncludeInAll = false
		sm.IncludeTermVectors = false
		sm.DocValues = false
		dm.AddFieldMappingsAt(f, sm)
	}
	for _, f := range []string{fieldDept, fieldGroups, fieldLang} {
		km := mapping.NewTextFieldMapping()
		km.Analyzer = keyword.Name
		km.Store = true
		km.IncludeInAll = false
		km.IncludeTermVectors = false
		dm.AddFieldMappingsAt(f, km)
	}
	dt := mapping.NewDateTimeFieldMapping()
	dt.IncludeInAll = false
	dm.AddFieldMappingsAt(fieldModified, dt)
	return dm
}

// bleveDoc is the map bleve indexes for a document.
func bleveDoc(d *doc.Document, lang string) map[string]interface{} {
	groups := d.Groups
	if len(groups) == 0 {
		groups = []string{openGroup}
	}
	m := map[string]interface{}{
		"_type":      lang,
		fieldContent: d.Title + "\n\n" + d.Body,
		fieldTitle:   d.Title,
		fieldBody:    d.Body,
		fieldURL:     d.URL,
		fieldDept:    d.Department,
		fieldGroups:  groups,
		fieldLang:    lang,
		fieldSource:  d.Source,
		fieldHash:    d.Hash,
	}
	if !d.Modified.IsZero() {
		m[fieldModified] = d.Modified.UTC().Format(time.RFC3339)
	}
	return m
}

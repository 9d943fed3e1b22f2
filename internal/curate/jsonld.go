package curate

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strings"

	"github.com/piprate/json-gold/ld"
)

// jsonldContext is the context of exported JSON-LD: prefixes only, so the
// compacted form stays plain JSON-LD 1.1 (W3C Recommendation, 16 July 2020).
func jsonldContext() map[string]any {
	return map[string]any{"@context": map[string]any{"skos": skosNS, "kw": KinwordNS, "xsd": xsdNS}}
}

// ExportJSONLD writes rules as a SKOS concept scheme in compacted JSON-LD:
// the triples of ExportNTriples turned into JSON-LD by json-gold (FromRDF,
// then Compact with the skos, kw and xsd prefixes), nodes sorted by @id and
// value arrays sorted, keys sorted, two-space indent. It validates the rules
// first and writes nothing when they fail.
func ExportJSONLD(w io.Writer, rules []Rule, opts Options) error {
	o, err := opts.resolved()
	if err != nil {
		return err
	}
	ts, err := exportTriples(rules, o, "json-ld")
	if err != nil {
		return err
	}
	ds := ld.NewRDFDataset()
	quads := make([]*ld.Quad, len(ts))
	for i, t := range ts {
		quads[i] = ld.NewQuad(toLD(t.s), toLD(t.p), toLD(t.o), "@default")
	}
	ds.Graphs["@default"] = quads
	lo := ldOptions()
	expanded, err := ld.NewJsonLdApi().FromRDF(ds, lo)
	if err != nil {
		return fmt.Errorf("curate: export json-ld: from rdf: %w", err)
	}
	doc, err := ld.NewJsonLdProcessor().Compact(expanded, jsonldContext(), lo)
	if err != nil {
		return fmt.Errorf("curate: export json-ld: compact: %w", err)
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(sortJSON(doc)); err != nil {
		return fmt.Errorf("curate: export json-ld: encode: %w", err)
	}
	if _, err := w.Write(buf.Bytes()); err != nil {
		return fmt.Errorf("curate: export json-ld: %w", err)
	}
	return nil
}

// ImportJSONLD reads SKOS (and Kinword vocabulary) in any JSON-LD form,
// compacted, expanded or flattened, through json-gold's ToRDF, and maps the
// default graph's triples as ImportNTriples does. Remote contexts are never
// fetched: a document that needs one is rejected. All or nothing, like
// ImportNTriples; rejections carry Line 0 and the node or triple as Item.
func ImportJSONLD(r io.Reader, opts Options) ([]Rule, *Report, error) {
	o, rep, b, err := startImport(r, opts, "json-ld")
	if err != nil {
		return nil, rep, err
	}
	var doc any
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.UseNumber()
	if err := dec.Decode(&doc); err != nil {
		rep.reject(0, "document", "not JSON: "+err.Error())
		return rep.result(nil)
	}
	if _, err := dec.Token(); err != io.EOF {
		rep.reject(0, "document", "more than one JSON value")
		return rep.result(nil)
	}
	ds, err := toRDF(doc)
	if err != nil {
		rep.reject(0, "document", "not valid JSON-LD: "+err.Error())
		return rep.result(nil)
	}
	var ts []triple
	for _, g := range sortedKeys(ds.Graphs) {
		if g != "@default" {
			rep.reject(0, clip(g), fmt.Sprintf("a named graph (%d triples): only the default graph is read", len(ds.Graphs[g])))
			continue
		}
		for _, q := range ds.Graphs[g] {
			s, ok1 := fromLD(q.Subject)
			p, ok2 := fromLD(q.Predicate)
			obj, ok3 := fromLD(q.Object)
			if !ok1 || !ok2 || !ok3 || s.kind == literalNode || p.kind != iriNode {
				rep.reject(0, clip(fmt.Sprint(q.Subject, " ", q.Predicate, " ", q.Object)), "not a valid RDF triple")
				continue
			}
			ts = append(ts, triple{s: s, p: p, o: obj})
		}
	}
	return finishImport(importTriples(sortTriples(ts), o, rep), o, rep, true)
}

// toRDF runs json-gold's ToRDF, turning a panic on hostile input into an
// error.
func toRDF(doc any) (ds *ld.RDFDataset, err error) {
	defer func() {
		if r := recover(); r != nil {
			ds, err = nil, fmt.Errorf("json-ld processor failed: %v", r)
		}
	}()
	out, err := ld.NewJsonLdProcessor().ToRDF(doc, ldOptions())
	if err != nil {
		return nil, err
	}
	ds, ok := out.(*ld.RDFDataset)
	if !ok {
		return nil, fmt.Errorf("unexpected result %T", out)
	}
	return ds, nil
}

// ldOptions are json-gold options that never load a document.
func ldOptions() *ld.JsonLdOptions {
	lo := ld.NewJsonLdOptions("")
	lo.ProcessingMode = ld.JsonLd_1_1
	lo.DocumentLoader = noLoader{}
	return lo
}

// noLoader refuses to load remote documents (contexts): imports read only
// what they are given.
type noLoader struct{}

func (noLoader) LoadDocument(u string) (*ld.RemoteDocument, error) {
	return nil, ld.NewJsonLdError(ld.LoadingDocumentFailed, "remote documents are not loaded: "+clip(u))
}

func toLD(n node) ld.Node {
	switch n.kind {
	case iriNode:
		return ld.NewIRI(n.value)
	case blankNode:
		return ld.NewBlankNode("_:" + n.value)
	}
	return ld.NewLiteral(n.value, n.datatype, n.lang)
}

// fromLD converts a json-gold node; false when it is not a valid RDF term.
func fromLD(n ld.Node) (node, bool) {
	switch v := n.(type) {
	case ld.IRI:
		return iri(v.Value), absoluteIRI(v.Value)
	case ld.BlankNode:
		label := strings.TrimPrefix(v.Attribute, "_:")
		return node{kind: blankNode, value: label}, label != ""
	case ld.Literal:
		if v.Language != "" {
			tag := strings.ToLower(v.Language)
			return tagged(v.Value, tag), langTagShape(tag)
		}
		dt := v.Datatype
		if dt == "" {
			dt = xsdString
		}
		return node{kind: literalNode, value: v.Value, datatype: dt}, dt != rdfLangString && absoluteIRI(dt)
	}
	return node{}, false
}

// sortJSON sorts every array of v (JSON-LD sets; no @list is ever
// exported) by the arrays' encoded elements, in place.
func sortJSON(v any) any {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			x[k] = sortJSON(e)
		}
	case []any:
		keys := make([]string, len(x))
		for i, e := range x {
			x[i] = sortJSON(e)
			b, _ := json.Marshal(x[i])
			keys[i] = string(b)
		}
		idx := make([]int, len(x))
		for i := range idx {
			idx[i] = i
		}
		slices.SortStableFunc(idx, func(a, b int) int { return strings.Compare(keys[a], keys[b]) })
		out := make([]any, len(x))
		for i, j := range idx {
			out[i] = x[j]
		}
		return out
	}
	return v
}

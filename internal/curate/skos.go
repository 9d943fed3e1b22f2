package curate

import (
	"net/url"
	"slices"
	"strings"
)

// Vocabularies of the SKOS exchange. SKOS namespace per the SKOS Reference
// (Miles & Bechhofer, W3C Recommendation 18 August 2009, section 1.3; from
// memory).
const (
	skosNS = "http://www.w3.org/2004/02/skos/core#"
	rdfNS  = "http://www.w3.org/1999/02/22-rdf-syntax-ns#"
	xsdNS  = "http://www.w3.org/2001/XMLSchema#"
	// KinwordNS is Kinword's own vocabulary for what SKOS cannot say: pins,
	// blocks, and rules scoped to a department, dated or with a reason.
	KinwordNS = "urn:kinword:vocab#"
	// RuleBase prefixes the IRIs of kw:Rule nodes; ContentID follows.
	RuleBase = "urn:kinword:rule:"

	rdfType       = rdfNS + "type"
	rdfLangString = rdfNS + "langString"
	xsdString     = xsdNS + "string"
	xsdDateTime   = xsdNS + "dateTime"
	skosConcept   = skosNS + "Concept"
	skosScheme    = skosNS + "ConceptScheme"
	skosInScheme  = skosNS + "inScheme"
	skosPrefLabel = skosNS + "prefLabel"
	skosAltLabel  = skosNS + "altLabel"
	skosHidden    = skosNS + "hiddenLabel"
	skosRelated   = skosNS + "related"
	skosBroader   = skosNS + "broader"
	skosNarrower  = skosNS + "narrower"
	kwRule        = KinwordNS + "Rule"
	kwKind        = KinwordNS + "kind"
	kwQuery       = KinwordNS + "query"
	kwTerm        = KinwordNS + "term"
	kwDepartment  = KinwordNS + "department"
	kwStart       = KinwordNS + "start"
	kwExpiry      = KinwordNS + "expiry"
	kwReason      = KinwordNS + "reason"
)

// relationOf maps the SKOS kinds to their semantic relation property.
var relationOf = map[Kind]string{Relate: skosRelated, Broader: skosBroader, Narrower: skosNarrower}

// nodeKind tells IRIs, blank nodes and literals apart.
type nodeKind uint8

const (
	iriNode nodeKind = iota + 1
	blankNode
	literalNode
)

// node is an RDF term. Literals always carry a datatype: xsd:string for
// plain ones, rdf:langString for language-tagged ones (lang in lower case).
type node struct {
	kind     nodeKind
	value    string
	lang     string
	datatype string
}

// triple is an RDF triple with the input line it came from (0 if none).
type triple struct {
	s, p, o node
	line    int
}

func iri(v string) node { return node{kind: iriNode, value: v} }

func plain(v string) node { return node{kind: literalNode, value: v, datatype: xsdString} }

func tagged(v, lang string) node {
	return node{kind: literalNode, value: v, lang: lang, datatype: rdfLangString}
}

func dateTime(v string) node { return node{kind: literalNode, value: v, datatype: xsdDateTime} }

// plainSKOS reports whether r is said in plain SKOS: a use, relate, broader
// or narrower rule for the whole organisation, undated and without a reason.
// Every other rule becomes a kw:Rule node.
func plainSKOS(r Rule) bool {
	return (r.Kind == Use || relationOf[r.Kind] != "") &&
		r.Department == "" && r.Start.IsZero() && r.Expiry.IsZero() && r.Reason == ""
}

// conceptIRI mints the IRI of the concept whose preferred label is label in
// language lang: Base, the tag, "/", then the exact label percent-encoded
// (RFC 3986 path segment). The exact label, not its stem key, keeps export
// and import lossless: "Leak" and "leak" are distinct concepts.
func conceptIRI(base, lang, label string) string {
	return base + lang + "/" + url.PathEscape(label)
}

// exportTriples validates rules and maps them to sorted, distinct triples.
func exportTriples(rules []Rule, o Options, format string) ([]triple, error) {
	if ps := ValidateSet(rules, o.Departments, o.Pipeline); len(ps) > 0 {
		return nil, problemsError(format, ps)
	}
	var ts []triple
	add := func(s, p, obj node) { ts = append(ts, triple{s: s, p: p, o: obj}) }
	concept := func(lang, label string) node {
		c := iri(conceptIRI(o.Base, lang, label))
		add(c, iri(rdfType), iri(skosConcept))
		add(c, iri(skosInScheme), iri(o.Scheme))
		add(c, iri(skosPrefLabel), tagged(label, lang))
		return c
	}
	for _, r := range rules {
		r.ID = ""
		if r.Lang == "" {
			r.Lang = o.Lang
		}
		if plainSKOS(r) {
			t := concept(r.Lang, r.Term)
			if r.Kind == Use {
				add(t, iri(skosAltLabel), tagged(r.Query, r.Lang))
			} else {
				add(concept(r.Lang, r.Query), iri(relationOf[r.Kind]), t)
			}
			continue
		}
		n := iri(RuleBase + ContentID(r))
		add(n, iri(rdfType), iri(kwRule))
		add(n, iri(kwKind), iri(KinwordNS+string(r.Kind)))
		add(n, iri(kwTerm), tagged(r.Term, r.Lang))
		if r.Query != "" {
			add(n, iri(kwQuery), tagged(r.Query, r.Lang))
		}
		if r.Department != "" {
			add(n, iri(kwDepartment), plain(r.Department))
		}
		if !r.Start.IsZero() {
			add(n, iri(kwStart), dateTime(formatTime(r.Start)))
		}
		if !r.Expiry.IsZero() {
			add(n, iri(kwExpiry), dateTime(formatTime(r.Expiry)))
		}
		if r.Reason != "" {
			add(n, iri(kwReason), plain(r.Reason))
		}
	}
	if slices.ContainsFunc(ts, func(t triple) bool { return t.p.value == skosInScheme }) {
		add(iri(o.Scheme), iri(rdfType), iri(skosScheme))
	}
	return sortTriples(ts), nil
}

// sortTriples orders triples by their N-Triples line and drops repeats.
func sortTriples(ts []triple) []triple {
	lines := make(map[string]triple, len(ts))
	keys := make([]string, 0, len(ts))
	for _, t := range ts {
		l := t.String()
		if _, dup := lines[l]; !dup {
			lines[l] = t
			keys = append(keys, l)
		}
	}
	slices.Sort(keys)
	out := make([]triple, len(keys))
	for i, k := range keys {
		out[i] = lines[k]
	}
	return out
}

// String is the triple's N-Triples line, without the line break.
func (t triple) String() string {
	var b strings.Builder
	writeNode(&b, t.s)
	b.WriteByte(' ')
	writeNode(&b, t.p)
	b.WriteByte(' ')
	writeNode(&b, t.o)
	b.WriteString(" .")
	return b.String()
}

package curate

import (
	"fmt"
	"slices"
	"strings"
	"time"
)

// sourced is an imported rule with the input it came from.
type sourced struct {
	Rule
	line int
	item string
}

// subject gathers what the triples say about one subject.
type subject struct {
	id    node
	prefs map[string][]triple // by language
	alts  []triple            // skos:altLabel and skos:hiddenLabel
	rels  []triple            // skos:related, broader, narrower
	kw    map[string][]triple // Kinword properties, by predicate
	typed bool                // rdf:type kw:Rule
}

// importTriples maps triples to rules, recording every rejection in rep:
// skos:altLabel and skos:hiddenLabel give use rules (Query the label, Term
// the concept's skos:prefLabel in the same language); skos:related,
// skos:broader and skos:narrower give relate, broader and narrower rules,
// one per language in which both concepts have a prefLabel; kw:Rule nodes
// give their rule. Other triples are counted in rep.Ignored.
func importTriples(ts []triple, o Options, rep *Report) []sourced {
	subjects := make(map[node]*subject)
	var order []node
	get := func(n node) *subject {
		s := subjects[n]
		if s == nil {
			s = &subject{id: n, prefs: make(map[string][]triple), kw: make(map[string][]triple)}
			subjects[n] = s
			order = append(order, n)
		}
		return s
	}
	for _, t := range ts {
		switch p := t.p.value; {
		case p == skosPrefLabel || p == skosAltLabel || p == skosHidden:
			lang, ok := labelLang(t.o, o.Lang)
			if !ok {
				rep.reject(t.line, t.String(), "a label must be a string literal")
				continue
			}
			s := get(t.s)
			if p != skosPrefLabel {
				s.alts = append(s.alts, t)
			} else if !slices.ContainsFunc(s.prefs[lang], func(x triple) bool { return x.o.value == t.o.value }) {
				s.prefs[lang] = append(s.prefs[lang], t)
			}
		case p == skosRelated || p == skosBroader || p == skosNarrower:
			if t.o.kind == literalNode {
				rep.reject(t.line, t.String(), "a semantic relation must point to a concept, not a literal")
				continue
			}
			get(t.s).rels = append(get(t.s).rels, t)
		case strings.HasPrefix(p, KinwordNS):
			get(t.s).kw[p] = append(get(t.s).kw[p], t)
		case p == rdfType && t.o == iri(kwRule):
			get(t.s).typed = true
		default:
			if rep.Ignored == nil {
				rep.Ignored = make(map[string]int)
			}
			rep.Ignored[p]++
		}
	}
	var out []sourced
	pref := func(s *subject, lang string) (string, bool) {
		if s == nil || len(s.prefs[lang]) != 1 {
			return "", false
		}
		return s.prefs[lang][0].o.value, true
	}
	for _, n := range order {
		s := subjects[n]
		for _, lang := range sortedKeys(s.prefs) {
			if ls := s.prefs[lang]; len(ls) > 1 {
				rep.reject(ls[1].line, ls[1].String(), fmt.Sprintf("a second skos:prefLabel in language %q (SKOS Reference, Miles & Bechhofer 2009, integrity condition S14)", lang))
			}
		}
		for _, t := range s.alts {
			lang, _ := labelLang(t.o, o.Lang)
			term, ok := pref(s, lang)
			if !ok {
				if len(s.prefs[lang]) == 0 {
					rep.reject(t.line, t.String(), fmt.Sprintf("the concept has no skos:prefLabel in language %q", lang))
				}
				continue
			}
			out = append(out, sourced{Rule{Kind: Use, Query: t.o.value, Term: term, Lang: lang}, t.line, t.String()})
		}
		for _, t := range s.rels {
			kind := map[string]Kind{skosRelated: Relate, skosBroader: Broader, skosNarrower: Narrower}[t.p.value]
			found := false
			for _, lang := range sortedKeys(s.prefs) {
				q, ok1 := pref(s, lang)
				term, ok2 := pref(subjects[t.o], lang)
				if ok1 && ok2 {
					found = true
					out = append(out, sourced{Rule{Kind: kind, Query: q, Term: term, Lang: lang}, t.line, t.String()})
				}
			}
			if !found {
				rep.reject(t.line, t.String(), "no language in which both concepts have one skos:prefLabel")
			}
		}
		if len(s.kw) > 0 || s.typed {
			if r, ok := ruleNode(s, o, rep); ok {
				out = append(out, r)
			}
		}
	}
	return out
}

// labelLang returns the language of a label literal (def when untagged),
// and false when the node is no string literal.
func labelLang(n node, def string) (string, bool) {
	switch {
	case n.kind != literalNode:
		return "", false
	case n.datatype == rdfLangString:
		return n.lang, true
	case n.datatype == xsdString:
		return def, true
	}
	return "", false
}

// sortedKeys returns the keys of m in order.
func sortedKeys[V any](m map[string]V) []string {
	ks := make([]string, 0, len(m))
	for k := range m {
		ks = append(ks, k)
	}
	slices.Sort(ks)
	return ks
}

// ruleNode reads a kw:Rule node: exactly one kw:kind and kw:term, at most
// one of every other Kinword property, nothing outside the vocabulary.
func ruleNode(s *subject, o Options, rep *Report) (sourced, bool) {
	line, item := 0, nodeString(s.id)
	for _, ts := range s.kw {
		for _, t := range ts {
			if line == 0 || (t.line > 0 && t.line < line) {
				line = t.line
			}
		}
	}
	bad := func(reason string) (sourced, bool) {
		rep.reject(line, item, reason)
		return sourced{}, false
	}
	for _, p := range sortedKeys(s.kw) {
		switch p {
		case kwKind, kwTerm, kwQuery, kwDepartment, kwStart, kwExpiry, kwReason:
			if len(s.kw[p]) > 1 {
				return bad(fmt.Sprintf("more than one <%s>", p))
			}
		default:
			return bad(fmt.Sprintf("unknown Kinword property <%s>", p))
		}
	}
	one := func(p string) (node, bool) {
		if ts := s.kw[p]; len(ts) == 1 {
			return ts[0].o, true
		}
		return node{}, false
	}
	k, ok := one(kwKind)
	if !ok {
		return bad("a kw:Rule needs one kw:kind")
	}
	kind := Kind(strings.TrimPrefix(k.value, KinwordNS))
	if k.kind != iriNode || !strings.HasPrefix(k.value, KinwordNS) || !kind.Valid() {
		return bad(fmt.Sprintf("kw:kind %s is none of kw:pin, kw:block, kw:relate, kw:use, kw:broader, kw:narrower", clip(nodeString(k))))
	}
	t, ok := one(kwTerm)
	lang, isLabel := labelLang(t, o.Lang)
	if !ok || !isLabel {
		return bad("a kw:Rule needs one kw:term string literal")
	}
	r := Rule{Kind: kind, Term: t.value, Lang: lang}
	if q, ok := one(kwQuery); ok {
		qlang, isLabel := labelLang(q, o.Lang)
		if !isLabel || qlang != lang {
			return bad("kw:query must be a string literal in the language of kw:term")
		}
		r.Query = q.value
	}
	for _, f := range []struct {
		p   string
		dst *string
	}{{kwDepartment, &r.Department}, {kwReason, &r.Reason}} {
		if v, ok := one(f.p); ok {
			if v.kind != literalNode || v.datatype != xsdString {
				return bad(fmt.Sprintf("<%s> must be a plain string literal", f.p))
			}
			*f.dst = v.value
		}
	}
	for _, f := range []struct {
		p   string
		dst *time.Time
	}{{kwStart, &r.Start}, {kwExpiry, &r.Expiry}} {
		if v, ok := one(f.p); ok {
			tm, err := time.Parse(time.RFC3339Nano, v.value)
			if v.kind != literalNode || v.datatype != xsdDateTime || err != nil {
				return bad(fmt.Sprintf("<%s> must be an xsd:dateTime literal with a time zone (RFC 3339)", f.p))
			}
			*f.dst = tm.UTC()
		}
	}
	return sourced{r, line, item}, true
}

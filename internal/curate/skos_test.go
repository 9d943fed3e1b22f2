package curate

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// The W3C SKOS Primer (Isaac & Summers, W3C Working Group Note 18 August
// 2009), section 2.2 (lexical labels: "animals" with alternative label
// "creatures", and French "animaux" / "créatures") and section 2.3
// (semantic relations: "mammals" broader "animals", its inverse narrower,
// "birds" related "ornithology" both ways), written here from memory as
// N-Triples under the Primer's ex: namespace http://www.example.com/. The
// Primer's relation snippets show no labels for mammals, birds and
// ornithology; the prefLabels for them are added so the relations have terms.
const primerNTriples = `# SKOS Primer 2.2 and 2.3, from memory
<http://www.example.com/animals> <http://www.w3.org/1999/02/22-rdf-syntax-ns#type> <http://www.w3.org/2004/02/skos/core#Concept> .
<http://www.example.com/animals> <http://www.w3.org/2004/02/skos/core#prefLabel> "animals"@en .
<http://www.example.com/animals> <http://www.w3.org/2004/02/skos/core#altLabel> "creatures"@en .
<http://www.example.com/animals> <http://www.w3.org/2004/02/skos/core#prefLabel> "animaux"@fr .
<http://www.example.com/animals> <http://www.w3.org/2004/02/skos/core#altLabel> "cr\u00E9atures"@fr .
<http://www.example.com/mammals> <http://www.w3.org/2004/02/skos/core#prefLabel> "mammals"@en .
<http://www.example.com/mammals> <http://www.w3.org/2004/02/skos/core#broader> <http://www.example.com/animals> .
<http://www.example.com/animals> <http://www.w3.org/2004/02/skos/core#narrower> <http://www.example.com/mammals> .
<http://www.example.com/birds> <http://www.w3.org/2004/02/skos/core#prefLabel> "birds"@en .
<http://www.example.com/ornithology> <http://www.w3.org/2004/02/skos/core#prefLabel> "ornithology"@en .
<http://www.example.com/birds> <http://www.w3.org/2004/02/skos/core#related> <http://www.example.com/ornithology> .
<http://www.example.com/ornithology> <http://www.w3.org/2004/02/skos/core#related> <http://www.example.com/birds> .
`

// The same examples as compacted JSON-LD with a Primer-style context.
const primerCompact = `{
  "@context": {"skos": "http://www.w3.org/2004/02/skos/core#", "ex": "http://www.example.com/"},
  "@graph": [
    {"@id": "ex:animals", "@type": "skos:Concept",
     "skos:prefLabel": [{"@value": "animals", "@language": "en"}, {"@value": "animaux", "@language": "fr"}],
     "skos:altLabel": [{"@value": "creatures", "@language": "en"}, {"@value": "créatures", "@language": "fr"}],
     "skos:narrower": {"@id": "ex:mammals"}},
    {"@id": "ex:mammals", "skos:prefLabel": {"@value": "mammals", "@language": "en"}, "skos:broader": {"@id": "ex:animals"}},
    {"@id": "ex:birds", "skos:prefLabel": {"@value": "birds", "@language": "en"}, "skos:related": {"@id": "ex:ornithology"}},
    {"@id": "ex:ornithology", "skos:prefLabel": {"@value": "ornithology", "@language": "en"}, "skos:related": {"@id": "ex:birds"}}
  ]
}`

// And in expanded form (JSON-LD 1.1, section 5.1): full IRIs, no context.
const primerExpanded = `[
  {"@id": "http://www.example.com/animals", "@type": ["http://www.w3.org/2004/02/skos/core#Concept"],
   "http://www.w3.org/2004/02/skos/core#prefLabel": [{"@value": "animals", "@language": "en"}, {"@value": "animaux", "@language": "fr"}],
   "http://www.w3.org/2004/02/skos/core#altLabel": [{"@value": "creatures", "@language": "en"}, {"@value": "créatures", "@language": "fr"}],
   "http://www.w3.org/2004/02/skos/core#narrower": [{"@id": "http://www.example.com/mammals"}]},
  {"@id": "http://www.example.com/mammals",
   "http://www.w3.org/2004/02/skos/core#prefLabel": [{"@value": "mammals", "@language": "en"}],
   "http://www.w3.org/2004/02/skos/core#broader": [{"@id": "http://www.example.com/animals"}]},
  {"@id": "http://www.example.com/birds",
   "http://www.w3.org/2004/02/skos/core#prefLabel": [{"@value": "birds", "@language": "en"}],
   "http://www.w3.org/2004/02/skos/core#related": [{"@id": "http://www.example.com/ornithology"}]},
  {"@id": "http://www.example.com/ornithology",
   "http://www.w3.org/2004/02/skos/core#prefLabel": [{"@value": "ornithology", "@language": "en"}],
   "http://www.w3.org/2004/02/skos/core#related": [{"@id": "http://www.example.com/birds"}]}
]`

// primerRules are the rules the Primer examples must give, in export order.
var primerRules = []string{
	"relate birds -> ornithology @en",
	"relate ornithology -> birds @en",
	"use creatures -> animals @en",
	"use créatures -> animaux @fr",
	"broader mammals -> animals @en",
	"narrower animals -> mammals @en",
}

func ruleLines(rs []Rule) []string {
	out := make([]string, len(rs))
	for i, r := range rs {
		out[i] = fmt.Sprintf("%s %s -> %s @%s", r.Kind, r.Query, r.Term, r.Lang)
	}
	return out
}

func TestImportSKOSPrimer(t *testing.T) {
	cases := []struct {
		name   string
		imp    func(string) ([]Rule, *Report, error)
		ignore int // rdf:type triples
	}{
		{"n-triples", func(s string) ([]Rule, *Report, error) { return ImportNTriples(strings.NewReader(s), Options{}) }, 1},
		{"json-ld compacted", func(s string) ([]Rule, *Report, error) { return ImportJSONLD(strings.NewReader(s), Options{}) }, 1},
		{"json-ld expanded", func(s string) ([]Rule, *Report, error) { return ImportJSONLD(strings.NewReader(s), Options{}) }, 1},
	}
	inputs := []string{primerNTriples, primerCompact, primerExpanded}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rules, rep, err := c.imp(inputs[i])
			if err != nil {
				t.Fatalf("%v (%+v)", err, rep.Rejected)
			}
			if got := ruleLines(rules); strings.Join(got, "\n") != strings.Join(primerRules, "\n") {
				t.Errorf("got\n%s\nwant\n%s", strings.Join(got, "\n"), strings.Join(primerRules, "\n"))
			}
			if rep.Rules != len(primerRules) || rep.Ignored[rdfType] != c.ignore {
				t.Errorf("report %+v", rep)
			}
			for _, r := range rules {
				if r.ID != ContentID(Rule{Kind: r.Kind, Query: r.Query, Term: r.Term, Lang: r.Lang}) {
					t.Errorf("rule %v: ID is not its ContentID", r)
				}
			}
		})
	}
}

func TestImportSKOSRejects(t *testing.T) {
	const (
		ex   = "<http://www.example.com/"
		pref = "> <http://www.w3.org/2004/02/skos/core#prefLabel> "
		alt  = "> <http://www.w3.org/2004/02/skos/core#altLabel> "
		rel  = "> <http://www.w3.org/2004/02/skos/core#related> "
	)
	cases := []struct {
		name, input string
		line        int
		reason      string
	}{
		{"two prefLabels in one language (SKOS Reference S14)", ex + "a" + pref + `"animals"@en .` + "\n" + ex + "a" + pref + `"beasts"@en .`, 2, "S14"},
		{"altLabel without prefLabel in its language", ex + "a" + pref + `"animals"@en .` + "\n" + ex + "a" + alt + `"bêtes"@fr .`, 2, `no skos:prefLabel in language "fr"`},
		{"label that is no literal", ex + "a" + pref + ex + "b> .", 1, "string literal"},
		{"relation to a literal", ex + "a" + rel + `"birds" .`, 1, "not a literal"},
		{"relation without common language", ex + "a" + pref + `"oiseaux"@fr .` + "\n" + ex + "b" + pref + `"ornithology"@en .` + "\n" + ex + "a" + rel + ex + "b> .", 3, "no language"},
		{"label the rules reject", ex + "a" + pref + `"animals"@en .` + "\n" + ex + "a" + alt + `"=cmd()"@en .`, 2, "formula"},
		{"malformed line", ex + "a" + pref + `"animals"@en`, 1, "expected '.'"},
		{"kw:Rule without kind", `<urn:x> <urn:kinword:vocab#term> "leak" .`, 1, "kw:kind"},
		{"unknown Kinword property", `<urn:x> <urn:kinword:vocab#kind> <urn:kinword:vocab#pin> .` + "\n" + `<urn:x> <urn:kinword:vocab#colour> "red" .`, 1, "unknown Kinword property"},
		{"date without time zone", `<urn:x> <urn:kinword:vocab#kind> <urn:kinword:vocab#block> .` + "\n" + `<urn:x> <urn:kinword:vocab#term> "leak" .` + "\n" +
			`<urn:x> <urn:kinword:vocab#start> "2026-01-01T00:00:00"^^<http://www.w3.org/2001/XMLSchema#dateTime> .`, 1, "time zone"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rules, rep, err := ImportNTriples(strings.NewReader(c.input), Options{})
			if !errors.Is(err, ErrImport) || rules != nil {
				t.Fatalf("want ErrImport and no rules, got %v, %d rules", err, len(rules))
			}
			if len(rep.Rejected) == 0 || rep.Rejected[0].Line != c.line || !strings.Contains(rep.Rejected[0].Reason, c.reason) {
				t.Errorf("rejections %+v, want line %d with %q", rep.Rejected, c.line, c.reason)
			}
		})
	}
}

func TestImportJSONLDRejects(t *testing.T) {
	cases := []struct{ name, input, reason string }{
		{"remote context is never fetched", `{"@context": "http://www.example.com/context.jsonld", "@id": "http://www.example.com/a"}`, "remote documents are not loaded"},
		{"not JSON", `{"@id": `, "not JSON"},
		{"two documents", `{} {}`, "more than one JSON value"},
		{"named graph", `{"@id": "http://www.example.com/g", "@graph": [{"@id": "http://www.example.com/a", "http://www.w3.org/2004/02/skos/core#prefLabel": "animals"}]}`, "named graph"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rules, rep, err := ImportJSONLD(strings.NewReader(c.input), Options{})
			if !errors.Is(err, ErrImport) || rules != nil {
				t.Fatalf("want ErrImport and no rules, got %v, %d rules", err, len(rules))
			}
			if len(rep.Rejected) == 0 || !strings.Contains(rep.Rejected[0].Reason, c.reason) {
				t.Errorf("rejections %+v, want %q", rep.Rejected, c.reason)
			}
		})
	}
}

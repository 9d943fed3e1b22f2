package curate

import (
	"testing"

	"github.com/piprate/json-gold/ld"
)

// Examples of W3C RDF 1.1 N-Triples (Carothers & Seaborne, W3C
// Recommendation 25 February 2014), examples 1 to 3 in sections 2 and 2.4,
// from memory.
func TestParseLineSpecExamples(t *testing.T) {
	show := iri("http://example.org/show/218")
	cases := []struct {
		name, line string
		want       triple
	}{
		{"IRIs and a trailing comment",
			"<http://one.example/subject1> <http://one.example/predicate1> <http://one.example/object1> . # comments here",
			triple{s: iri("http://one.example/subject1"), p: iri("http://one.example/predicate1"), o: iri("http://one.example/object1")}},
		{"blank nodes", "_:subject1 <http://an.example/predicate1> \"object1\" .",
			triple{s: node{kind: blankNode, value: "subject1"}, p: iri("http://an.example/predicate1"), o: plain("object1")}},
		{"xsd:string datatype is the plain literal",
			`<http://example.org/show/218> <http://www.w3.org/2000/01/rdf-schema#label> "That Seventies Show"^^<http://www.w3.org/2001/XMLSchema#string> .`,
			triple{s: show, p: iri("http://www.w3.org/2000/01/rdf-schema#label"), o: plain("That Seventies Show")}},
		{"same as above", `<http://example.org/show/218> <http://www.w3.org/2000/01/rdf-schema#label> "That Seventies Show" . # same as above`,
			triple{s: show, p: iri("http://www.w3.org/2000/01/rdf-schema#label"), o: plain("That Seventies Show")}},
		{"language tag", `<http://example.org/show/218> <http://example.org/show/localName> "That Seventies Show"@en .`,
			triple{s: show, p: iri("http://example.org/show/localName"), o: tagged("That Seventies Show", "en")}},
		{"region subtag and non-ASCII", `<http://example.org/show/218> <http://example.org/show/localName> "Cette Série des Années Septante"@fr-be .`,
			triple{s: show, p: iri("http://example.org/show/localName"), o: tagged("Cette Série des Années Septante", "fr-be")}},
		{"escapes", `<http://example.org/#spiderman> <http://example.org/text> "This is a multi-line\nliteral with many quotes (\"\"\"\"\")\nand two apostrophes ('')." .`,
			triple{s: iri("http://example.org/#spiderman"), p: iri("http://example.org/text"),
				o: plain("This is a multi-line\nliteral with many quotes (\"\"\"\"\")\nand two apostrophes ('').")}},
		{"typed literal", `<http://en.wikipedia.org/wiki/Helium> <http://example.org/elements/atomicNumber> "2"^^<http://www.w3.org/2001/XMLSchema#integer> .`,
			triple{s: iri("http://en.wikipedia.org/wiki/Helium"), p: iri("http://example.org/elements/atomicNumber"),
				o: node{kind: literalNode, value: "2", datatype: "http://www.w3.org/2001/XMLSchema#integer"}}},
		{"UCHAR escapes", `<http://a.example/s> <http://a.example/p> "\u00E9\U0001F600" .`,
			triple{s: iri("http://a.example/s"), p: iri("http://a.example/p"), o: plain("é😀")}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, ok, err := parseLine(c.line)
			if err != nil || !ok {
				t.Fatalf("parse: ok %v, %v", ok, err)
			}
			if got != c.want {
				t.Errorf("got %+v\nwant %+v", got, c.want)
			}
		})
	}
	for _, blank := range []string{"", "   ", "# or on a line by themselves"} {
		if _, ok, err := parseLine(blank); ok || err != nil {
			t.Errorf("%q: ok %v, err %v; want skipped", blank, ok, err)
		}
	}
}

// Lines the N-Triples grammar (2014, section 7) does not admit.
func TestParseLineRejects(t *testing.T) {
	cases := map[string]string{
		"relative IRI":           `<a> <http://a.example/p> "x" .`,
		"space in IRI":           `<http://a.example/s s> <http://a.example/p> "x" .`,
		"literal subject":        `"s" <http://a.example/p> "x" .`,
		"blank predicate":        `<http://a.example/s> _:p "x" .`,
		"unknown escape":         `<http://a.example/s> <http://a.example/p> "\q" .`,
		"surrogate escape":       `<http://a.example/s> <http://a.example/p> "\uD800" .`,
		"short escape":           `<http://a.example/s> <http://a.example/p> "\u00" .`,
		"missing dot":            `<http://a.example/s> <http://a.example/p> "x"`,
		"junk after dot":         `<http://a.example/s> <http://a.example/p> "x" . x`,
		"empty language tag":     `<http://a.example/s> <http://a.example/p> "x"@ .`,
		"digit-first tag":        `<http://a.example/s> <http://a.example/p> "x"@1a .`,
		"literal datatype":       `<http://a.example/s> <http://a.example/p> "x"^^"y" .`,
		"langString without tag": `<http://a.example/s> <http://a.example/p> "x"^^<http://www.w3.org/1999/02/22-rdf-syntax-ns#langString> .`,
		"unterminated string":    `<http://a.example/s> <http://a.example/p> "x .`,
		"empty blank label":      `_: <http://a.example/p> "x" .`,
		"invalid UTF-8":          "<http://a.example/s> <http://a.example/p> \"\xff\" .",
	}
	for name, line := range cases {
		t.Run(name, func(t *testing.T) {
			if _, _, err := parseLine(line); err == nil {
				t.Errorf("%q parsed", line)
			}
		})
	}
}

// The writer's escaping, read back by json-gold's N-Quads parser (an
// independent implementation) and by ours, gives the original values.
func TestWriteEscapesAgreeWithJSONGold(t *testing.T) {
	values := []string{`say "call" \ now`, "two\nlines\r\tand tab", "bell \x07 and del \x7f", "Straße, café, 水", `\u0041 stays text`}
	for _, v := range values {
		for _, lit := range []node{plain(v), tagged(v, "fr-be"), dateTime(v)} {
			line := triple{s: iri("urn:kinword:s"), p: iri("urn:kinword:p"), o: lit}.String()
			ds, err := ld.ParseNQuads(line + "\n")
			if err != nil {
				t.Fatalf("json-gold cannot parse %s: %v", line, err)
			}
			q := ds.Graphs["@default"]
			if len(q) != 1 {
				t.Fatalf("json-gold: %d quads from %s", len(q), line)
			}
			l, ok := q[0].Object.(ld.Literal)
			if !ok || l.Value != v || l.Language != lit.lang {
				t.Errorf("json-gold read %s as %#v, want value %q lang %q", line, q[0].Object, v, lit.lang)
			}
			back, ok, err := parseLine(line)
			if err != nil || !ok || back.o != lit {
				t.Errorf("our parser read %s as %+v (%v), want %+v", line, back.o, err, lit)
			}
		}
	}
}

package curate

import (
	"bytes"
	"errors"
	"io"
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/piprate/json-gold/ld"
)

// tarnwickRules exercise every kind, scope, date, language and the
// characters that need escaping in CSV, N-Triples, JSON and IRIs.
func tarnwickRules() []Rule {
	return []Rule{
		{ID: "p1", Kind: Pin, Query: "burst pipes", Term: "Emergency repairs", Department: "ops", Reason: `winter plan "B", see the \ desk note`},
		{Kind: Block, Term: "leak detection", Department: "billing", Start: jan, Expiry: mar},
		{Kind: Block, Query: "meter", Term: "smart meter"},
		{Kind: Relate, Query: "boil notice", Term: "water quality"},
		{Kind: Relate, Query: "boil notice", Term: "flushing", Reason: "advice leaflet 4"},
		{Kind: Use, Query: "water outage", Term: "supply interruption", Lang: "en"},
		{Kind: Use, Query: "coupure d'eau", Term: "interruption de service", Lang: "fr"},
		{Kind: Use, Query: "Café #1?", Term: "canteen/kitchen"},
		{Kind: Broader, Query: "burst pipes", Term: "pipe failures"},
		{Kind: Narrower, Query: "pipe failures", Term: "frozen pipes", Start: feb.Add(1500 * 1e6)},
		{Kind: Relate, Query: "Straße", Term: "road works", Department: "networks", Lang: "en-gb"},
	}
}

type format struct {
	name string
	exp  func(io.Writer, []Rule, Options) error
	imp  func(io.Reader, Options) ([]Rule, *Report, error)
	skos bool
}

var formats = []format{
	{"csv", ExportCSV, ImportCSV, false},
	{"n-triples", ExportNTriples, ImportNTriples, true},
	{"json-ld", ExportJSONLD, ImportJSONLD, true},
}

// normalised is what an import of rules gives back: IDs are content IDs,
// SKOS labels carry a language, order is the export order.
func normalised(rules []Rule, skos bool) []Rule {
	out := slices.Clone(rules)
	for i := range out {
		if skos && out[i].Lang == "" {
			out[i].Lang = DefaultLang
		}
		out[i].ID = ContentID(out[i])
	}
	sortRules(out)
	return out
}

func TestRoundTrip(t *testing.T) {
	opts := Options{Departments: NewDepartmentSet("ops", "billing", "networks")}
	for _, f := range formats {
		t.Run(f.name, func(t *testing.T) {
			var b1, b2 bytes.Buffer
			if err := f.exp(&b1, tarnwickRules(), opts); err != nil {
				t.Fatal(err)
			}
			got, rep, err := f.imp(bytes.NewReader(b1.Bytes()), opts)
			if err != nil {
				t.Fatalf("%v %+v\n%s", err, rep.Rejected, b1.String())
			}
			if want := normalised(tarnwickRules(), f.skos); !reflect.DeepEqual(got, want) {
				t.Errorf("imported\n%+v\nwant\n%+v", got, want)
			}
			if err := f.exp(&b2, got, opts); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(b1.Bytes(), b2.Bytes()) {
				t.Errorf("second export differs:\n%s\n---\n%s", b1.String(), b2.String())
			}
		})
	}
}

// json-gold, reading our JSON-LD on its own (ToRDF, then its N-Quads
// serializer), finds exactly the triples of our N-Triples export.
func TestJSONLDAndNTriplesSayTheSame(t *testing.T) {
	var nt, js bytes.Buffer
	if err := ExportNTriples(&nt, tarnwickRules(), Options{}); err != nil {
		t.Fatal(err)
	}
	if err := ExportJSONLD(&js, tarnwickRules(), Options{}); err != nil {
		t.Fatal(err)
	}
	doc, err := ld.DocumentFromReader(&js)
	if err != nil {
		t.Fatal(err)
	}
	opts := ld.NewJsonLdOptions("")
	opts.Format = "application/n-quads"
	out, err := ld.NewJsonLdProcessor().ToRDF(doc, opts)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(out.(string)), "\n")
	slices.Sort(lines)
	want := strings.Split(strings.TrimSpace(nt.String()), "\n")
	if !slices.Equal(lines, want) {
		t.Errorf("json-gold triples\n%s\nwant\n%s", strings.Join(lines, "\n"), strings.Join(want, "\n"))
	}
}

func TestExportMintsIRIs(t *testing.T) {
	var b bytes.Buffer
	rules := []Rule{{Kind: Use, Query: "Café #1?", Term: "canteen/kitchen"}}
	if err := ExportNTriples(&b, rules, Options{Base: "https://tarnwick.example/thesaurus/"}); err != nil {
		t.Fatal(err)
	}
	// RFC 3986 (Berners-Lee et al., 2005) section 2.1: reserved and
	// non-ASCII octets percent-encoded, upper-case hex (from memory).
	want := `<https://tarnwick.example/thesaurus/en/canteen%2Fkitchen> <http://www.w3.org/2004/02/skos/core#altLabel> "Café #1?"@en .`
	if !strings.Contains(b.String(), want+"\n") {
		t.Errorf("missing %s in\n%s", want, b.String())
	}
	if err := ExportNTriples(io.Discard, rules, Options{Base: "not an iri"}); err == nil {
		t.Error("relative base accepted")
	}
}

func TestExportRefusesInvalidSets(t *testing.T) {
	bad := []Rule{{Kind: Pin, Query: "burst", Term: "leak"}, {Kind: Block, Term: "leak"}}
	for _, f := range formats {
		t.Run(f.name, func(t *testing.T) {
			var b bytes.Buffer
			err := f.exp(&b, bad, Options{})
			if !errors.Is(err, ErrContradiction) || b.Len() != 0 {
				t.Errorf("err %v, %d bytes written", err, b.Len())
			}
			err = f.exp(&b, []Rule{{Kind: Pin, Query: "burst", Term: "leak", Department: "x"}}, Options{Departments: NewDepartmentSet("ops")})
			if !errors.Is(err, ErrInvalid) || b.Len() != 0 {
				t.Errorf("unknown department: err %v, %d bytes written", err, b.Len())
			}
		})
	}
}

func TestEmptySetRoundTrips(t *testing.T) {
	for _, f := range formats {
		var b bytes.Buffer
		if err := f.exp(&b, nil, Options{}); err != nil {
			t.Fatalf("%s: %v", f.name, err)
		}
		got, _, err := f.imp(bytes.NewReader(b.Bytes()), Options{})
		if err != nil || len(got) != 0 {
			t.Errorf("%s: %d rules, %v from %q", f.name, len(got), err, b.String())
		}
	}
}

package curate

import (
	"bytes"
	"errors"

	"reflect"
	"slices"
	"strings"
	"testing"
	"time"
)

// checkImport is the property every importer keeps: a rejected input gives
// ErrImport and no rules; an accepted one re-exports, re-imports to the same
// rules, and re-exports to the same bytes.
func checkImport(t *testing.T, f format, data []byte) {
	t.Helper()
	rules, rep, err := f.imp(bytes.NewReader(data), Options{})
	if err != nil {
		if !errors.Is(err, ErrImport) || rules != nil || rep == nil || len(rep.Rejected) == 0 {
			t.Fatalf("rejection without ErrImport, or with rules: %v, %d rules", err, len(rules))
		}
		return
	}
	var b1, b2 bytes.Buffer
	if err := f.exp(&b1, rules, Options{}); err != nil {
		t.Fatalf("imported rules do not export: %v", err)
	}
	again, rep, err := f.imp(bytes.NewReader(b1.Bytes()), Options{})
	if err != nil {
		t.Fatalf("export does not re-import: %v %+v\n%s", err, rep.Rejected, b1.String())
	}
	first := slices.Clone(rules)
	sortRules(first)
	if !reflect.DeepEqual(first, again) {
		t.Fatalf("re-import differs:\n%+v\n%+v", first, again)
	}
	if err := f.exp(&b2, again, Options{}); err != nil || !bytes.Equal(b1.Bytes(), b2.Bytes()) {
		t.Fatalf("second export differs (%v):\n%s\n---\n%s", err, b1.String(), b2.String())
	}
}

// seeds adds every format's export of the Tarnwick rules and of the
// single rules, plus extra inputs.
func seeds(f *testing.F, fm format, extra ...string) {
	var b bytes.Buffer
	if err := fm.exp(&b, tarnwickRules(), Options{}); err != nil {
		f.Fatal(err)
	}
	f.Add(b.Bytes())
	for _, r := range tarnwickRules() {
		b.Reset()
		if err := fm.exp(&b, []Rule{r}, Options{}); err != nil {
			f.Fatal(err)
		}
		f.Add(b.Bytes())
	}
	for _, s := range extra {
		f.Add([]byte(s))
	}
}

func FuzzImportCSV(f *testing.F) {
	seeds(f, formats[0], "", "kind,query,term,department,start,expiry,reason,lang\n\"pin\",\"a\"b,c\n",
		"kind,query,term,department,start,expiry,reason,lang\r\nuse,a,b,,2026-01-01,,,\r\n")
	f.Fuzz(func(t *testing.T, data []byte) { checkImport(t, formats[0], data) })
}

func FuzzImportNTriples(f *testing.F) {
	seeds(f, formats[1], primerNTriples, "_:a <http://www.w3.org/2004/02/skos/core#prefLabel> \"x\\u0041\"@EN .\n",
		"<urn:x> <urn:kinword:vocab#kind> <urn:kinword:vocab#block> .\n<urn:x> <urn:kinword:vocab#term> \"leak\" .\n")
	f.Fuzz(func(t *testing.T, data []byte) { checkImport(t, formats[1], data) })
}

func FuzzImportJSONLD(f *testing.F) {
	seeds(f, formats[2], primerCompact, primerExpanded, `{"@context": {"@vocab": "http://www.w3.org/2004/02/skos/core#"}, "@id": "urn:a", "prefLabel": "a", "altLabel": "b"}`,
		`[{"@id": "_:b", "http://www.w3.org/2004/02/skos/core#prefLabel": [{"@value": "x", "@language": "de"}]}]`)
	f.Fuzz(func(t *testing.T, data []byte) { checkImport(t, formats[2], data) })
}

// FuzzValidate checks that Validate agrees with ValidateSet, that a sound
// rule compiles and fires for its own query while active, and that it
// survives a CSV round trip unchanged.
func FuzzValidate(f *testing.F) {
	f.Add("pin", "burst pipes", "emergency repairs", "", "", "", int64(0), int64(0))
	f.Add("block", "", "leak", "ops", "because", "en", int64(1767225600), int64(1769904000))
	f.Add("use", "coupure d'eau", "interruption de service", "", "", "fr", int64(0), int64(1))
	f.Add("narrower", "the", "of", "", "", "en-gb", int64(5), int64(5))
	f.Add("relate", "Straße", "strasse", "x\x00", "=1", "EN", int64(-1), int64(0))
	p := defaultPipeline()
	f.Fuzz(func(t *testing.T, kind, query, term, dept, reason, lang string, start, expiry int64) {
		r := Rule{ID: "f", Kind: Kind(kind), Query: query, Term: term, Department: dept, Reason: reason, Lang: lang}
		if start != 0 {
			r.Start = time.Unix(start, 0).UTC()
		}
		if expiry != 0 {
			r.Expiry = time.Unix(expiry, 0).UTC()
		}
		single := r.Validate(nil)
		ps := ValidateSet([]Rule{r}, nil, p)
		if single != nil && len(ps) == 0 {
			t.Fatalf("Validate says %v, ValidateSet nothing", single)
		}
		for _, pr := range ps {
			if !errors.Is(pr, ErrInvalid) && !errors.Is(pr, ErrContradiction) || !strings.HasPrefix(pr.Error(), "curate: ") {
				t.Fatalf("problem %v has no sentinel or prefix", pr)
			}
		}
		set, err := Compile([]Rule{r}, p)
		if (err == nil) != (len(ps) == 0) {
			t.Fatalf("Compile %v, ValidateSet %v", err, ps)
		}
		if err != nil {
			return
		}
		now := r.Start
		if now.IsZero() {
			now = time.Date(2026, 6, 1, 0, 0, 0, 0, time.UTC)
			if !r.Expiry.IsZero() {
				now = r.Expiry.Add(-time.Second)
			}
		}
		if e := set.For(dept, p.Terms(query, pipelineLang(lang)), now); !slices.Equal(e.Rules, []string{"f"}) {
			t.Fatalf("rule does not fire for its own query at %v: %+v", now, e)
		}
		var b bytes.Buffer
		if err := ExportCSV(&b, []Rule{r}, Options{}); err != nil {
			t.Fatal(err)
		}
		back, _, err := ImportCSV(&b, Options{})
		r.ID = ContentID(r)
		if err != nil || len(back) != 1 || !reflect.DeepEqual(back[0], r) {
			t.Fatalf("csv round trip: %v %+v, want %+v", err, back, r)
		}
	})
}

package web

import (
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strings"
	"testing"
	"time"
)

// send posts a raw file body (not JSON) to the import route.
func send(t *testing.T, s *Server, path, body string, hdr map[string]string) *httptest.ResponseRecorder {
	t.Helper()
	req := httptest.NewRequest(http.MethodPost, path, strings.NewReader(body))
	for k, v := range hdr {
		req.Header.Set(k, v)
	}
	rec := httptest.NewRecorder()
	s.Handler().ServeHTTP(rec, req)
	return rec
}

// seedRules creates rules of every kind through the API.
func seedRules(t *testing.T, cs curationServer) {
	t.Helper()
	for _, b := range []string{
		`{"kind":"pin","query":"burst pipe","term":"main break","department":"customer-care","reason":"callers say burst"}`,
		`{"kind":"block","term":"kestrel"}`,
		`{"kind":"relate","query":"valve","term":"hydrant","start":"2026-01-01T00:00:00Z","expiry":"2027-01-01T00:00:00Z"}`,
		`{"kind":"use","query":"water main","term":"trunk main","lang":"en"}`,
		`{"kind":"broader","query":"gate valve","term":"valve"}`,
		`{"kind":"narrower","query":"pipe","term":"service pipe"}`,
	} {
		if rec := call(t, cs.s, "POST", "/api/v1/rules", b, cs.lib); rec.Code != 201 {
			t.Fatalf("seed %s: %d %s", b, rec.Code, rec.Body)
		}
	}
}

// TestRulesExportImportExport: a file exported through the API, imported
// into an empty server (replace) and exported again is byte-identical, for
// each format; Content-Type follows the formats' registrations (RFC 4180
// section 3 text/csv; W3C RDF 1.1 N-Triples, 2014, appendix A
// application/n-triples; W3C JSON-LD 1.1, 2020, section C
// application/ld+json), and the file is an attachment (RFC 6266 section 4).
func TestRulesExportImportExport(t *testing.T) {
	cases := []struct{ format, contentType, ext string }{
		{"csv", "text/csv", "csv"},
		{"ntriples", "application/n-triples", "nt"},
		{"jsonld", "application/ld+json", "jsonld"},
	}
	src := newCurationServer(t)
	seedRules(t, src)
	for _, c := range cases {
		t.Run(c.format, func(t *testing.T) {
			first := call(t, src.s, "GET", "/api/v1/rules/export?format="+c.format, "", src.lib)
			if first.Code != 200 || !strings.HasPrefix(first.Header().Get("Content-Type"), c.contentType) {
				t.Fatalf("export: %d %q %s", first.Code, first.Header().Get("Content-Type"), first.Body)
			}
			if cd := first.Header().Get("Content-Disposition"); !strings.HasPrefix(cd, "attachment;") || !strings.Contains(cd, "."+c.ext+`"`) {
				t.Errorf("Content-Disposition %q", cd)
			}
			dst := newCurationServer(t)
			rec := send(t, dst.s, "/api/v1/rules/import?format="+c.format+"&mode=replace&why=restore", first.Body.String(), dst.lib)
			if rec.Code != 200 || !strings.Contains(rec.Body.String(), `"imported":6`) {
				t.Fatalf("import: %d %s", rec.Code, rec.Body)
			}
			again := call(t, dst.s, "GET", "/api/v1/rules/export?format="+c.format, "", dst.lib)
			if again.Body.String() != first.Body.String() {
				t.Errorf("export after import differs:\n%s\n---\n%s", first.Body, again.Body)
			}
			// Adding the same file again changes nothing (same content, same ContentID).
			rec = send(t, dst.s, "/api/v1/rules/import?format="+c.format+"&mode=add", first.Body.String(), dst.lib)
			if rec.Code != 200 || !strings.Contains(rec.Body.String(), `"imported":0,"unchanged":6`) {
				t.Errorf("re-import: %d %s", rec.Code, rec.Body)
			}
		})
	}
}

// TestRulesImportAllOrNothing: one bad line rejects the whole file with a
// report naming the line; nothing is stored.
func TestRulesImportAllOrNothing(t *testing.T) {
	const header = "kind,query,term,department,start,expiry,reason,lang\n"
	cases := []struct {
		name, path, body string
		status           int
		contains         []string
	}{
		{"bad kind on line 3", "format=csv", header + "relate,valve,hydrant,,,,,\npromote,valve,spindle,,,,,\n", 400,
			[]string{`"code":"import_rejected"`, `"line":3`, `"item":"kind"`}},
		{"unknown department on line 2", "format=csv", header + "relate,valve,hydrant,marketing,,,,\n", 400,
			[]string{`"line":2`, "unknown department"}},
		{"contradiction inside the file", "format=csv", header + "pin,burst,leak,,,,,\nblock,burst,leak,,,,,\n", 400,
			[]string{`"line":3`, "contradicting"}},
		{"contradiction with a stored rule", "format=csv", header + "block,burst pipe,main break,,,,,\n", 400,
			[]string{`"rejected":[{"line":0,"item":"block`, "contradicting"}},
		{"bad triple", "format=ntriples", "<urn:a> <urn:b> .\n", 400, []string{`"format":"n-triples"`, `"line":1`}},
		{"unknown format", "format=xml", header, 400, []string{"bad_format"}},
		{"unknown mode", "format=csv&mode=merge", header, 400, []string{"bad_mode"}},
		{"too large", "format=csv", header + strings.Repeat("relate,valve,hydrant,,,,,\n", 1<<20/25), 413, []string{"too_large"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cs := newCurationServer(t)
			if rec := call(t, cs.s, "POST", "/api/v1/rules", `{"kind":"pin","query":"burst pipe","term":"main break"}`, cs.lib); rec.Code != 201 {
				t.Fatal(rec.Body)
			}
			rec := send(t, cs.s, "/api/v1/rules/import?"+c.path, c.body, cs.lib)
			if rec.Code != c.status {
				t.Fatalf("%d, want %d: %s", rec.Code, c.status, rec.Body)
			}
			for _, w := range c.contains {
				if !strings.Contains(rec.Body.String(), w) {
					t.Errorf("body lacks %s: %s", w, rec.Body)
				}
			}
			if rules, _, _ := cs.book.Rules(t.Context()); len(rules) != 1 {
				t.Errorf("a rejected import changed the rules: %d stored", len(rules))
			}
		})
	}
}

// TestRulesPreview: impressions are hand-made; the expected counts follow
// from the finder's rule order (pins, related, refinements, then the
// engine's list; blocks drop a term) worked out by hand.
func TestRulesPreview(t *testing.T) {
	cs := newCurationServer(t)
	now := time.Now().UTC()
	cs.book.imps = []Impression{
		{Time: now.Add(-40 * 24 * time.Hour), Query: "burst pipe", Shown: []string{"leak", "valv"}}, // outside the 30 days
		{Time: now.Add(-3 * time.Hour), Department: "customer-care", Query: "burst pipe", Shown: []string{"leak", "valv"}},
		{Time: now.Add(-2 * time.Hour), Department: "field-operations", Query: "pipe burst school", Shown: []string{"valv", "leak", "hydrant"}},
		{Time: now.Add(-time.Hour), Department: "customer-care", Query: "hydrant", Shown: []string{"leak"}},
		{Time: now.Add(-time.Minute), Department: "customer-care", Query: "burst pipe", Shown: []string{"valv"}},
	}
	cases := []struct {
		name, body     string
		status         int
		considered, ch int
		first          string
	}{
		{"block of leak for burst", `{"kind":"block","query":"burst","term":"leak"}`, 200, 4, 2,
			`{"department":"customer-care","query":"burst pipe","before":["leak","valv"],"after":["valv"]}`},
		{"pin in one department", `{"kind":"pin","query":"pipe","term":"main break","department":"field-operations"}`, 200, 4, 1,
			`{"department":"field-operations","query":"pipe burst school","before":["valv","leak","hydrant"],"after":["main break","valv","leak"]}`},
		{"relate of a term the query holds changes nothing", `{"kind":"relate","query":"burst pipe","term":"pipe"}`, 200, 4, 0, ""},
		{"relate fires nowhere", `{"kind":"relate","query":"reservoir","term":"dam"}`, 200, 4, 0, ""},
		{"bad draft", `{"kind":"pin","term":"leak"}`, 400, 0, 0, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := call(t, cs.s, "POST", "/api/v1/rules/preview", c.body, cs.lib)
			if rec.Code != c.status {
				t.Fatalf("%d, want %d: %s", rec.Code, c.status, rec.Body)
			}
			if c.status != 200 {
				return
			}
			var out struct {
				Impressions, Changed int
				Samples              []json.RawMessage
			}
			if err := json.Unmarshal(rec.Body.Bytes(), &out); err != nil {
				t.Fatal(err)
			}
			if out.Impressions != c.considered || out.Changed != c.ch || len(out.Samples) != c.ch {
				t.Errorf("impressions %d changed %d samples %d, want %d %d %d", out.Impressions, out.Changed, len(out.Samples), c.considered, c.ch, c.ch)
			}
			if c.first != "" && (len(out.Samples) == 0 || string(out.Samples[0]) != c.first) {
				t.Errorf("first sample %s, want %s", out.Samples, c.first)
			}
		})
	}
	if rules, _, _ := cs.book.Rules(t.Context()); len(rules) != 0 || cs.changes.Load() != 0 {
		t.Errorf("a preview stored something")
	}
}

// TestRulesAuditRevert: every change is logged with actor and reason; a
// revert restores the earlier state and is itself logged; reverting over a
// later change is a 409 (RFC 9110 section 15.5.10).
func TestRulesAuditRevert(t *testing.T) {
	cs := newCurationServer(t)
	steps := []step{
		{"create", "POST", "/api/v1/rules", `{"kind":"relate","query":"valve","term":"hydrant","why":"asked by field crews"}`, cs.lib, 201, nil},
		{"update", "PUT", "/api/v1/rules/f001", `{"kind":"relate","query":"valve","term":"spindle","version":1,"why":"wrong term"}`, cs.lib, 200, []string{`"term":"spindle"`}},
		{"audit newest first", "GET", "/api/v1/rules/audit?rule=f001", "", cs.lib, 200,
			[]string{`"entries":[{"seq":2,"rule_id":"f001","actor":"cataloguer","action":"update","reason":"wrong term"`, `"seq":1`}},
		{"audit limit", "GET", "/api/v1/rules/audit?limit=1", "", cs.lib, 200, []string{`"seq":2`}},
		{"bad limit", "GET", "/api/v1/rules/audit?limit=0", "", cs.lib, 400, []string{"bad_limit"}},
		{"revert the update", "POST", "/api/v1/rules/audit/2/revert", `{"why":"undo"}`, cs.lib, 200,
			[]string{`"seq":3`, `"action":"revert"`, `"reason":"undo"`, `"after":{"id":"f001","kind":"relate","query":"valve","term":"hydrant"`}},
		{"rule is back", "GET", "/api/v1/rules", "", cs.lib, 200, []string{`"term":"hydrant"`, `"version":3`}},
		{"revert the same entry again", "POST", "/api/v1/rules/audit/2/revert", "", cs.lib, 409, []string{"conflict"}},
		{"revert without a body", "POST", "/api/v1/rules/audit/3/revert", "", cs.lib, 200, []string{`"term":"spindle"`}},
		{"unknown entry", "POST", "/api/v1/rules/audit/99/revert", "", cs.lib, 404, []string{"not_found"}},
		{"bad seq", "POST", "/api/v1/rules/audit/x/revert", "", cs.lib, 400, []string{"bad_seq"}},
	}
	cs.run(t, steps)
	if rec := call(t, cs.s, "GET", "/api/v1/rules/audit?limit=1", "", cs.lib); strings.Contains(rec.Body.String(), `"seq":3`) {
		t.Errorf("limit=1 returned more than the newest entry: %s", rec.Body)
	}
}

// FuzzRulesImport: an import of any bytes in any format answers 200 or a
// 4xx, and a refused import changes nothing (all or nothing).
func FuzzRulesImport(f *testing.F) {
	f.Add("csv", "kind,query,term,department,start,expiry,reason,lang\nrelate,valve,hydrant,,,,,\n")
	f.Add("csv", "kind,query,term\n")
	f.Add("ntriples", "<urn:kinword:concept:en/valve> <http://www.w3.org/2004/02/skos/core#related> <urn:kinword:concept:en/hydrant> .\n")
	f.Add("jsonld", `{"@context":{},"@graph":[]}`)
	f.Add("jsonld", `{"@id":`)
	cs := newCurationServer(f)
	f.Fuzz(func(t *testing.T, format, body string) {
		before, _, _ := cs.book.Rules(t.Context())
		rec := send(t, cs.s, "/api/v1/rules/import?mode=add&format="+url.QueryEscape(format), body, cs.lib)
		if rec.Code >= 500 {
			t.Fatalf("%s %q: %d %s", format, body, rec.Code, rec.Body)
		}
		if after, _, _ := cs.book.Rules(t.Context()); rec.Code != 200 && len(after) != len(before) {
			t.Fatalf("%s %q: refused but stored", format, body)
		}
	})
}

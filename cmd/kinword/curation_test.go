package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"kinword/internal/doc"
	"kinword/internal/finder"
	"kinword/internal/index"
	"kinword/internal/store"
	"kinword/internal/text"
	"kinword/internal/web"
)

// curationRig is a server over a small index, a finder and a SQLite store
// in t.TempDir, wired as serve does, with a librarian and an admin token.
type curationRig struct {
	st       *store.Store
	f        *finder.Finder
	h        http.Handler
	lib, adm string
}

func newCurationRig(t *testing.T) curationRig {
	t.Helper()
	ctx := t.Context()
	dir := t.TempDir()
	p, _ := text.NewPipeline("")
	ix, err := index.Open(ctx, filepath.Join(dir, "index"), index.Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	docs := []doc.Document{
		{ID: "a", Title: "Main break response", Body: "Crews isolate the valve after a burst pipe on the trunk main.", Department: "field-operations"},
		{ID: "b", Title: "Burst pipe advice", Body: "A burst pipe in the street is a main break; call the network desk about the hydrant.", Department: "customer-care"},
		{ID: "c", Title: "Valve exercising", Body: "Every valve and hydrant is exercised yearly.", Department: "asset-engineering"},
	}
	if err := ix.Put(ctx, docs); err != nil {
		t.Fatal(err)
	}
	if err := ix.Commit(ctx); err != nil {
		t.Fatal(err)
	}
	ix.Close()
	f, err := finder.Open(ctx, dir, p, finder.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	st, err := store.Open(ctx, "sqlite:"+filepath.Join(dir, "events.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	rig := curationRig{st: st, f: f}
	var libSum, admSum string
	if rig.lib, libSum, err = web.NewToken(); err != nil {
		t.Fatal(err)
	}
	if rig.adm, admSum, err = web.NewToken(); err != nil {
		t.Fatal(err)
	}
	log := slog.New(slog.NewTextHandler(io.Discard, nil))
	srv, err := web.New(f, web.Options{Log: log, Pipeline: p,
		Tokens:       []web.Token{{Name: "cataloguer", Role: web.RoleLibrarian, SHA256: libSum}, {Name: "ops", Role: web.RoleAdmin, SHA256: admSum}},
		Rules:        curation{st: st},
		Reviewer:     curation{st: st},
		Departments:  []string{"field-operations", "customer-care", "asset-engineering"},
		RulesChanged: rulesNow(context.Background(), log, st, f, p)})
	if err != nil {
		t.Fatal(err)
	}
	rig.h = srv.Handler()
	return rig
}

// do sends one request with a token; a body starting with { goes as JSON.
func (rig curationRig) do(t *testing.T, method, path, body, token string) *httptest.ResponseRecorder {
	t.Helper()
	req := httptest.NewRequest(method, path, strings.NewReader(body))
	if strings.HasPrefix(body, "{") {
		req.Header.Set("Content-Type", "application/json")
	}
	req.Header.Set("Authorization", "Bearer "+token)
	rec := httptest.NewRecorder()
	rig.h.ServeHTTP(rec, req)
	return rec
}

// want fails unless rec has status and every fragment.
func want(t *testing.T, rec *httptest.ResponseRecorder, status int, fragments ...string) {
	t.Helper()
	if rec.Code != status {
		t.Fatalf("%d, want %d: %s", rec.Code, status, rec.Body)
	}
	for _, f := range fragments {
		if !strings.Contains(rec.Body.String(), f) {
			t.Errorf("body lacks %s: %s", f, rec.Body)
		}
	}
}

// TestCurationRulesThroughTheStore: the rule routes over the SQLite store.
// Statuses from RFC 9110 (2022) section 15: 201 Created, 409 Conflict for a
// stale version and a contradiction, 400 for an unknown department. A
// saved pin reaches the finder before the answer (the RulesChanged hook);
// the audit log records the token's name; a revert restores the rule.
func TestCurationRulesThroughTheStore(t *testing.T) {
	rig := newCurationRig(t)
	ctx := t.Context()
	rec := rig.do(t, "POST", "/api/v1/rules", `{"kind":"pin","query":"burst","term":"hydrant","why":"callers ask for it"}`, rig.lib)
	want(t, rec, 201, `"version":1`)
	var created web.RuleRecord
	if err := json.Unmarshal(rec.Body.Bytes(), &created); err != nil || created.ID == "" {
		t.Fatalf("created %s: %v", rec.Body, err)
	}
	res, err := rig.f.Search(ctx, finder.Request{Query: "burst pipe"})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Suggestions) == 0 || res.Suggestions[0].Term != "hydrant" {
		t.Errorf("the pin is not first at once: %+v", res.Suggestions)
	}
	id := created.ID
	cases := []struct {
		name, method, path, body string
		status                   int
		fragments                []string
	}{
		{"update", "PUT", "/api/v1/rules/" + id, `{"kind":"pin","query":"burst","term":"valve","version":1}`, 200, []string{`"version":2`, `"term":"valve"`}},
		{"stale update", "PUT", "/api/v1/rules/" + id, `{"kind":"pin","query":"burst","term":"hydrant","version":1}`, 409, []string{`"code":"conflict"`}},
		{"contradiction", "POST", "/api/v1/rules", `{"kind":"block","query":"burst","term":"valve"}`, 409, []string{`"code":"contradiction"`}},
		{"unknown department", "POST", "/api/v1/rules", `{"kind":"relate","query":"valve","term":"hydrant","department":"marketing"}`, 400, []string{"unknown department"}},
		{"unknown rule", "DELETE", "/api/v1/rules/rnope?version=1", "", 404, nil},
		{"audit", "GET", "/api/v1/rules/audit?rule=" + id, "", 200, []string{`"seq":2`, `"actor":"cataloguer"`, `"action":"update"`, `"reason":"callers ask for it"`}},
		{"revert the update", "POST", "/api/v1/rules/audit/2/revert", `{"why":"back"}`, 200, []string{`"action":"revert"`, `"term":"hydrant"`, `"version":3`}},
		{"revert again conflicts", "POST", "/api/v1/rules/audit/2/revert", "", 409, nil},
		{"stale delete", "DELETE", "/api/v1/rules/" + id + "?version=2", "", 409, nil},
		{"delete", "DELETE", "/api/v1/rules/" + id + "?version=3&why=done", "", 204, nil},
		{"empty", "GET", "/api/v1/rules", "", 200, []string{`"rules":[]`, `"version":4`}},
	}
	for _, c := range cases {
		if !t.Run(c.name, func(t *testing.T) { want(t, rig.do(t, c.method, c.path, c.body, rig.lib), c.status, c.fragments...) }) {
			t.FailNow()
		}
	}
	res, err = rig.f.Search(ctx, finder.Request{Query: "burst pipe"})
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range res.Suggestions {
		if s.Evidence.Rule != "" {
			t.Errorf("a deleted rule still acts: %+v", s)
		}
	}
}

// TestCurationExportImportExport: for CSV and N-Triples (and JSON-LD), a
// file exported through the API, imported back in replace mode and
// exported again is byte-identical; a file with a bad line is rejected as a
// whole with its line reported, the store unchanged.
func TestCurationExportImportExport(t *testing.T) {
	rig := newCurationRig(t)
	for _, b := range []string{
		`{"kind":"pin","query":"burst pipe","term":"main break","department":"customer-care","reason":"common wording"}`,
		`{"kind":"block","term":"desk"}`,
		`{"kind":"use","query":"water main","term":"trunk main","lang":"en","start":"2026-01-01T00:00:00Z"}`,
		`{"kind":"narrower","query":"valve","term":"gate valve"}`,
	} {
		want(t, rig.do(t, "POST", "/api/v1/rules", b, rig.lib), 201)
	}
	for _, format := range []string{"csv", "ntriples", "jsonld"} {
		t.Run(format, func(t *testing.T) {
			first := rig.do(t, "GET", "/api/v1/rules/export?format="+format, "", rig.lib)
			want(t, first, 200)
			want(t, rig.do(t, "POST", "/api/v1/rules/import?format="+format+"&mode=replace", first.Body.String(), rig.lib), 200, `"imported":4`)
			again := rig.do(t, "GET", "/api/v1/rules/export?format="+format, "", rig.lib)
			if again.Body.String() != first.Body.String() {
				t.Errorf("export after import differs:\n%s\n---\n%s", first.Body, again.Body)
			}
		})
	}
	before, _ := rig.st.Rules(t.Context())
	bad := "kind,query,term,department,start,expiry,reason,lang\nrelate,valve,spindle,,,,,\nrelate,valve,,,,,,\n"
	want(t, rig.do(t, "POST", "/api/v1/rules/import?format=csv&mode=add", bad, rig.lib), 400, `"line":3`, `"item":"term"`)
	after, _ := rig.st.Rules(t.Context())
	if len(after) != len(before) {
		t.Errorf("a rejected import stored rules: %d -> %d", len(before), len(after))
	}
}

// TestCurationPreviewAndReview: impressions appended to the store are what
// the preview considers and the review counts. Expected values are worked
// out by hand from the impressions below; the acceptance rate of "valv"
// (1 accept in 2 impressions, position 0) is 0.5.
func TestCurationPreviewAndReview(t *testing.T) {
	rig := newCurationRig(t)
	now := time.Now().UTC().Truncate(time.Second)
	events := []store.Event{
		{ID: "e1", Impression: "e1", Kind: store.KindImpression, Time: now.Add(-2 * time.Hour), Session: "s1", Department: "customer-care", Query: "burst pipe", Terms: []string{"valv", "hydrant"}},
		{ID: "e2", Impression: "e1", Kind: store.KindAccept, Time: now.Add(-2*time.Hour + time.Second), Session: "s1", Department: "customer-care", Query: "burst pipe", Term: "valv"},
		{ID: "e3", Impression: "e3", Kind: store.KindImpression, Time: now.Add(-time.Hour), Session: "s2", Department: "field-operations", Query: "valv", Terms: []string{"hydrant"}},
		{ID: "e4", Impression: "e4", Kind: store.KindImpression, Time: now.Add(-time.Minute), Session: "s3", Department: "customer-care", Query: "burst", Terms: []string{"valv"}},
	}
	if err := rig.st.Append(t.Context(), events); err != nil {
		t.Fatal(err)
	}
	rec := rig.do(t, "POST", "/api/v1/rules/preview", `{"kind":"block","query":"burst","term":"valve"}`, rig.lib)
	want(t, rec, 200, `"impressions":3`, `"changed":2`,
		`{"department":"customer-care","query":"burst pipe","before":["valv","hydrant"],"after":["hydrant"]}`,
		`{"department":"customer-care","query":"burst","before":["valv"],"after":[]}`)

	rec = rig.do(t, "GET", "/api/v1/review?department=customer-care", "", rig.adm)
	want(t, rec, 200, `"impressions":2`, `"department":"customer-care"`)
	var rep struct {
		Terms []struct {
			Department, Term string
			Impressions      int
			Accepts          int
			Rate             float64
		}
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &rep); err != nil {
		t.Fatal(err)
	}
	i := slices.IndexFunc(rep.Terms, func(r struct {
		Department, Term string
		Impressions      int
		Accepts          int
		Rate             float64
	}) bool {
		return r.Term == "valv" && r.Department == ""
	})
	if i < 0 || rep.Terms[i].Impressions != 2 || rep.Terms[i].Accepts != 1 || rep.Terms[i].Rate != 0.5 {
		t.Errorf("valv row %+v", rep.Terms)
	}
	rec = rig.do(t, "GET", "/api/v1/review/export?table=terms", "", rig.adm)
	want(t, rec, 200)
	lines, err := csv.NewReader(rec.Body).ReadAll()
	if err != nil || len(lines) < 2 || lines[0][0] != "department" {
		t.Fatalf("CSV %v %q", err, lines)
	}
	want(t, rig.do(t, "GET", "/api/v1/review", "", rig.lib), 403)
}

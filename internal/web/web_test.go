package web

import (
	"context"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"strings"
	"testing"

	"kinword/internal/doc"
	"kinword/internal/finder"
	"kinword/internal/index"
	"kinword/internal/text"
)

// newTestServer indexes a small corpus with one restricted document whose
// canary word ("kestrelmoor", invented) appears nowhere else.
// testDocs is the small corpus of the API tests: three open documents of
// three departments and one the executive group alone may read.
var testDocs = []doc.Document{
	{ID: "a", Title: "Main break response", Body: "Crews isolate the valve after a main break on the trunk main.", Department: "field-operations"},
	{ID: "b", Title: "Burst pipe advice", Body: "A burst pipe in the street is a main break; call the network desk.", Department: "customer-care"},
	{ID: "c", Title: "Valve exercising", Body: "Every valve is exercised yearly; valve records sit in the asset register.", Department: "asset-engineering"},
	{ID: "s", Title: "Kestrelmoor valve review", Body: "The Kestrelmoor programme reviews valve security.", Groups: []string{"executive"}},
}

// indexFinder indexes docs into the data folder dir (no association
// table) and opens a finder on it, closed when the test ends.
func indexFinder(t testing.TB, dir string, docs []doc.Document) *finder.Finder {
	t.Helper()
	ctx := context.Background()
	p, err := text.NewPipeline("")
	if err != nil {
		t.Fatal(err)
	}
	ix, err := index.Open(ctx, filepath.Join(dir, "index"), index.Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
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
	return f
}

func newTestServer(t *testing.T) *Server {
	t.Helper()
	s, err := New(indexFinder(t, t.TempDir(), testDocs), Options{Identity: Identity{Secret: "s3cret"}})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func get(t *testing.T, s *Server, path string, hdr map[string]string) *httptest.ResponseRecorder {
	t.Helper()
	req := httptest.NewRequest(http.MethodGet, path, nil)
	for k, v := range hdr {
		req.Header.Set(k, v)
	}
	rec := httptest.NewRecorder()
	s.Handler().ServeHTTP(rec, req)
	return rec
}

func TestRoutesAndErrors(t *testing.T) {
	s := newTestServer(t)
	cases := []struct {
		name, path string
		status     int
		contains   string
	}{
		{"health", "/healthz", 200, `"ok"`},
		{"ready", "/readyz", 200, `"ready"`},
		{"page", "/", 200, "Related terms"},
		{"asset", "/static/app.js", 200, "use strict"},
		{"missing asset", "/static/nope.js", 404, "not_found"},
		{"missing query", "/api/v1/lookup", 400, "missing_query"},
		{"only stopwords", "/api/v1/lookup?q=the+of", 400, "bad_query"},
		{"control characters", "/api/v1/lookup?q=" + url.QueryEscape("valve\x01"), 400, "control_characters"},
		{"too long", "/api/v1/lookup?q=" + strings.Repeat("a", 600), 400, "bad_query"},
		{"unknown route", "/api/v1/nothing", 404, "not_found"},
		{"lookup", "/api/v1/lookup?q=valve", 200, `"impression"`},
		{"hints", "/api/v1/hints?q=burst+pipe", 200, `"suggestions"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := get(t, s, c.path, nil)
			if rec.Code != c.status || !strings.Contains(rec.Body.String(), c.contains) {
				t.Errorf("GET %s: %d %s", c.path, rec.Code, rec.Body.String())
			}
			if rec.Header().Get("X-Content-Type-Options") != "nosniff" || rec.Header().Get("Content-Security-Policy") == "" {
				t.Errorf("security headers missing on %s", c.path)
			}
		})
	}
	m := get(t, s, "/metrics", nil).Body.String()
	if !strings.Contains(m, `kinword_http_requests_total{route="/api/v1/lookup",status="200"}`) {
		t.Errorf("metrics lack the lookup counter")
	}
}

// TestIdentityHeadersNeedTheSecret: group headers are honoured only with the
// proxy's shared secret; a forged header alone gives an anonymous viewer, who
// never sees the restricted document, its canary word, or a count of it.
func TestIdentityHeadersNeedTheSecret(t *testing.T) {
	s := newTestServer(t)
	type resp struct {
		Total   int `json:"total"`
		Results []struct {
			ID string `json:"id"`
		} `json:"results"`
	}
	cases := []struct {
		name    string
		hdr     map[string]string
		canSee  bool
		wantTot int
	}{
		{"anonymous", nil, false, 2},
		{"forged groups without secret", map[string]string{"X-Kinword-Groups": "executive"}, false, 2},
		{"wrong secret", map[string]string{"X-Kinword-Groups": "executive", "X-Kinword-Proxy-Secret": "guess"}, false, 2},
		{"trusted proxy", map[string]string{"X-Kinword-Groups": "executive", "X-Kinword-Proxy-Secret": "s3cret"}, true, 3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := get(t, s, "/api/v1/lookup?q=valve+kestrelmoor", c.hdr)
			body := rec.Body.String()
			var r resp
			if err := json.Unmarshal(rec.Body.Bytes(), &r); err != nil {
				t.Fatal(err)
			}
			// The query is echoed back (the searcher's own words); everything
			// else must be free of the canary for an outsider.
			rest := strings.ToLower(strings.Replace(body, `"query":"valve kestrelmoor"`, "", 1))
			if !c.canSee && (strings.Contains(rest, "kestrelmoor") || strings.Contains(body, `"id":"s"`)) {
				t.Errorf("restricted content reached an outsider: %s", body)
			}
			if c.canSee && !strings.Contains(body, `"id":"s"`) {
				t.Errorf("insider does not see the restricted document: %s", body)
			}
			if r.Total != c.wantTot {
				t.Errorf("total %d, want %d", r.Total, c.wantTot)
			}
		})
	}
}

// TestUsefulMarksRefine: marking a result useful is explicit relevance
// feedback (the feedback model over the marked document) — the results
// change toward it; a restricted document's ID marked by an outsider is
// ignored and leaks nothing.
func TestUsefulMarksRefine(t *testing.T) {
	s := newTestServer(t)
	plain := get(t, s, "/api/v1/lookup?q=main", nil).Body.String()
	marked := get(t, s, "/api/v1/lookup?q=main&useful=c", nil).Body.String()
	if plain == marked {
		t.Errorf("marking a document useful changed nothing")
	}
	if !strings.Contains(marked, `"id":"c"`) {
		t.Errorf("the marked document's terms did not bring it in: %s", marked)
	}
	probe := get(t, s, "/api/v1/lookup?q=main&useful=s", nil).Body.String()
	if strings.Contains(strings.ToLower(probe), "kestrelmoor") || strings.Contains(probe, `"id":"s"`) {
		t.Errorf("an outsider's mark on a restricted document leaked it: %s", probe)
	}
}

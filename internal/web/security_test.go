package web

import (
	"encoding/json"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"github.com/gin-gonic/gin"
)

// hardenedServer is newTestServer's finder behind a server with a
// librarian and an admin token, an in-memory rule book, the proxy secret
// "s3cret", every log level into the returned buffer, and the options mod
// changes.
func hardenedServer(t *testing.T, mod func(*Options)) (*Server, testTokens, *syncBuffer) {
	t.Helper()
	base := newTestServer(t)
	var tt testTokens
	var sums [2]string
	var err error
	if tt.librarian, sums[0], err = NewToken(); err != nil {
		t.Fatal(err)
	}
	if tt.admin, sums[1], err = NewToken(); err != nil {
		t.Fatal(err)
	}
	logs := &syncBuffer{}
	opts := Options{Identity: Identity{Secret: "s3cret"}, Rules: newFakeBook(),
		Tokens: []Token{{Name: "cataloguer", Role: RoleLibrarian, SHA256: sums[0]}, {Name: "ops", Role: RoleAdmin, SHA256: sums[1]}},
		Log:    slog.New(slog.NewTextHandler(logs, &slog.HandlerOptions{Level: slog.LevelDebug}))}
	if mod != nil {
		mod(&opts)
	}
	s, err := New(base.f, opts)
	if err != nil {
		t.Fatal(err)
	}
	return s, tt, logs
}

// apiMessage returns the message of the API's error shape.
func apiMessage(rec *httptest.ResponseRecorder) string {
	var e struct {
		Error struct{ Message string } `json:"error"`
	}
	_ = json.Unmarshal(rec.Body.Bytes(), &e)
	return e.Error.Message
}

// apiCode returns the code of the API's error shape ("" if the body is
// not one).
func apiCode(rec *httptest.ResponseRecorder) string {
	var e struct {
		Error struct{ Code, Message string } `json:"error"`
	}
	if json.Unmarshal(rec.Body.Bytes(), &e) != nil || e.Error.Message == "" {
		return ""
	}
	return e.Error.Code
}

// checkSecurityHeaders checks one answer's hardening headers:
//   - X-Content-Type-Options is exactly "nosniff" (WHATWG Fetch standard,
//     "X-Content-Type-Options" header; OWASP HTTP Headers Cheat Sheet;
//     from memory).
//   - Framing is denied twice: X-Frame-Options DENY (RFC 7034 section 2.1)
//     and CSP frame-ancestors 'none' (W3C CSP Level 2, frame-ancestors,
//     which supersedes X-Frame-Options; from memory).
//   - The CSP has a default-src, and scripts (script-src, or default-src
//     in its absence) allow neither 'unsafe-inline', 'unsafe-eval', data:
//     nor a wildcard; base-uri is 'none' or 'self' (OWASP Content Security
//     Policy Cheat Sheet, strict policy; from memory).
//   - Referrer-Policy is one of the W3C Referrer Policy tokens that do not
//     send the full URL cross-origin (not unsafe-url or
//     no-referrer-when-downgrade).
func checkSecurityHeaders(t *testing.T, what string, h http.Header) {
	t.Helper()
	if got := h.Get("X-Content-Type-Options"); got != "nosniff" {
		t.Errorf("%s: X-Content-Type-Options %q", what, got)
	}
	if got := h.Get("X-Frame-Options"); !strings.EqualFold(got, "DENY") {
		t.Errorf("%s: X-Frame-Options %q", what, got)
	}
	csp := map[string][]string{}
	for _, d := range strings.Split(h.Get("Content-Security-Policy"), ";") {
		f := strings.Fields(d)
		if len(f) > 0 {
			csp[strings.ToLower(f[0])] = f[1:]
		}
	}
	if got := strings.Join(csp["frame-ancestors"], " "); got != "'none'" {
		t.Errorf("%s: CSP frame-ancestors %q, want 'none'", what, got)
	}
	if len(csp["default-src"]) == 0 {
		t.Errorf("%s: CSP without default-src: %q", what, h.Get("Content-Security-Policy"))
	}
	scripts, ok := csp["script-src"]
	if !ok {
		scripts = csp["default-src"]
	}
	for _, src := range scripts {
		switch strings.ToLower(src) {
		case "'unsafe-inline'", "'unsafe-eval'", "data:", "*", "http:", "https:":
			t.Errorf("%s: CSP lets scripts come from %s", what, src)
		}
	}
	if b := strings.Join(csp["base-uri"], " "); b != "'none'" && b != "'self'" {
		t.Errorf("%s: CSP base-uri %q", what, b)
	}
	switch rp := h.Get("Referrer-Policy"); rp {
	case "no-referrer", "same-origin", "strict-origin", "strict-origin-when-cross-origin", "origin", "origin-when-cross-origin":
	default:
		t.Errorf("%s: Referrer-Policy %q", what, rp)
	}
}

// TestSecurityHeadersEveryGetRoute: every GET route of the route table
// answers with the hardening headers, whoever asks: anonymous callers
// (public pages, searcher answers, 401 refusals of the token routes) and
// the admin token (the token routes' own answers).
func TestSecurityHeadersEveryGetRoute(t *testing.T) {
	s, tt, _ := hardenedServer(t, nil)
	callers := []struct {
		name string
		hdr  map[string]string
	}{
		{"anonymous", nil},
		{"trusted proxy", map[string]string{"X-Kinword-Proxy-Secret": "s3cret", "X-Kinword-Department": "customer-care"}},
		{"admin token", bearerHdr(tt.admin)},
	}
	n := 0
	for _, r := range s.routes() {
		if r.Method != http.MethodGet {
			continue
		}
		path := samplePath(r.Path)
		if strings.HasPrefix(r.Path, "/api/v1/lookup") || strings.HasPrefix(r.Path, "/api/v1/hints") {
			path += "?q=valve"
		}
		for _, c := range callers {
			t.Run(r.Path+"/"+c.name, func(t *testing.T) {
				rec := call(t, s, http.MethodGet, path, "", c.hdr)
				checkSecurityHeaders(t, "GET "+path+" ("+http.StatusText(rec.Code)+")", rec.Header())
			})
			n++
		}
	}
	if n < 3*10 {
		t.Fatalf("only %d GET checks: the route table lost its GET routes?", n)
	}
}

// TestSecurityHeadersOnRefusals: the answers the protective middleware
// gives before any handler (403 cross-site, 413, 415, 429, 404, a
// recovered panic's 500) carry the headers too, since the headers are set
// first in the chain.
func TestSecurityHeadersOnRefusals(t *testing.T) {
	s, tt, _ := hardenedServer(t, func(o *Options) { o.RateLimit = RateLimit{PerSecond: 1, Burst: 1}; o.MaxBodyBytes = 1024 })
	s.engine.GET("/test-panic", func(*gin.Context) { panic("test panic") })
	admin := bearerHdr(tt.admin)
	with := func(extra map[string]string) map[string]string {
		m := map[string]string{"RemoteAddr": "192.0.2.50:1000"}
		for k, v := range admin {
			m[k] = v
		}
		for k, v := range extra {
			m[k] = v
		}
		return m
	}
	cases := []struct {
		name, method, path, body string
		hdr                      map[string]string
		status                   int
	}{
		{"cross-site", http.MethodPost, "/api/v1/reload", "", with(map[string]string{"Origin": "https://elsewhere.example", "Sec-Fetch-Site": "cross-site", "RemoteAddr": "192.0.2.51:1"}), 403},
		{"too large", http.MethodPost, "/api/v1/documents", strings.Repeat(" ", 2000), with(map[string]string{"RemoteAddr": "192.0.2.52:1"}), 413},
		{"wrong content type", http.MethodPost, "/api/v1/rules", "a,b", with(map[string]string{"Content-Type": "text/csv", "RemoteAddr": "192.0.2.53:1"}), 415},
		{"first of a client", http.MethodGet, "/api/v1/whoami", "", with(nil), 200},
		{"rate limited", http.MethodGet, "/api/v1/whoami", "", with(nil), 429},
		{"unknown route", http.MethodGet, "/nowhere", "", with(map[string]string{"RemoteAddr": "192.0.2.54:1"}), 404},
		{"panic", http.MethodGet, "/test-panic", "", with(map[string]string{"RemoteAddr": "192.0.2.55:1"}), 500},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := call(t, s, c.method, c.path, c.body, c.hdr)
			if rec.Code != c.status {
				t.Fatalf("status %d, want %d: %s", rec.Code, c.status, rec.Body)
			}
			checkSecurityHeaders(t, c.name, rec.Header())
		})
	}
}

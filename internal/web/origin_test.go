package web

import (
	"crypto/tls"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"github.com/gin-gonic/gin"
)

// widgetOrigin is the allowed origin of the tests (an invented intranet
// host of the demo organisation).
const widgetOrigin = "https://intranet.tarnwick.example"

// crossSiteCases are browser requests forged by another site, and
// requests that must keep working. httptest requests have Host
// example.com over plain HTTP, so the server's own origin is
// http://example.com.
var crossSiteCases = []struct {
	name    string
	hdr     map[string]string
	refused bool
}{
	// W3C Fetch Metadata Request Headers: Sec-Fetch-Site "cross-site"
	// is another site's page.
	{"forged origin with fetch metadata", map[string]string{"Origin": "https://attacker.example", "Sec-Fetch-Site": "cross-site"}, true},
	// A sibling host of the same site is another origin all the same.
	{"same site, other host", map[string]string{"Origin": "http://tools.example.com", "Sec-Fetch-Site": "same-site"}, true},
	// Browsers before Fetch Metadata send Origin only (OWASP CSRF
	// Prevention Cheat Sheet, verifying the origin; from memory).
	{"forged origin, old browser", map[string]string{"Origin": "https://attacker.example"}, true},
	// RFC 6454 section 7.3: "null" is an opaque origin (sandboxed frame,
	// data: URL); it is never this server.
	{"null origin", map[string]string{"Origin": "null"}, true},
	// Same host, other scheme: another origin (RFC 6454 section 5).
	{"https origin to an http server", map[string]string{"Origin": "https://example.com"}, true},
	{"other port", map[string]string{"Origin": "http://example.com:8080"}, true},
	{"user-started request with a foreign origin", map[string]string{"Origin": "https://attacker.example", "Sec-Fetch-Site": "none"}, true},
	{"same origin with fetch metadata", map[string]string{"Origin": "http://example.com", "Sec-Fetch-Site": "same-origin"}, false},
	{"same origin, old browser", map[string]string{"Origin": "http://example.com"}, false},
	// Browsers never write the default port (RFC 6454 section 6.2).
	{"default port written out", map[string]string{"Origin": "http://example.com:80"}, true},
	{"no browser headers (curl, scripts)", nil, false},
	{"allowed widget origin", map[string]string{"Origin": widgetOrigin, "Sec-Fetch-Site": "cross-site"}, false},
}

// TestOriginEveryStateChangingRoute: every POST, PUT and DELETE route of
// the route table refuses a forged cross-site request with 403 cross_site,
// even with a valid admin token (the refusal comes before the role check),
// and lets same-origin and non-browser requests through to the role check
// and the handler (which may answer anything but a cross_site 403).
func TestOriginEveryStateChangingRoute(t *testing.T) {
	s, tt, _ := hardenedServer(t, func(o *Options) { o.AllowedOrigins = []string{widgetOrigin} })
	n := 0
	for _, r := range s.routes() {
		if !stateChanging(r.Method) {
			continue
		}
		n++
		for _, c := range crossSiteCases {
			t.Run(r.Method+" "+r.Path+"/"+c.name, func(t *testing.T) {
				hdr := bearerHdr(tt.admin)
				for k, v := range c.hdr {
					hdr[k] = v
				}
				rec := call(t, s, r.Method, samplePath(r.Path), "{}", hdr)
				refused := rec.Code == http.StatusForbidden && apiCode(rec) == "cross_site"
				if refused != c.refused {
					t.Fatalf("refused %v, want %v: %d %s", refused, c.refused, rec.Code, rec.Body)
				}
				if !c.refused && rec.Code == http.StatusForbidden {
					t.Fatalf("an admin token was refused: %s", rec.Body)
				}
			})
		}
	}
	if n < 10 {
		t.Fatalf("only %d state-changing routes in the table", n)
	}
}

// TestOriginDemoGrantNeedsSameOrigin: demo mode grants admin to any
// loopback caller without a token, an ambient authority another site's
// page could borrow through the visitor's browser; a cross-site POST is
// refused, the demo page's own POST works.
func TestOriginDemoGrantNeedsSameOrigin(t *testing.T) {
	s, _, _ := hardenedServer(t, func(o *Options) { o.Demo = true })
	loop := map[string]string{"RemoteAddr": "127.0.0.1:40000", "Origin": "https://attacker.example", "Sec-Fetch-Site": "cross-site"}
	if rec := call(t, s, http.MethodPost, "/api/v1/reload", "", loop); rec.Code != http.StatusForbidden || apiCode(rec) != "cross_site" {
		t.Fatalf("cross-site reload in demo mode: %d %s", rec.Code, rec.Body)
	}
	loop["Origin"], loop["Sec-Fetch-Site"] = "http://example.com", "same-origin"
	if rec := call(t, s, http.MethodPost, "/api/v1/reload", "", loop); rec.Code != http.StatusOK {
		t.Fatalf("same-origin reload in demo mode: %d %s", rec.Code, rec.Body)
	}
}

// TestOriginAgreesWithNetHTTP compares the check with Go's own
// net/http.CrossOriginProtection (Go 1.25+), a reference implementation of
// the same Fetch Metadata and Origin rules: both decide alike, except in
// the cases marked stricter, where Kinword also compares the scheme and
// reads Origin when Sec-Fetch-Site is "none" (and trusts the proxy's
// X-Forwarded-Proto only with the shared secret).
func TestOriginAgreesWithNetHTTP(t *testing.T) {
	s, _, _ := hardenedServer(t, func(o *Options) { o.AllowedOrigins = []string{widgetOrigin} })
	ref := http.NewCrossOriginProtection()
	if err := ref.AddTrustedOrigin(widgetOrigin); err != nil {
		t.Fatal(err)
	}
	proxied := map[string]string{"X-Kinword-Proxy-Secret": "s3cret", "X-Forwarded-Proto": "https", "Origin": "https://example.com"}
	cases := []struct {
		name     string
		method   string
		tls      bool
		hdr      map[string]string
		stricter bool
	}{
		{"GET from anywhere", http.MethodGet, false, map[string]string{"Origin": "https://attacker.example", "Sec-Fetch-Site": "cross-site"}, false},
		{"HEAD from anywhere", http.MethodHead, false, map[string]string{"Sec-Fetch-Site": "cross-site"}, false},
		{"OPTIONS preflight", http.MethodOptions, false, map[string]string{"Origin": "https://attacker.example"}, false},
		{"PATCH cross-site", http.MethodPatch, false, map[string]string{"Sec-Fetch-Site": "cross-site"}, false},
		{"unknown Sec-Fetch-Site value", http.MethodPost, false, map[string]string{"Sec-Fetch-Site": "other-galaxy"}, false},
		{"TLS same origin, old browser", http.MethodPost, true, map[string]string{"Origin": "https://example.com"}, false},
		{"TLS, http origin", http.MethodPost, true, map[string]string{"Origin": "http://example.com"}, true},
		{"trusted proxy says https", http.MethodPost, false, proxied, false},
		{"untrusted proxy says https", http.MethodPost, false, map[string]string{"X-Forwarded-Proto": "https", "Origin": "https://example.com"}, true},
		{"upper-case host in Origin", http.MethodPost, false, map[string]string{"Origin": "http://EXAMPLE.com"}, false},
	}
	for _, c := range crossSiteCases {
		cases = append(cases, struct {
			name     string
			method   string
			tls      bool
			hdr      map[string]string
			stricter bool
		}{c.name, http.MethodPost, false, c.hdr, c.name == "https origin to an http server" || c.name == "user-started request with a foreign origin"})
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			req := httptest.NewRequest(c.method, "/api/v1/reload", nil)
			if c.tls {
				req.TLS = &tls.ConnectionState{}
			}
			for k, v := range c.hdr {
				req.Header.Set(k, v)
			}
			gc, _ := gin.CreateTestContext(httptest.NewRecorder())
			gc.Request = req
			ours := s.crossSiteReason(gc) != ""
			theirs := ref.Check(req) != nil
			switch {
			case c.stricter && (!ours || theirs):
				t.Fatalf("expected Kinword to refuse (%v) what net/http allows (%v)", ours, theirs)
			case !c.stricter && ours != theirs:
				t.Fatalf("Kinword refuses %v, net/http refuses %v", ours, theirs)
			}
		})
	}
}

// TestOriginAllowedListShape: Options.AllowedOrigins entries are compared
// with the Origin header byte for byte, so New refuses entries a browser
// never sends (RFC 6454 section 6.1 serialisation: lower case, no path).
func TestOriginAllowedListShape(t *testing.T) {
	cases := []struct {
		origin string
		ok     bool
	}{
		{widgetOrigin, true},
		{"http://intranet.tarnwick.example:8443", true},
		{"http://[2001:db8::1]:8080", true},
		{widgetOrigin + "/", false},
		{widgetOrigin + "/search", false},
		{"HTTPS://intranet.tarnwick.example", false},
		{"ftp://intranet.tarnwick.example", false},
		{"intranet.tarnwick.example", false},
		{"https://user@intranet.tarnwick.example", false},
	}
	for _, c := range cases {
		t.Run(c.origin, func(t *testing.T) {
			_, err := New(nil, Options{AllowedOrigins: []string{c.origin}})
			if (err == nil) != c.ok {
				t.Fatalf("New: %v, want ok=%v", err, c.ok)
			}
			if err != nil && !strings.Contains(err.Error(), "web: allowed origin") {
				t.Errorf("error %q lacks the package prefix and the option", err)
			}
		})
	}
}

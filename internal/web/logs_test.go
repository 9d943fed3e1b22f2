package web

import (
	"crypto/rand"
	"encoding/base64"
	"encoding/hex"
	"net/http"
	"strings"
	"testing"

	"github.com/gin-gonic/gin"
)

// randomSecret is a fresh random string, so that any trace of it in a log
// is a leak and never a coincidence.
func randomSecret(t *testing.T, prefix string) string {
	t.Helper()
	b := make([]byte, 24)
	if _, err := rand.Read(b); err != nil {
		t.Fatal(err)
	}
	return prefix + hex.EncodeToString(b)
}

// captureGinWriters points gin's own output writers (gin.Recovery and
// gin.Logger write there) at a buffer for the test.
func captureGinWriters(t *testing.T) *syncBuffer {
	t.Helper()
	buf := &syncBuffer{}
	out, errw := gin.DefaultWriter, gin.DefaultErrorWriter
	gin.DefaultWriter, gin.DefaultErrorWriter = buf, buf
	t.Cleanup(func() { gin.DefaultWriter, gin.DefaultErrorWriter = out, errw })
	return buf
}

// TestLogNoSecrets runs requests carrying every kind of credential the
// server sees through a server that logs at debug level (one line per
// request, plus its warnings and errors), including the paths that log on
// purpose: a refused token, a weaker token, a cross-site refusal, a rate
// limit, an oversized body, a handler panic. No credential, nor any 12
// characters of one, may appear in the log or in gin's own output (OWASP
// Logging Cheat Sheet, data to exclude: access tokens, passwords,
// encryption keys and other secrets; from memory), and the identity
// headers' values (a person's department and groups) are not logged
// either. The log must show the token's name instead, so the test sees a
// log that was written.
func TestLogNoSecrets(t *testing.T) {
	proxySecret, wrongSecret := randomSecret(t, "pxy-"), randomSecret(t, "guess-")
	bogus := TokenPrefix + base64.RawURLEncoding.EncodeToString([]byte(randomSecret(t, "")))[:43]
	password := randomSecret(t, "pw-")
	basic := base64.StdEncoding.EncodeToString([]byte("harbourmaster:" + password))
	dept, groups := randomSecret(t, "dept-"), randomSecret(t, "grp-")
	inQuery := randomSecret(t, "qs-")
	s, tt, logs := hardenedServer(t, func(o *Options) {
		o.Identity.Secret = proxySecret
		o.RateLimit = RateLimit{PerSecond: 1, Burst: 2}
		o.MaxBodyBytes = 2048
	})
	s.engine.POST("/test-panic", func(c *gin.Context) { panic("handler failed mid-request") })
	ginOut := captureGinWriters(t)

	identity := map[string]string{"X-Kinword-Proxy-Secret": proxySecret, "X-Kinword-Department": dept, "X-Kinword-Groups": groups + ",executive"}
	merge := func(ms ...map[string]string) map[string]string {
		out := map[string]string{}
		for _, m := range ms {
			for k, v := range m {
				out[k] = v
			}
		}
		return out
	}
	from := func(n int) map[string]string {
		return map[string]string{"RemoteAddr": "192.0.2." + string(rune('0'+n)) + ":4000"}
	}
	requests := []struct {
		name, method, path, body string
		hdr                      map[string]string
	}{
		{"lookup via the proxy", http.MethodGet, "/api/v1/lookup?q=valve", "", merge(identity, from(1))},
		{"lookup with a wrong proxy secret", http.MethodGet, "/api/v1/lookup?q=valve", "", merge(identity, from(1), map[string]string{"X-Kinword-Proxy-Secret": wrongSecret})},
		{"token in the query string", http.MethodGet, "/api/v1/hints?q=valve&access_token=" + inQuery, "", from(2)},
		{"signals via the proxy", http.MethodPost, "/api/v1/signals", `{"events":[]}`, merge(identity, from(2))},
		{"admin push", http.MethodPost, "/api/v1/documents", `{"documents":[{"id":"log-1","body":"sluice"}]}`, merge(bearerHdr(tt.admin), from(3))},
		{"admin reload", http.MethodPost, "/api/v1/reload", "", merge(bearerHdr(tt.admin), identity, from(3))},
		{"librarian token on an admin route", http.MethodGet, "/api/v1/review", "", merge(bearerHdr(tt.librarian), from(4))},
		{"unknown token", http.MethodPost, "/api/v1/reload", "", merge(bearerHdr(bogus), from(4))},
		{"basic credentials", http.MethodGet, "/api/v1/rules", "", merge(map[string]string{"Authorization": "Basic " + basic}, from(5))},
		{"cross-site with a token", http.MethodPost, "/api/v1/reload", "", merge(bearerHdr(tt.admin), identity, from(5), map[string]string{"Origin": "https://attacker.example", "Sec-Fetch-Site": "cross-site"})},
		{"oversized body with a token", http.MethodPost, "/api/v1/documents", strings.Repeat(tt.admin, 100), merge(bearerHdr(tt.admin), from(6))},
		{"panic with every credential", http.MethodPost, "/test-panic", "{}", merge(bearerHdr(tt.admin), identity, from(7))},
		{"rate limited 1", http.MethodGet, "/api/v1/whoami", "", merge(bearerHdr(tt.admin), identity, from(8))},
		{"rate limited 2", http.MethodGet, "/api/v1/whoami", "", merge(bearerHdr(tt.admin), identity, from(8))},
		{"rate limited 3", http.MethodGet, "/api/v1/whoami", "", merge(bearerHdr(tt.admin), identity, from(8))},
		{"unknown route with a token", http.MethodGet, "/api/v1/secret-" + "x", "", merge(bearerHdr(tt.admin), from(9))},
	}
	statuses := map[int]bool{}
	for _, r := range requests {
		rec := call(t, s, r.method, r.path, r.body, r.hdr)
		statuses[rec.Code] = true
	}
	for _, want := range []int{200, 400, 401, 403, 404, 413, 429, 500, 503} {
		if !statuses[want] {
			t.Errorf("no request answered %d: the test does not reach that path", want)
		}
	}
	log := logs.String() + ginOut.String()
	for _, must := range []string{"msg=request", "caller=ops", "handler panic", "rejected an unknown API token", "refused a cross-site request"} {
		if !strings.Contains(log, must) {
			t.Errorf("the log lacks %q:\n%s", must, log)
		}
	}
	if n := strings.Count(logs.String(), "msg=request "); n != len(requests) {
		t.Errorf("%d request lines for %d requests", n, len(requests))
	}
	secrets := map[string]string{
		"admin token": tt.admin, "librarian token": tt.librarian, "unknown token": bogus,
		"proxy secret": proxySecret, "wrong proxy secret": wrongSecret,
		"basic credentials": basic, "password": password, "token in the query": inQuery,
		"department header": dept, "groups header": groups,
		"admin token hash": HashToken(tt.admin),
	}
	for what, sec := range secrets {
		for i := 0; i+12 <= len(sec); i++ {
			if w := sec[i : i+12]; strings.Contains(log, w) {
				t.Errorf("the log holds 12 characters of the %s (%q):\n%s", what, w, log)
				break
			}
		}
	}
	if ginOut.String() != "" {
		t.Errorf("gin wrote on its own: %s", ginOut)
	}
}

// TestLogPanicAnswers500: a handler panic answers 500 in the error shape
// with the security headers and is logged once, at error level, with its
// route and value, and the server keeps serving.
func TestLogPanicAnswers500(t *testing.T) {
	s, _, logs := hardenedServer(t, nil)
	s.engine.GET("/test-panic", func(*gin.Context) { panic("boom at the sluice") })
	ginOut := captureGinWriters(t)
	rec := call(t, s, http.MethodGet, "/test-panic", "", nil)
	if rec.Code != 500 || apiCode(rec) != "internal" {
		t.Fatalf("%d %s", rec.Code, rec.Body)
	}
	checkSecurityHeaders(t, "panic", rec.Header())
	line := ""
	for _, l := range strings.Split(logs.String(), "\n") {
		if strings.Contains(l, "handler panic") {
			line = l
		}
	}
	if !strings.Contains(line, "level=ERROR") || !strings.Contains(line, "route=/test-panic") || !strings.Contains(line, "boom at the sluice") {
		t.Errorf("panic line %q", line)
	}
	if rec := call(t, s, http.MethodGet, "/healthz", "", nil); rec.Code != 200 {
		t.Errorf("after a panic: %d", rec.Code)
	}
	if ginOut.String() != "" {
		t.Errorf("gin wrote on its own: %s", ginOut)
	}
}

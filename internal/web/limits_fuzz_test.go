package web

import (
	"net/http"
	"net/http/httptest"
	"net/netip"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/gin-gonic/gin"
)

// FuzzStrictQuery feeds raw query strings to the lookup parameter check:
// it never panics; an accepted query holds only the allowed names, each
// value valid UTF-8 without control characters and (but q) bounded; a
// refused one answers 400 in the error shape.
func FuzzStrictQuery(f *testing.F) {
	for _, s := range []string{"q=valve", "q=valve&accepted=a|b&useful=c&persona=x", "q=%FF", "q=a&q=b", "k=99999999999999999999",
		"q=%zz", "q=a;b", "%00=1", "q=valve%00", "q=valve%C2%85", "=", "&&&", "q", "q=" + strings.Repeat("a", 5000)} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, raw string) {
		rec := httptest.NewRecorder()
		c, _ := gin.CreateTestContext(rec)
		c.Request = httptest.NewRequest(http.MethodGet, "/api/v1/hints", nil)
		c.Request.URL.RawQuery = raw
		vals, ok := strictQuery(c, lookupParams...)
		if !ok {
			if rec.Code != http.StatusBadRequest || apiCode(rec) == "" {
				t.Fatalf("refused %q with %d %s", raw, rec.Code, rec.Body)
			}
			return
		}
		if len(vals) != len(lookupParams) {
			t.Fatalf("names %v", vals)
		}
		for name, v := range vals {
			if !strings.Contains(","+strings.Join(lookupParams, ",")+",", ","+name+",") {
				t.Fatalf("accepted name %q", name)
			}
			if !utf8.ValidString(v) || strings.ContainsFunc(v, isControl) || name != "q" && len(v) > maxParamBytes {
				t.Fatalf("accepted %s=%q", name, v)
			}
		}
	})
}

// FuzzForwardedFor: the X-Forwarded-For parser never panics and returns
// an address only when the last comma-separated entry is one (with or
// without a port).
func FuzzForwardedFor(f *testing.F) {
	for _, s := range []string{"198.51.100.7", "203.0.113.9, 198.51.100.7", "198.51.100.7:80", "[2001:db8::1]:80", "2001:db8::1",
		"unknown", "", ",", " , 198.51.100.1 ", "fe80::1%eth0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, line string) {
		a, ok := forwardedFor([]string{line})
		parts := strings.Split(line, ",")
		last := strings.TrimSpace(parts[len(parts)-1])
		_, e1 := netip.ParseAddr(last)
		_, e2 := netip.ParseAddrPort(last)
		if ok != (e1 == nil || e2 == nil) || ok && !a.IsValid() {
			t.Fatalf("%q: %v %v", line, a, ok)
		}
	})
}

// FuzzCrossSite: the cross-site check never panics, never refuses a safe
// method, and always refuses a state-changing request that says
// Sec-Fetch-Site: cross-site from an origin that is not allowed.
func FuzzCrossSite(f *testing.F) {
	s, err := New(nil, Options{AllowedOrigins: []string{widgetOrigin}})
	if err != nil {
		f.Fatal(err)
	}
	f.Add("POST", "cross-site", "https://attacker.example", "example.com")
	f.Add("GET", "cross-site", "null", "example.com")
	f.Add("DELETE", "", "http://example.com", "example.com")
	f.Add("PUT", "none", "", "")
	f.Fuzz(func(t *testing.T, method, site, origin, host string) {
		req := httptest.NewRequest(http.MethodPost, "/api/v1/reload", nil)
		req.Method, req.Host = method, host
		req.Header["Sec-Fetch-Site"] = []string{site}
		req.Header["Origin"] = []string{origin}
		c, _ := gin.CreateTestContext(httptest.NewRecorder())
		c.Request = req
		why := s.crossSiteReason(c)
		if !stateChanging(method) && why != "" {
			t.Fatalf("%s refused: %s", method, why)
		}
		if stateChanging(method) && site == "cross-site" && origin != widgetOrigin && why == "" {
			t.Fatalf("cross-site %s from %q allowed", method, origin)
		}
	})
}

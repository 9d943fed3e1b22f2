package web

import (
	"bytes"
	"encoding/json"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strings"
	"sync"
	"testing"

	"github.com/gin-gonic/gin"
)

// testTokens are one librarian and one admin token of a test server.
type testTokens struct{ librarian, admin string }

// syncBuffer is a log sink safe for concurrent handlers.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (w *syncBuffer) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.b.Write(p)
}

func (w *syncBuffer) String() string {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.b.String()
}

// tokenServer is newTestServer's corpus and finder behind a server with a
// librarian token "cataloguer" and an admin token "ops", logging every
// level into the returned buffer.
func tokenServer(t *testing.T, demo bool) (*Server, testTokens, *syncBuffer) {
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
	s, err := New(base.f, Options{Identity: Identity{Secret: "s3cret"}, Demo: demo,
		Tokens: []Token{{Name: "cataloguer", Role: RoleLibrarian, SHA256: sums[0]}, {Name: "ops", Role: RoleAdmin, SHA256: sums[1]}},
		Log:    slog.New(slog.NewTextHandler(logs, &slog.HandlerOptions{Level: slog.LevelDebug}))})
	if err != nil {
		t.Fatal(err)
	}
	return s, tt, logs
}

// call sends one request; body, when not empty, goes as application/json.
func call(t *testing.T, s *Server, method, path, body string, hdr map[string]string) *httptest.ResponseRecorder {
	t.Helper()
	var rd io.Reader
	if body != "" {
		rd = strings.NewReader(body)
	}
	req := httptest.NewRequest(method, path, rd)
	if body != "" {
		req.Header.Set("Content-Type", "application/json")
	}
	for k, v := range hdr {
		if k == "RemoteAddr" {
			req.RemoteAddr = v
			continue
		}
		req.Header.Set(k, v)
	}
	rec := httptest.NewRecorder()
	s.Handler().ServeHTTP(rec, req)
	return rec
}

func bearerHdr(token string) map[string]string {
	return map[string]string{"Authorization": "Bearer " + token}
}

// samplePath fills a route pattern's parameters.
func samplePath(p string) string {
	p = strings.Replace(p, "/*file", "/app.js", 1)
	p = strings.Replace(p, "/*id", "/no-such-document", 1)
	return p
}

// checkRefusal checks a 401 or 403 against RFC 6750 section 3 (a
// WWW-Authenticate: Bearer challenge; error="invalid_token" for a bad
// token, error="insufficient_scope" for a weaker one) and RFC 9110 section
// 15.5.2 (401 carries a challenge), and the API's one error shape.
func checkRefusal(t *testing.T, rec *httptest.ResponseRecorder, status int, invalid bool) {
	t.Helper()
	if rec.Code != status {
		t.Fatalf("status %d, want %d: %s", rec.Code, status, rec.Body)
	}
	ch := rec.Header().Get("WWW-Authenticate")
	if !strings.HasPrefix(ch, "Bearer ") {
		t.Errorf("challenge %q is not a Bearer challenge", ch)
	}
	if status == http.StatusForbidden && !strings.Contains(ch, `error="insufficient_scope"`) {
		t.Errorf("403 challenge %q lacks insufficient_scope", ch)
	}
	if invalid && !strings.Contains(ch, `error="invalid_token"`) {
		t.Errorf("challenge %q lacks invalid_token", ch)
	}
	var e struct {
		Error struct{ Code, Message string } `json:"error"`
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &e); err != nil || e.Error.Code == "" || e.Error.Message == "" {
		t.Errorf("not the API error shape: %s", rec.Body)
	}
}

// TestRoleEveryRouteEveryCaller: for every route of the route table and
// every kind of caller, the outcome follows from the route's Role alone:
// public and searcher routes serve everyone; librarian and admin routes
// answer 401 without a valid token and 403 to a token of a weaker role.
func TestRoleEveryRouteEveryCaller(t *testing.T) {
	s, tt, _ := tokenServer(t, false)
	callers := []struct {
		name  string
		hdr   map[string]string
		holds Role // "" = no valid token
		bad   bool // presents a token that is not valid
	}{
		{"anonymous", nil, "", false},
		{"searcher via trusted proxy", map[string]string{"X-Kinword-Department": "customer-care", "X-Kinword-Groups": "executive", "X-Kinword-Proxy-Secret": "s3cret"}, "", false},
		{"forged identity without secret", map[string]string{"X-Kinword-Department": "legal-compliance", "X-Kinword-Groups": "executive,admin"}, "", false},
		{"librarian token", bearerHdr(tt.librarian), RoleLibrarian, false},
		{"admin token", bearerHdr(tt.admin), RoleAdmin, false},
		{"invalid token", bearerHdr("kw_" + strings.Repeat("A", 43)), "", true},
		{"loopback without token outside demo", map[string]string{"RemoteAddr": "127.0.0.1:40000"}, "", false},
	}
	for _, r := range s.routes() {
		for _, c := range callers {
			t.Run(r.Method+" "+r.Path+"/"+c.name, func(t *testing.T) {
				body := ""
				if r.Method == http.MethodPost {
					body = "{}"
				}
				rec := call(t, s, r.Method, samplePath(r.Path), body, c.hdr)
				switch {
				case r.Role.rank() <= RoleSearcher.rank():
					if rec.Code == 401 || rec.Code == 403 {
						t.Fatalf("%s route refused: %d %s", r.Role, rec.Code, rec.Body)
					}
				case c.holds == "":
					checkRefusal(t, rec, http.StatusUnauthorized, c.bad)
				case c.holds.rank() < r.Role.rank():
					checkRefusal(t, rec, http.StatusForbidden, false)
				default:
					if rec.Code == 401 || rec.Code == 403 {
						t.Fatalf("%s token refused on a %s route: %d %s", c.holds, r.Role, rec.Code, rec.Body)
					}
				}
				if strings.Contains(rec.Body.String(), "no such route") {
					t.Fatalf("the sample path %s matched no route", samplePath(r.Path))
				}
			})
		}
	}
}

// TestRoleAdminRoutes: the issue makes document push, delete and reload
// admin-only; the route table must say so (the matrix above derives its
// expectations from the table, so this pins the table itself).
func TestRoleAdminRoutes(t *testing.T) {
	want := map[string]Role{
		"POST /api/v1/documents":       RoleAdmin,
		"DELETE /api/v1/documents/*id": RoleAdmin,
		"POST /api/v1/reload":          RoleAdmin,
	}
	got := map[string]Role{}
	for _, r := range (&Server{}).routes() {
		got[r.Method+" "+r.Path] = r.Role
	}
	for k, role := range want {
		if got[k] != role {
			t.Errorf("%s: role %q, want %q", k, got[k], role)
		}
	}
}

// TestRoleMiddlewareEveryRole drives the middleware on one route per role
// (the route table has no librarian route yet), demo grant included.
func TestRoleMiddlewareEveryRole(t *testing.T) {
	lib, libSum, _ := NewToken()
	adm, admSum, _ := NewToken()
	toks := []Token{{Name: "cataloguer", Role: RoleLibrarian, SHA256: libSum}, {Name: "ops", Role: RoleAdmin, SHA256: admSum}}
	build := func(demo bool) *gin.Engine {
		s, err := New(nil, Options{Demo: demo, Tokens: toks, Log: slog.New(slog.NewTextHandler(io.Discard, nil))})
		if err != nil {
			t.Fatal(err)
		}
		e := gin.New()
		for _, r := range []Role{RolePublic, RoleSearcher, RoleLibrarian, RoleAdmin} {
			e.GET("/"+string(r), s.authorize(r), func(c *gin.Context) {
				w := s.caller(c)
				c.String(http.StatusOK, "%s %s %v", w.Role, w.Name, w.Demo)
			})
		}
		return e
	}
	plain, demo := build(false), build(true)
	const remote, loop = "192.0.2.7:5000", "127.0.0.1:5000" // RFC 5737 documentation address; loopback
	cases := []struct {
		name   string
		e      *gin.Engine
		route  Role
		remote string
		auth   string
		status int
		body   string
	}{
		{"public, nobody", plain, RolePublic, remote, "", 200, "searcher"},
		{"searcher, nobody", plain, RoleSearcher, remote, "", 200, "searcher"},
		{"searcher, bad token ignored", plain, RoleSearcher, remote, "Bearer kw_nope", 200, "searcher"},
		{"searcher, other scheme ignored", plain, RoleSearcher, remote, "Basic dXNlcjpwdw==", 200, "searcher"},
		{"librarian, nobody", plain, RoleLibrarian, remote, "", 401, "unauthorized"},
		{"librarian, other scheme", plain, RoleLibrarian, remote, "Basic dXNlcjpwdw==", 401, "unauthorized"},
		{"librarian, bad token", plain, RoleLibrarian, remote, "Bearer kw_nope", 401, "invalid_token"},
		{"librarian, librarian token", plain, RoleLibrarian, remote, "Bearer " + lib, 200, "librarian cataloguer false"},
		{"librarian, admin token", plain, RoleLibrarian, remote, "Bearer " + adm, 200, "admin ops false"},
		{"librarian, lower-case scheme", plain, RoleLibrarian, remote, "bearer " + lib, 200, "librarian cataloguer"},
		{"admin, librarian token", plain, RoleAdmin, remote, "Bearer " + lib, 403, "forbidden"},
		{"admin, admin token", plain, RoleAdmin, remote, "Bearer " + adm, 200, "admin ops false"},
		{"admin, token with a suffix", plain, RoleAdmin, remote, "Bearer " + adm + "x", 401, "invalid_token"},
		{"admin, oversized token", plain, RoleAdmin, remote, "Bearer kw_" + strings.Repeat("a", 600), 401, "invalid_token"},
		{"admin, loopback outside demo", plain, RoleAdmin, loop, "", 401, "unauthorized"},
		{"demo: admin, loopback", demo, RoleAdmin, loop, "", 200, "admin demo true"},
		{"demo: librarian, loopback", demo, RoleLibrarian, loop, "", 200, "admin demo true"},
		{"demo: admin, ipv6 loopback", demo, RoleAdmin, "[::1]:5000", "", 200, "admin demo true"},
		{"demo: admin, remote", demo, RoleAdmin, remote, "", 401, "unauthorized"},
		{"demo: admin, loopback bad token", demo, RoleAdmin, loop, "Bearer kw_nope", 401, "invalid_token"},
		{"demo: admin, loopback librarian token", demo, RoleAdmin, loop, "Bearer " + lib, 403, "forbidden"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			req := httptest.NewRequest(http.MethodGet, "/"+string(c.route), nil)
			req.RemoteAddr = c.remote
			if c.auth != "" {
				req.Header.Set("Authorization", c.auth)
			}
			rec := httptest.NewRecorder()
			c.e.ServeHTTP(rec, req)
			if rec.Code != c.status || !strings.Contains(rec.Body.String(), c.body) {
				t.Fatalf("%d %q, want %d containing %q", rec.Code, rec.Body, c.status, c.body)
			}
			if c.status == 401 && !strings.HasPrefix(rec.Header().Get("WWW-Authenticate"), "Bearer") {
				t.Errorf("401 without a Bearer challenge (RFC 9110 section 15.5.2)")
			}
			if demoMarked := rec.Header().Get("X-Kinword-Demo-Role") != ""; demoMarked != strings.Contains(c.body, "demo true") {
				t.Errorf("demo marker header %v, demo grant %v", demoMarked, !demoMarked)
			}
		})
	}
}

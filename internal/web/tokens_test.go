package web

import (
	"encoding/base64"
	"errors"
	"net/http"
	"net/http/httptest"
	"regexp"
	"strings"
	"testing"

	"github.com/gin-gonic/gin"
)

// TestTokenHash: HashToken is SHA-256 in lowercase hex; the check values
// are the published examples of FIPS 180-2 (2002), Appendix B.1 ("abc")
// and of the empty message (NIST CSRC example values, from memory).
func TestTokenHash(t *testing.T) {
	cases := []struct{ name, in, want string }{
		{"FIPS 180-2 B.1 abc", "abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"},
		{"empty message", "", "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := HashToken(c.in); got != c.want {
				t.Errorf("HashToken(%q) = %s, want %s", c.in, got, c.want)
			}
		})
	}
}

// TestTokenNew: a token is "kw_" and 32 random bytes in unpadded base64url
// (RFC 4648 section 5: 43 characters from A-Z a-z 0-9 - _), the returned
// hash is its SHA-256, and two tokens differ.
func TestTokenNew(t *testing.T) {
	shape := regexp.MustCompile(`^kw_[A-Za-z0-9_-]{43}$`)
	seen := map[string]bool{}
	for i := 0; i < 20; i++ {
		tok, sum, err := NewToken()
		if err != nil {
			t.Fatal(err)
		}
		if !shape.MatchString(tok) {
			t.Fatalf("token %q has the wrong shape", tok)
		}
		raw, err := base64.RawURLEncoding.DecodeString(strings.TrimPrefix(tok, TokenPrefix))
		if err != nil || len(raw) != 32 {
			t.Fatalf("token body decodes to %d bytes (%v), want 32", len(raw), err)
		}
		if sum != HashToken(tok) || strings.Contains(sum, tok) {
			t.Fatalf("hash %s is not the SHA-256 of the token", sum)
		}
		if seen[tok] {
			t.Fatalf("token repeated after %d draws", i)
		}
		seen[tok] = true
	}
}

// TestTokenSetValidation: configured tokens need a name, a librarian or
// admin role, a 64-digit hex hash, and unique names and hashes.
func TestTokenSetValidation(t *testing.T) {
	h1, h2 := HashToken("one"), HashToken("two")
	cases := []struct {
		name   string
		tokens []Token
		ok     bool
	}{
		{"none", nil, true},
		{"librarian and admin", []Token{{"a", RoleLibrarian, h1}, {"b", RoleAdmin, h2}}, true},
		{"no name", []Token{{"", RoleAdmin, h1}}, false},
		{"searcher role", []Token{{"a", RoleSearcher, h1}}, false},
		{"public role", []Token{{"a", RolePublic, h1}}, false},
		{"short hash", []Token{{"a", RoleAdmin, h1[:62]}}, false},
		{"token in clear", []Token{{"a", RoleAdmin, "kw_" + strings.Repeat("x", 43)}}, false},
		{"same name", []Token{{"a", RoleAdmin, h1}, {"a", RoleLibrarian, h2}}, false},
		{"same hash", []Token{{"a", RoleAdmin, h1}, {"b", RoleLibrarian, h1}}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := newTokenSet(c.tokens)
			if (err == nil) != c.ok {
				t.Fatalf("err %v, want ok=%v", err, c.ok)
			}
			if err != nil && !errors.Is(err, ErrBadToken) {
				t.Errorf("error %v does not wrap ErrBadToken", err)
			}
		})
	}
	if _, err := New(nil, Options{Tokens: []Token{{"a", RoleSearcher, h1}}}); err == nil {
		t.Errorf("New accepted a searcher token")
	}
}

// TestTokenNeverLogged: requests with good, weaker, unknown and demo-less
// tokens leave log lines that name the token, never its text (nor its
// random part), and no response echoes it.
func TestTokenNeverLogged(t *testing.T) {
	s, tt, logs := tokenServer(t, false)
	unknown := "kw_" + strings.Repeat("Q", 43)
	reqs := []struct {
		name, method, path, body, token string
		status                          int
	}{
		{"admin reload", http.MethodPost, "/api/v1/reload", "", tt.admin, 200},
		{"admin push", http.MethodPost, "/api/v1/documents", `{"documents":[{"id":"log-1","body":"Meter readings are logged monthly."}]}`, tt.admin, 200},
		{"admin delete", http.MethodDelete, "/api/v1/documents/log-1", "", tt.admin, 200},
		{"librarian on an admin route", http.MethodPost, "/api/v1/reload", "", tt.librarian, 403},
		{"unknown token", http.MethodPost, "/api/v1/reload", "", unknown, 401},
		{"searcher route with a token", http.MethodGet, "/api/v1/lookup?q=valve", "", tt.admin, 200},
	}
	var bodies strings.Builder
	for _, r := range reqs {
		t.Run(r.name, func(t *testing.T) {
			rec := call(t, s, r.method, r.path, r.body, bearerHdr(r.token))
			if rec.Code != r.status {
				t.Fatalf("status %d, want %d: %s", rec.Code, r.status, rec.Body)
			}
			bodies.WriteString(rec.Body.String())
			for _, v := range rec.Header() {
				bodies.WriteString(strings.Join(v, " "))
			}
		})
	}
	out := logs.String()
	for _, name := range []string{"ops", "cataloguer"} {
		if !strings.Contains(out, name) {
			t.Errorf("the log does not name token %q, so this test saw no log lines:\n%s", name, out)
		}
	}
	for _, tok := range []string{tt.admin, tt.librarian, unknown} {
		secret := strings.TrimPrefix(tok, TokenPrefix)
		if strings.Contains(out, secret[:12]) || strings.Contains(bodies.String(), secret[:12]) {
			t.Errorf("token text leaked; log:\n%s", out)
		}
	}
}

// FuzzBearerHeader: any Authorization value parses without panic; only a
// Bearer credential counts as present, and only the exact configured token
// matches.
func FuzzBearerHeader(f *testing.F) {
	tok, sum, err := NewToken()
	if err != nil {
		f.Fatal(err)
	}
	set, err := newTokenSet([]Token{{Name: "ops", Role: RoleAdmin, SHA256: sum}})
	if err != nil {
		f.Fatal(err)
	}
	f.Add("Bearer " + tok)
	f.Add("bearer  " + tok + " ")
	f.Add("Basic dXNlcjpwdw==")
	f.Add("Bearer")
	f.Add("")
	f.Fuzz(func(t *testing.T, h string) {
		c, _ := gin.CreateTestContext(httptest.NewRecorder())
		c.Request = httptest.NewRequest(http.MethodGet, "/", nil)
		c.Request.Header["Authorization"] = []string{h}
		got, present := bearer(c)
		if present && (!strings.HasPrefix(strings.ToLower(strings.TrimSpace(h)), "bearer ") || got != strings.TrimSpace(got)) {
			t.Fatalf("credential %q taken from %q", got, h)
		}
		if _, ok := set.match(got); ok != (present && got == tok) {
			t.Fatalf("match %v for %q", ok, h)
		}
	})
}

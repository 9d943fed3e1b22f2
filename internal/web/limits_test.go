package web

import (
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"net/url"
	"slices"
	"strings"
	"testing"

	"kinword/internal/index"
)

// TestLimitLookupParameters: /api/v1/lookup and /api/v1/hints take an
// allow-list of parameters, each once, each valid UTF-8 without control
// characters, and bounded; every violation is a 400 with its own code
// (OWASP Input Validation Cheat Sheet: allow-list validation, bounded
// length; from memory).
func TestLimitLookupParameters(t *testing.T) {
	s, _, _ := hardenedServer(t, nil)
	// 32 and 33 distinct terms: invented words that the English pipeline
	// keeps apart (checked below, so the case tests the limit and not the
	// stemmer).
	var words []string
	seen := map[string]bool{}
	for i := 0; len(words) < 33 && i < 400; i++ {
		w := fmt.Sprintf("zorb%c%c", "bdfgkmptvz"[i/10%10], "bdfgkmptvz"[i%10])
		if ts := s.f.Pipeline().Terms(w, ""); len(ts) == 1 && !seen[ts[0]] {
			seen[ts[0]] = true
			words = append(words, w)
		}
	}
	if q, err := index.ParseQuery(s.f.Pipeline(), strings.Join(words, " "), index.QueryLimits{MaxTerms: 1000}); err != nil || len(q) != 33 {
		t.Fatalf("the 33 words are %d terms (%v)", len(q), err)
	}
	pad512 := "valve" + strings.Repeat(" é", 169) // 5 + 169×3 = 512 bytes
	if len(pad512) != 512 {
		t.Fatalf("pad512 is %d bytes", len(pad512))
	}
	cases := []struct {
		name, query string // raw query string
		status      int
		code, msg   string
	}{
		{"plain", "q=valve", 200, "", ""},
		{"every parameter", "q=valve&accepted=hydrant|main&useful=a|c&persona=", 200, "", ""},
		{"tab is allowed", "q=valve%09main", 200, "", ""},
		// The limit is in bytes as sent (the finder's search.max_query_bytes).
		{"512 bytes", "q=" + url.QueryEscape(pad512), 200, "", ""},
		{"513 bytes", "q=" + url.QueryEscape(pad512+"x"), 400, "bad_query", "513 bytes; the limit is 512"},
		{"32 terms", "q=" + url.QueryEscape(strings.Join(words[:32], " ")), 200, "", ""},
		{"33 terms, as the finder counts them", "q=" + url.QueryEscape(strings.Join(words, " ")), 400, "bad_query", "33 terms, the limit is 32"},
		{"unknown parameter with a huge number", "q=valve&k=99999999999999999999", 400, "unknown_parameter", `"k"; this route takes q, accepted, useful, persona`},
		{"unknown parameter alone", "limit=5", 400, "unknown_parameter", `"limit"`},
		{"unknown parameter not valid UTF-8", "q=valve&%FF=1", 400, "unknown_parameter", `"\xff"`},
		{"repeated q", "q=valve&q=main", 400, "repeated_parameter", "q is given 2 times"},
		{"repeated accepted", "q=valve&accepted=a&accepted=b", 400, "repeated_parameter", "accepted"},
		{"q not valid UTF-8", "q=%FF%FE", 400, "invalid_utf8", ""},
		{"useful not valid UTF-8", "q=valve&useful=%C0%AF", 400, "invalid_utf8", ""},
		// Unicode general category Cc (C0, DEL, C1), from memory.
		{"NUL", "q=valve%00", 400, "control_characters", ""},
		{"line feed", "q=valve%0Amain", 400, "control_characters", ""},
		{"DEL", "q=valve%7F", 400, "control_characters", ""},
		{"C1 next line U+0085", "q=valve%C2%85", 400, "control_characters", ""},
		{"control character in accepted", "q=valve&accepted=a%01b", 400, "control_characters", "accepted"},
		// RFC 3986 section 2.1: "%" starts a two-hex-digit escape.
		{"malformed escape", "q=%zz", 400, "bad_query_string", ""},
		// Go's net/url has refused ";" as a separator since Go 1.17 (from
		// memory); it must not split one parameter into two unseen.
		{"semicolon separator", "q=valve;k=1", 400, "bad_query_string", ""},
		{"accepted over 4096 bytes", "q=valve&accepted=" + strings.Repeat("a", 4097), 400, "parameter_too_long", "4097 bytes"},
		{"missing q", "accepted=a", 400, "missing_query", ""},
		{"blank q", "q=+++", 400, "missing_query", ""},
		{"only stopwords", "q=the+of", 400, "bad_query", `no searchable words in "the of": every word is too common to search on`},
	}
	for _, path := range []string{"/api/v1/lookup", "/api/v1/hints"} {
		for _, c := range cases {
			t.Run(path+"/"+c.name, func(t *testing.T) {
				rec := call(t, s, http.MethodGet, path+"?"+c.query, "", nil)
				if rec.Code != c.status || apiCode(rec) != c.code || !strings.Contains(apiMessage(rec), c.msg) {
					t.Fatalf("%d %s, want %d %s containing %q", rec.Code, rec.Body, c.status, c.code, c.msg)
				}
				if m := apiMessage(rec); strings.HasPrefix(m, "index:") || strings.HasPrefix(m, "finder:") {
					t.Errorf("message %q carries an internal package prefix", m)
				}
			})
		}
	}
}

// TestLimitConfiguredQueryBytes: Options.MaxQueryBytes replaces 512.
func TestLimitConfiguredQueryBytes(t *testing.T) {
	s, _, _ := hardenedServer(t, func(o *Options) { o.MaxQueryBytes = 16 })
	for q, want := range map[string]int{"valve main break": 200, "valve main breaks": 400} {
		if rec := call(t, s, http.MethodGet, "/api/v1/hints?q="+url.QueryEscape(q), "", nil); rec.Code != want {
			t.Errorf("%d-byte query: %d, want %d: %s", len(q), rec.Code, want, rec.Body)
		}
	}
}

// TestLimitHugeNumbers: numbers past int64 in the parameters that take
// numbers answer 400, never 500 or a wrapped-around value.
func TestLimitHugeNumbers(t *testing.T) {
	s, tt, _ := hardenedServer(t, nil)
	const huge = "99999999999999999999" // > 2^63 - 1
	lib := bearerHdr(tt.librarian)
	cases := []struct {
		name, method, path string
		code               string
	}{
		{"lookup k", http.MethodGet, "/api/v1/lookup?q=valve&k=" + huge, "unknown_parameter"},
		{"audit limit", http.MethodGet, "/api/v1/rules/audit?limit=" + huge, "bad_limit"},
		{"audit limit negative", http.MethodGet, "/api/v1/rules/audit?limit=-" + huge, "bad_limit"},
		{"delete version", http.MethodDelete, "/api/v1/rules/r1?version=" + huge, "missing_version"},
		{"revert seq", http.MethodPost, "/api/v1/rules/audit/" + huge + "/revert", "bad_seq"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := call(t, s, c.method, c.path, "", lib)
			if rec.Code != http.StatusBadRequest || apiCode(rec) != c.code {
				t.Fatalf("%d %s, want 400 %s", rec.Code, rec.Body, c.code)
			}
		})
	}
}

// sendBody sends body to a route, with a Content-Length or, when chunked,
// without one (a reader of unknown length, so net/http would send it
// chunked).
func sendBody(s *Server, method, path, body string, chunked bool, hdr map[string]string) *httptest.ResponseRecorder {
	var rd io.Reader = strings.NewReader(body)
	if chunked {
		rd = io.MultiReader(rd)
	}
	req := httptest.NewRequest(method, path, rd)
	if chunked {
		req.ContentLength = -1
	}
	req.Header.Set("Content-Type", "application/json")
	for k, v := range hdr {
		req.Header.Set(k, v)
	}
	rec := httptest.NewRecorder()
	s.Handler().ServeHTTP(rec, req)
	return rec
}

// TestLimitBodyEveryRoute: every route of the table, GET ones included,
// refuses a body over the limit with 413 too_large (RFC 9110 section
// 15.5.14, Content Too Large) whether its length is declared or not, and
// before the handler or the role check runs; a body at the limit is not
// refused for its size.
func TestLimitBodyEveryRoute(t *testing.T) {
	const limit = 4096
	s, tt, _ := hardenedServer(t, func(o *Options) { o.MaxBodyBytes = limit })
	over, at := strings.Repeat(" ", limit+1), strings.Repeat(" ", limit)
	for _, r := range s.routes() {
		for _, chunked := range []bool{false, true} {
			name := fmt.Sprintf("%s %s/chunked=%v", r.Method, r.Path, chunked)
			t.Run(name, func(t *testing.T) {
				for _, hdr := range []map[string]string{nil, bearerHdr(tt.admin)} {
					rec := sendBody(s, r.Method, samplePath(r.Path), over, chunked, hdr)
					if rec.Code != http.StatusRequestEntityTooLarge || apiCode(rec) != "too_large" || !strings.Contains(rec.Body.String(), "4096 bytes") {
						t.Fatalf("over the limit: %d %s", rec.Code, rec.Body)
					}
				}
				if rec := sendBody(s, r.Method, samplePath(r.Path), at, chunked, bearerHdr(tt.admin)); rec.Code == http.StatusRequestEntityTooLarge {
					t.Fatalf("at the limit: %d %s", rec.Code, rec.Body)
				}
			})
		}
	}
}

// TestLimitBodyDefaultAndIntact: the default limit is 1 MiB, and a body
// under it reaches the handler whole, chunked or not.
func TestLimitBodyDefaultAndIntact(t *testing.T) {
	s, tt, _ := hardenedServer(t, nil)
	admin := bearerHdr(tt.admin)
	doc := `{"documents":[{"id":"chunk-1","title":"Chunked push","body":"Sent without a length: brackwater sluice."}]}`
	for _, chunked := range []bool{false, true} {
		if rec := sendBody(s, http.MethodPost, "/api/v1/documents", doc, chunked, admin); rec.Code != 200 {
			t.Fatalf("chunked=%v: %d %s", chunked, rec.Code, rec.Body)
		}
		big := `{"documents":[{"id":"big","body":"` + strings.Repeat("x", 1<<20) + `"}]}`
		if rec := sendBody(s, http.MethodPost, "/api/v1/documents", big, chunked, admin); rec.Code != 413 || !strings.Contains(rec.Body.String(), "1 MiB") {
			t.Fatalf("chunked=%v, over 1 MiB: %d %s", chunked, rec.Code, rec.Body)
		}
	}
	if rec := call(t, s, http.MethodGet, "/api/v1/lookup?q=sluice", "", nil); !strings.Contains(rec.Body.String(), `"id":"chunk-1"`) {
		t.Fatalf("the pushed document is not searchable: %s", rec.Body)
	}
}

// TestLimitJSONContentType: a JSON route with a body answers 415
// content_type (RFC 9110 section 15.5.16) unless the body is labelled
// application/json, in any letter case (RFC 9110 section 8.3.1), with no
// charset or UTF-8 (RFC 8259 section 8.1); the form and text types a
// cross-site HTML form can send without a preflight are among the refused
// (W3C Fetch, CORS-safelisted request headers; from memory).
func TestLimitJSONContentType(t *testing.T) {
	s, tt, _ := hardenedServer(t, nil)
	cases := []struct {
		ctype   string
		refused bool
	}{
		{"application/json", false},
		{"application/json; charset=utf-8", false},
		{"Application/JSON; Charset=UTF-8", false},
		{"text/plain", true},
		{"application/x-www-form-urlencoded", true},
		{"multipart/form-data; boundary=x", true},
		{"application/json; charset=iso-8859-1", true},
		{"application/jsonx", true},
		{"application/json; charset=\"", true},
		{"", true},
	}
	for _, route := range DefaultJSONRoutes() {
		method, pattern, _ := strings.Cut(route, " ")
		for _, c := range cases {
			t.Run(route+"/"+c.ctype, func(t *testing.T) {
				rec := call(t, s, method, samplePath(strings.NewReplacer(":id", "r1", ":seq", "1").Replace(pattern)), `{"why":"x"}`,
					map[string]string{"Authorization": "Bearer " + tt.admin, "Content-Type": c.ctype})
				if refused := rec.Code == http.StatusUnsupportedMediaType; refused != c.refused {
					t.Fatalf("refused %v, want %v: %d %s", refused, c.refused, rec.Code, rec.Body)
				}
			})
		}
	}
	// Routes outside the list keep their own handling.
	lib := map[string]string{"Authorization": "Bearer " + tt.librarian}
	if rec := call(t, s, http.MethodPost, "/api/v1/rules/audit/1/revert", "", lib); rec.Code == 415 {
		t.Errorf("a revert without a body was refused for its type")
	}
	lib["Content-Type"] = "text/csv"
	if rec := call(t, s, http.MethodPost, "/api/v1/rules/import?format=csv", "kind,term\n", lib); rec.Code == 415 {
		t.Errorf("a CSV import was refused for its type: %s", rec.Body)
	}
	if rec := call(t, s, http.MethodPost, "/api/v1/signals", "x", map[string]string{"Content-Type": "text/plain"}); rec.Code != 503 {
		t.Errorf("signals without a store: %d, want its own 503", rec.Code)
	}
}

// TestLimitJSONRoutesOption: Options.JSONRoutes replaces the list (here:
// the signals route added), and New refuses a name the route table lacks.
func TestLimitJSONRoutesOption(t *testing.T) {
	s, _, _ := hardenedServer(t, func(o *Options) { o.JSONRoutes = append(DefaultJSONRoutes(), "POST /api/v1/signals") })
	if rec := call(t, s, http.MethodPost, "/api/v1/signals", "x", map[string]string{"Content-Type": "text/plain"}); rec.Code != 415 {
		t.Errorf("signals listed: %d, want 415", rec.Code)
	}
	if _, err := New(nil, Options{JSONRoutes: []string{"POST /api/v1/nowhere"}}); err == nil || !strings.Contains(err.Error(), "not in the route table") {
		t.Errorf("unknown JSON route: %v", err)
	}
}

// TestLimitJSONRoutesClassified: every route that takes a body (POST, PUT,
// PATCH) is either a JSON route or one of the documented exceptions, so a
// new route cannot skip the Content-Type check unnoticed.
func TestLimitJSONRoutesClassified(t *testing.T) {
	s, _, _ := hardenedServer(t, nil)
	exceptions := []string{"POST /api/v1/rules/import", "POST /api/v1/reload", "POST /api/v1/signals"}
	json := DefaultJSONRoutes()
	for _, r := range s.routes() {
		if r.Method != http.MethodPost && r.Method != http.MethodPut && r.Method != http.MethodPatch {
			continue
		}
		k := r.Method + " " + r.Path
		if slices.Contains(json, k) == slices.Contains(exceptions, k) {
			t.Errorf("%s is in neither or both of DefaultJSONRoutes and the exceptions", k)
		}
	}
}

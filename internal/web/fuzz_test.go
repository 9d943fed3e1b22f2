package web

import (
	"bytes"
	"context"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"strings"
	"testing"

	"kinword/internal/doc"
	"kinword/internal/store"
	"kinword/internal/text"
)

// fuzzCanary is a word (invented) found only in a document restricted to
// the group "executive"; it names that document too.
const fuzzCanary = "kestrelmoor"

// fuzzServers builds, once per fuzz target, two servers over one finder:
// one records events in an SQLite store in a temporary folder, the other
// has no event sink. The corpus is browserCorpus plus one restricted
// document holding fuzzCanary.
func fuzzServers(f *testing.F) (withSink, noSink *Server) {
	f.Helper()
	ctx := context.Background()
	dir := f.TempDir()
	docs := append(browserCorpus(), doc.Document{ID: fuzzCanary + "-review", Title: "Kestrelmoor valve review",
		Body: "The Kestrelmoor programme reviews valve and hydrant security.", Groups: []string{"executive"}})
	fd := indexFinder(f, dir, docs)
	st, err := store.Open(ctx, "sqlite:"+filepath.Join(dir, "events.db"))
	if err != nil {
		f.Fatal(err)
	}
	f.Cleanup(func() { st.Close() })
	id := Identity{Secret: "s3cret"}
	if withSink, err = New(fd, Options{Events: st, Identity: id}); err != nil {
		f.Fatal(err)
	}
	if noSink, err = New(fd, Options{Identity: id}); err != nil {
		f.Fatal(err)
	}
	return withSink, noSink
}

// checkErrorShape fails unless a non-2xx answer is exactly the API's one
// error shape, {"error":{"code":"...","message":"..."}}, with a code, and
// every answer carries the security headers.
func checkErrorShape(t *testing.T, rec *httptest.ResponseRecorder) string {
	t.Helper()
	if rec.Header().Get("X-Content-Type-Options") != "nosniff" || rec.Header().Get("Content-Security-Policy") == "" {
		t.Fatalf("security headers missing on a %d answer", rec.Code)
	}
	if rec.Code < 300 {
		return ""
	}
	var e struct {
		Error *struct {
			Code    *string `json:"code"`
			Message *string `json:"message"`
		} `json:"error"`
	}
	dec := json.NewDecoder(bytes.NewReader(rec.Body.Bytes()))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&e); err != nil || dec.More() || e.Error == nil || e.Error.Code == nil || *e.Error.Code == "" || e.Error.Message == nil {
		t.Fatalf("status %d body %q is not the error shape (%v)", rec.Code, rec.Body.String(), err)
	}
	if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, "application/json") {
		t.Fatalf("error answer has Content-Type %q", ct)
	}
	return *e.Error.Code
}

// FuzzSignals posts fuzzed bodies to /api/v1/signals and checks: no answer
// is a 5xx with a working event sink (a panic would be gin's recovery 500);
// without a sink every answer is 503 no_store; every error has the error
// shape; a 202 says how many events the body held (1..store.MaxBatch).
func FuzzSignals(f *testing.F) {
	withSink, noSink := fuzzServers(f)
	seeds := []string{
		`{"events":[{"id":"e1","impression":"i1","kind":"impression","query":"valve","terms":["hydrant","flush"],"sources":["rm3","assoc"]}]}`,
		`{"events":[{"id":"e2","impression":"i1","kind":"accept","term":"hydrant","position":0}]}`,
		`{"events":[{"id":"e3","impression":"i1","kind":"click","doc":"v1","rank":0,"terms":["hydrant"]}]}`,
		`{"events":[{"id":"e4","impression":"nowhere","kind":"dismiss","term":"x","position":1}]}`,
		`{"events":[{"id":"e1","impression":"i1","kind":"impression"}]}`,
		`{"events":[]}`, `{"events":null}`, `{}`, `[]`, `null`, ``, `{"events":[{}]}`,
		`{"events":[{"id":"x","kind":"accept","position":-1}]}`,
		`{"events":[{"id":"x","impression":"i","kind":"accept","term":"t","position":1e99}]}`,
		`{"events":[{"id":"x","impression":"i","kind":"impression","terms":["a\u0000b"]}]}`,
		`{"events":[{"id":"\ud800","impression":"i","kind":"mark_useful","doc":"d"}]}`,
		`{"events":[{"id":"x","impression":"i","kind":"accept","term":"t","extra":1}]}`,
		`{"events":[{"id":"x","impression":"i","kind":"accept","term":"t"}]} {}`,
		`{"events":[{"id":"x","impression":"i","kind":"accept","term":"t"}]`,
	}
	for i, s := range seeds {
		f.Add([]byte(s), uint8(i%3), "")
	}
	f.Add([]byte(seeds[0]), uint8(3), "text/plain")
	f.Add([]byte(seeds[0]), uint8(3), "application/json; charset=\"")
	f.Fuzz(func(t *testing.T, body []byte, ctSel uint8, ct string) {
		switch ctSel % 4 {
		case 0:
			ct = "application/json"
		case 1:
			ct = "application/json; charset=utf-8"
		case 2:
			ct = "Application/JSON"
		}
		post := func(s *Server) *httptest.ResponseRecorder {
			req := httptest.NewRequest(http.MethodPost, "/api/v1/signals", bytes.NewReader(body))
			req.Header.Set("Content-Type", ct)
			rec := httptest.NewRecorder()
			s.Handler().ServeHTTP(rec, req)
			return rec
		}
		rec := post(noSink)
		if code := checkErrorShape(t, rec); rec.Code != http.StatusServiceUnavailable || code != "no_store" {
			t.Fatalf("without a sink: %d %s", rec.Code, rec.Body.String())
		}
		rec = post(withSink)
		checkErrorShape(t, rec)
		if rec.Code >= 500 {
			t.Fatalf("server error %d for body %q: %s", rec.Code, body, rec.Body.String())
		}
		if rec.Code == http.StatusAccepted {
			var in struct {
				Events []json.RawMessage `json:"events"`
			}
			var out struct {
				Accepted int `json:"accepted"`
			}
			if err := json.Unmarshal(body, &in); err != nil || json.Unmarshal(rec.Body.Bytes(), &out) != nil ||
				out.Accepted != len(in.Events) || out.Accepted < 1 || out.Accepted > store.MaxBatch {
				t.Fatalf("202 %s for a body of %d events (%v)", rec.Body.String(), len(in.Events), err)
			}
		}
	})
}

// FuzzLookupQuery sends fuzzed query parameters (q, accepted, useful, and a
// raw query string appended verbatim) to /api/v1/lookup and /api/v1/hints,
// anonymously or as a trusted "executive" viewer, and checks: the answer is
// 200 or 400 (never 5xx: a panic would be gin's recovery 500), errors have
// the error shape, a 200 is a JSON object, and an anonymous viewer never
// sees the restricted document's canary word unless the request itself
// holds it (the query is echoed back).
func FuzzLookupQuery(f *testing.F) {
	s, _ := fuzzServers(f)
	for _, c := range []struct {
		q, accepted, useful, raw string
		sel                      uint8
	}{
		{"valve", "", "", "", 0},
		{"valve", "hydrant|flush", "v1", "", 1},
		{"valve " + fuzzCanary, "", fuzzCanary + "-review", "", 0},
		{"valve", "", "", "", 2},
		{`"valve chamber" hydrant`, "chamber", "", "", 3},
		{"", "", "", "q=%zz&q=valve", 0},
		{"the of", "", "", "", 0},
		{"valve\x01", "", "", "", 0},
		{"\xff", "\xfe", "", "", 1},
		{strings.Repeat("valve ", 100), "", "", "", 0},
		{"meter", "||", "|", "accepted=a&accepted=b&useful=%00", 1},
		{"tab\tvalve", "", "", ";;&&==", 0},
	} {
		f.Add(c.q, c.accepted, c.useful, c.raw, c.sel)
	}
	f.Fuzz(func(t *testing.T, q, accepted, useful, raw string, sel uint8) {
		v := url.Values{}
		v.Set("q", q)
		if accepted != "" {
			v.Set("accepted", accepted)
		}
		if useful != "" {
			v.Set("useful", useful)
		}
		rawQuery := v.Encode()
		if raw != "" {
			rawQuery += "&" + raw
		}
		path := "/api/v1/lookup"
		if sel&1 != 0 {
			path = "/api/v1/hints"
		}
		req := httptest.NewRequest(http.MethodGet, path, nil)
		req.URL.RawQuery = rawQuery
		insider := sel&2 != 0
		if insider {
			req.Header.Set("X-Kinword-Groups", "executive")
			req.Header.Set("X-Kinword-Proxy-Secret", "s3cret")
		}
		rec := httptest.NewRecorder()
		s.Handler().ServeHTTP(rec, req)
		checkErrorShape(t, rec)
		switch rec.Code {
		case http.StatusOK:
			var obj map[string]json.RawMessage
			if err := json.Unmarshal(rec.Body.Bytes(), &obj); err != nil {
				t.Fatalf("200 body is not a JSON object: %v", err)
			}
		case http.StatusBadRequest:
		default:
			t.Fatalf("status %d for %q: %s", rec.Code, rawQuery, rec.Body.String())
		}
		if !insider && !mentionsCanary(rawQuery) && strings.Contains(text.Fold(rec.Body.String()), fuzzCanary) {
			t.Fatalf("restricted canary reached an anonymous viewer for %q: %s", rawQuery, rec.Body.String())
		}
	})
}

// mentionsCanary reports whether the request could itself carry the canary
// back: any parameter value or the raw query, folded as the pipeline folds.
func mentionsCanary(rawQuery string) bool {
	vals, _ := url.ParseQuery(rawQuery)
	texts := []string{rawQuery}
	for _, vs := range vals {
		texts = append(texts, vs...)
	}
	for _, s := range texts {
		if strings.Contains(text.Fold(s), "kestrel") {
			return true
		}
	}
	return false
}

package web

import (
	"encoding/json"
	"net/http"
	"strings"
	"testing"
)

// step is one request of a scripted test and what must come back.
type step struct {
	name, method, path, body string
	hdr                      map[string]string
	status                   int
	contains                 []string
}

// run plays steps in order, each a subtest; a failed step stops the script
// (later steps depend on it).
func (cs curationServer) run(t *testing.T, steps []step) {
	t.Helper()
	for _, st := range steps {
		ok := t.Run(st.name, func(t *testing.T) {
			rec := call(t, cs.s, st.method, st.path, st.body, st.hdr)
			if rec.Code != st.status {
				t.Fatalf("%s %s: %d, want %d: %s", st.method, st.path, rec.Code, st.status, rec.Body)
			}
			for _, want := range st.contains {
				if !strings.Contains(rec.Body.String(), want) {
					t.Errorf("%s %s: body lacks %s: %s", st.method, st.path, want, rec.Body)
				}
			}
		})
		if !ok {
			t.FailNow()
		}
	}
}

// TestRulesCRUD: create, list, update, delete with optimistic versions.
// Status codes from RFC 9110 (2022): 201 Created (15.3.2) for a new rule,
// 204 No Content (15.3.5) for a delete, 409 Conflict (15.5.10) for a stale
// version, 404 (15.5.5) for an unknown rule, 400 (15.5.1) for bad input.
// The contradiction (a pin and a block of one term in one scope) and the
// limits (curate.MaxTextBytes = 100 bytes) are the project's curate rules.
func TestRulesCRUD(t *testing.T) {
	cs := newCurationServer(t)
	long := strings.Repeat("a", 101)
	steps := []step{
		{"list empty", "GET", "/api/v1/rules", "", cs.lib, 200, []string{`"rules":[]`, `"version":0`}},
		{"create pin", "POST", "/api/v1/rules", `{"kind":"pin","query":"burst pipe","term":"main break","department":"customer-care","why":"callers say burst"}`, cs.lib, 201,
			[]string{`"id":"f001"`, `"version":1`, `"kind":"pin"`, `"department":"customer-care"`}},
		{"list has it", "GET", "/api/v1/rules", "", cs.adm, 200, []string{`"id":"f001"`, `"version":1}`}},
		{"update at version 1", "PUT", "/api/v1/rules/f001", `{"kind":"pin","query":"burst pipe","term":"main break","version":1,"why":"organisation-wide"}`, cs.lib, 200,
			[]string{`"version":2`}},
		{"stale update", "PUT", "/api/v1/rules/f001", `{"kind":"pin","query":"burst pipe","term":"leak","version":1}`, cs.lib, 409, []string{`"code":"conflict"`}},
		{"update without version", "PUT", "/api/v1/rules/f001", `{"kind":"pin","query":"burst pipe","term":"leak"}`, cs.lib, 400, []string{"missing_version"}},
		{"update id mismatch", "PUT", "/api/v1/rules/f001", `{"id":"f009","kind":"pin","query":"burst pipe","term":"leak","version":2}`, cs.lib, 400, []string{"id_mismatch"}},
		{"update unknown", "PUT", "/api/v1/rules/nope", `{"kind":"pin","query":"burst pipe","term":"leak","version":1}`, cs.lib, 404, []string{"not_found"}},
		{"contradicting block", "POST", "/api/v1/rules", `{"kind":"block","query":"burst pipe","term":"main break"}`, cs.lib, 409,
			[]string{`"code":"contradiction"`, `"problems":[{"field":"rule"`}},
		{"block in another department is no contradiction", "POST", "/api/v1/rules", `{"kind":"block","query":"hydrant","term":"main break","department":"field-operations"}`, cs.lib, 201, []string{`"id":"f002"`}},
		{"duplicate", "POST", "/api/v1/rules", `{"kind":"pin","query":"burst pipe","term":"main break"}`, cs.lib, 400, []string{`"code":"invalid_rule"`}},
		{"unknown department", "POST", "/api/v1/rules", `{"kind":"relate","query":"valve","term":"hydrant","department":"marketing"}`, cs.lib, 400,
			[]string{`"field":"department"`, "unknown department"}},
		{"over-long term", "POST", "/api/v1/rules", `{"kind":"relate","query":"valve","term":"` + long + `"}`, cs.lib, 400, []string{`"field":"term"`, "more than 100"}},
		{"unknown kind", "POST", "/api/v1/rules", `{"kind":"promote","query":"valve","term":"hydrant"}`, cs.lib, 400, []string{`"field":"kind"`}},
		{"unknown field", "POST", "/api/v1/rules", `{"kind":"relate","query":"valve","term":"hydrant","weight":3}`, cs.lib, 400, []string{"malformed_json"}},
		{"not json", "POST", "/api/v1/rules", `kind=relate`, cs.lib, 400, []string{"malformed_json"}},
		{"id with a slash", "POST", "/api/v1/rules", `{"id":"a/b","kind":"relate","query":"valve","term":"hydrant"}`, cs.lib, 400, []string{"bad_id"}},
		{"delete without version", "DELETE", "/api/v1/rules/f001", "", cs.lib, 400, []string{"missing_version"}},
		{"stale delete", "DELETE", "/api/v1/rules/f001?version=1", "", cs.lib, 409, []string{"conflict"}},
		{"delete", "DELETE", "/api/v1/rules/f001?version=2&why=obsolete", "", cs.lib, 204, nil},
		{"delete again", "DELETE", "/api/v1/rules/f001?version=2", "", cs.lib, 404, []string{"not_found"}},
		{"the block may now follow", "POST", "/api/v1/rules", `{"kind":"block","query":"burst pipe","term":"main break"}`, cs.lib, 201, nil},
	}
	cs.run(t, steps)
	// Successful changes: create, update, create, delete, create.
	if n := cs.changes.Load(); n != 5 {
		t.Errorf("RulesChanged called %d times, want 5", n)
	}
	cs.book.mu.Lock()
	defer cs.book.mu.Unlock()
	for _, e := range cs.book.log {
		if e.Actor != "cataloguer" {
			t.Errorf("entry %d recorded actor %q, want the token name", e.Seq, e.Actor)
		}
	}
	if got := cs.book.log[3]; got.Action != "delete" || got.Reason != "obsolete" {
		t.Errorf("delete entry %+v lacks its reason", got)
	}
}

// TestRulesDemoActor: in demo mode a loopback caller without a token is
// recorded as "demo".
func TestRulesDemoActor(t *testing.T) {
	cs := newCurationServer(t)
	cs.s.opts.Demo = true
	rec := call(t, cs.s, "POST", "/api/v1/rules", `{"kind":"relate","query":"valve","term":"hydrant"}`, map[string]string{"RemoteAddr": "127.0.0.1:5000"})
	if rec.Code != 201 {
		t.Fatalf("%d %s", rec.Code, rec.Body)
	}
	if a := cs.book.log[0].Actor; a != "demo" {
		t.Errorf("actor %q, want demo", a)
	}
}

// TestRulesNoStore: without a rule book or reviewer the routes answer 503
// (RFC 9110 section 15.6.4) in the API's error shape.
func TestRulesNoStore(t *testing.T) {
	s, tt, _ := tokenServer(t, false)
	for _, r := range s.routes() {
		if !strings.HasPrefix(r.Path, "/api/v1/rules") && !strings.HasPrefix(r.Path, "/api/v1/review") {
			continue
		}
		t.Run(r.Method+" "+r.Path, func(t *testing.T) {
			path := strings.NewReplacer(":id", "f001", ":seq", "1").Replace(r.Path) + "?format=csv&version=1&table=terms"
			body := ""
			if r.Method == http.MethodPost || r.Method == http.MethodPut {
				body = `{"kind":"relate","query":"valve","term":"hydrant","version":1}`
			}
			rec := call(t, s, r.Method, path, body, bearerHdr(tt.admin))
			var e struct {
				Error struct{ Code string } `json:"error"`
			}
			if rec.Code != http.StatusServiceUnavailable || json.Unmarshal(rec.Body.Bytes(), &e) != nil || e.Error.Code != "no_store" {
				t.Errorf("%d %s, want 503 no_store", rec.Code, rec.Body)
			}
		})
	}
}

// TestRulesRouteRoles pins the roles of the curation routes: the rule
// routes are the librarian's, the review the admin's (the route-table-wide
// role test derives its expectations from the table, so this pins the
// table itself).
func TestRulesRouteRoles(t *testing.T) {
	want := map[string]Role{
		"GET /api/v1/rules":                    RoleLibrarian,
		"POST /api/v1/rules":                   RoleLibrarian,
		"PUT /api/v1/rules/:id":                RoleLibrarian,
		"DELETE /api/v1/rules/:id":             RoleLibrarian,
		"POST /api/v1/rules/preview":           RoleLibrarian,
		"GET /api/v1/rules/audit":              RoleLibrarian,
		"POST /api/v1/rules/audit/:seq/revert": RoleLibrarian,
		"GET /api/v1/rules/export":             RoleLibrarian,
		"POST /api/v1/rules/import":            RoleLibrarian,
		"GET /api/v1/review":                   RoleAdmin,
		"GET /api/v1/review/export":            RoleAdmin,
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

// FuzzRuleBody: no rule body, however malformed, makes a rule route fail
// with a 5xx or answer outside the API's error shape; a refused body
// stores nothing.
func FuzzRuleBody(f *testing.F) {
	f.Add(`{"kind":"pin","query":"burst pipe","term":"main break"}`)
	f.Add(`{"kind":"block","term":"leak","department":"customer-care","start":"2026-01-01T00:00:00Z","expiry":"2025-01-01T00:00:00Z"}`)
	f.Add(`{"kind":"use","query":"a","term":"a"}`)
	f.Add(`{"kind":"relate","query":"\u0000","term":"=cmd"}`)
	f.Add(`{"kind":"pin","query":"x","term":"y"}{}`)
	f.Add(`[]`)
	cs := newCurationServer(f)
	f.Fuzz(func(t *testing.T, body string) {
		for _, path := range []string{"/api/v1/rules", "/api/v1/rules/preview"} {
			before, _, _ := cs.book.Rules(t.Context())
			rec := call(t, cs.s, "POST", path, body, cs.lib)
			if rec.Code >= 500 {
				t.Fatalf("POST %s %q: %d %s", path, body, rec.Code, rec.Body)
			}
			if rec.Code >= 400 {
				var e struct {
					Error struct{ Code, Message string } `json:"error"`
				}
				if json.Unmarshal(rec.Body.Bytes(), &e) != nil || e.Error.Code == "" {
					t.Fatalf("POST %s %q: not the error shape: %s", path, body, rec.Body)
				}
				if after, _, _ := cs.book.Rules(t.Context()); len(after) != len(before) {
					t.Fatalf("POST %s %q: refused but stored", path, body)
				}
			}
		}
	})
}

package web

import (
	"encoding/json"
	"io/fs"
	"regexp"
	"sort"
	"strings"
	"testing"

	"kinword/static"
)

// roleSecurity is how each role must appear in an operation's OpenAPI 3
// security requirements (OpenAPI Specification 3.0.3, "Security Requirement
// Object": an empty object means no authentication).
var roleSecurity = map[Role][]string{
	RolePublic:    {""},
	RoleSearcher:  {"", "proxyIdentity"},
	RoleLibrarian: {"librarianToken", "adminToken"},
	RoleAdmin:     {"adminToken"},
}

// TestOpenAPIMatchesRouteTable: every /api/v1 route of the route table is
// described, nothing else is, and each operation declares its route's role.
func TestOpenAPIMatchesRouteTable(t *testing.T) {
	b, err := fs.ReadFile(static.FS, "openapi.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		OpenAPI string                                `json:"openapi"`
		Paths   map[string]map[string]json.RawMessage `json:"paths"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatalf("openapi.json is not JSON: %v", err)
	}
	if !strings.HasPrefix(doc.OpenAPI, "3.") {
		t.Errorf("openapi version %q", doc.OpenAPI)
	}
	s := &Server{}
	want := map[string]Role{}
	for _, r := range s.routes() {
		if strings.HasPrefix(r.Path, "/api/") {
			want[strings.ToLower(r.Method)+" "+openAPIPath(r.Path)] = r.Role
		}
	}
	got := map[string]json.RawMessage{}
	for p, ops := range doc.Paths {
		for m, op := range ops {
			got[m+" "+p] = op
		}
	}
	for k, role := range want {
		op, ok := got[k]
		if !ok {
			t.Errorf("route %s is not described", k)
			continue
		}
		var o struct {
			Security  []map[string][]string      `json:"security"`
			Responses map[string]json.RawMessage `json:"responses"`
		}
		if err := json.Unmarshal(op, &o); err != nil {
			t.Fatal(err)
		}
		if role == RoleLibrarian || role == RoleAdmin {
			// A token route says how it refuses (RFC 6750 section 3.1).
			for _, code := range []string{"401", "403"} {
				if _, ok := o.Responses[code]; !ok {
					t.Errorf("%s (role %s) does not describe its %s response", k, role, code)
				}
			}
		}
		var names []string
		for _, req := range o.Security {
			if len(req) == 0 {
				names = append(names, "")
			}
			for n := range req {
				names = append(names, n)
			}
		}
		sort.Strings(names)
		exp := append([]string(nil), roleSecurity[role]...)
		sort.Strings(exp)
		if strings.Join(names, ",") != strings.Join(exp, ",") {
			t.Errorf("%s declares security %v, its role %s needs %v", k, names, role, exp)
		}
	}
	for k := range got {
		if _, ok := want[k]; !ok {
			t.Errorf("openapi.json describes %s, which the route table lacks", k)
		}
	}
}

// ginParam is a gin path parameter (:name or *name).
var ginParam = regexp.MustCompile(`[:*]([A-Za-z_][A-Za-z0-9_]*)`)

// openAPIPath writes a gin route pattern as an OpenAPI path template
// ("/documents/*id" becomes "/documents/{id}"; OpenAPI 3.0.3, "Path
// Templating").
func openAPIPath(p string) string { return ginParam.ReplaceAllString(p, "{$1}") }

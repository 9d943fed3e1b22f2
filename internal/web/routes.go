package web

import (
	"net/http"

	"github.com/gin-gonic/gin"
)

// Role is who may call a route.
type Role string

// Roles, weakest first.
const (
	RolePublic    Role = "public"    // anyone, unauthenticated included
	RoleSearcher  Role = "searcher"  // any viewer (anonymous sees open documents only)
	RoleLibrarian Role = "librarian" // curates the vocabulary
	RoleAdmin     Role = "admin"     // reviews quality, pushes documents, reloads
)

// Route is one entry of the route table.
type Route struct {
	Method  string
	Path    string
	Role    Role
	Summary string
	Handler gin.HandlerFunc
}

// routes is the one route table.
func (s *Server) routes() []Route {
	return []Route{
		{http.MethodGet, "/", RolePublic, "the search page", s.page},
		{http.MethodGet, "/static/*file", RolePublic, "embedded assets", s.asset},
		{http.MethodGet, "/healthz", RolePublic, "the process is alive", s.healthz},
		{http.MethodGet, "/readyz", RolePublic, "index and table are loaded", s.readyz},
		{http.MethodGet, "/metrics", RolePublic, "Prometheus metrics", s.metricsHandler},
		{http.MethodGet, "/api/v1/lookup", RoleSearcher, "ranked results with snippets, suggestions and an impression id", s.lookup},
		{http.MethodGet, "/api/v1/hints", RoleSearcher, "suggested terms alone, for an embedded widget", s.hints},
		{http.MethodGet, "/api/v1/whoami", RoleSearcher, "the viewer the server sees, and demo personas", s.whoami},
		{http.MethodPost, "/api/v1/signals", RoleSearcher, "record a batch of interaction events (202 once committed)", s.signals},
		{http.MethodGet, "/api/v1/openapi.json", RolePublic, "the OpenAPI 3 description of this API", s.openapi},
		{http.MethodPost, "/api/v1/documents", RoleAdmin, "add or replace a batch of documents; searchable once answered", s.putDocuments},
		{http.MethodDelete, "/api/v1/documents/*id", RoleAdmin, "delete one document by ID (the ID may contain slashes)", s.deleteDocument},
		{http.MethodPost, "/api/v1/reload", RoleAdmin, "reload the index snapshot and the association table, swapped in at once", s.reload},
		{http.MethodGet, "/api/v1/rules", RoleLibrarian, "every librarian rule and the rules version", s.listRules},
		{http.MethodPost, "/api/v1/rules", RoleLibrarian, "create a rule, checked against the stored ones (409 on a contradiction)", s.createRule},
		{http.MethodPut, "/api/v1/rules/:id", RoleLibrarian, "replace a rule at the version read (409 when stale)", s.updateRule},
		{http.MethodDelete, "/api/v1/rules/:id", RoleLibrarian, "delete a rule at the version read (409 when stale)", s.deleteRule},
		{http.MethodPost, "/api/v1/rules/preview", RoleLibrarian, "what a draft rule would do to the last 30 days of suggestions", s.previewRule},
		{http.MethodGet, "/api/v1/rules/audit", RoleLibrarian, "the rule change log, newest first", s.ruleAudit},
		{http.MethodPost, "/api/v1/rules/audit/:seq/revert", RoleLibrarian, "undo one logged change (409 when the rule changed since)", s.revertRule},
		{http.MethodGet, "/api/v1/rules/export", RoleLibrarian, "every rule as CSV, N-Triples or JSON-LD (W3C SKOS)", s.exportRules},
		{http.MethodPost, "/api/v1/rules/import", RoleLibrarian, "add or replace rules from a CSV, N-Triples or JSON-LD file, all or nothing", s.importRules},
		{http.MethodGet, "/api/v1/review", RoleAdmin, "the review of suggestion quality for a window", s.reviewReport},
		{http.MethodGet, "/api/v1/review/export", RoleAdmin, "one table of the review as CSV", s.reviewExport},
		{http.MethodPost, "/api/v1/trials", RoleAdmin, "try a proposed rule or settings change on the judged set against the rules in force, and keep the report", s.runTrial},
		{http.MethodGet, "/api/v1/trials", RoleAdmin, "the stored trial reports, newest first", s.listTrials},
		{http.MethodGet, "/api/v1/trials/:id", RoleAdmin, "one stored trial report, as JSON or Markdown", s.getTrial},
		{http.MethodGet, "/librarian", RolePublic, "the vocabulary desk page (its data calls are role-checked)", s.librarianPage},
		{http.MethodGet, "/admin", RolePublic, "the suggestion review page (its data calls are role-checked)", s.adminPage},
	}
}

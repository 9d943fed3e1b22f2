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
	}
}

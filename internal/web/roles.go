package web

import (
	"fmt"
	"net/http"

	"github.com/gin-gonic/gin"
)

// rank orders roles: each grants everything the weaker ones do (admin
// implies librarian implies searcher). Unknown roles rank below public.
func (r Role) rank() int {
	switch r {
	case RolePublic:
		return 0
	case RoleSearcher:
		return 1
	case RoleLibrarian:
		return 2
	case RoleAdmin:
		return 3
	}
	return -1
}

// Caller is who called a route, as the role middleware decided.
type Caller struct {
	// Name is the token's name ("" for searchers, "demo" for the demo
	// grant); it is what logs name, never the token.
	Name string
	// Role is the strongest role the caller holds.
	Role Role
	// Demo marks the demo-mode loopback grant.
	Demo bool
}

const callerKey = "kinword.caller"

// demoName is the caller name of the demo grant.
const demoName = "demo"

// caller returns the route's caller as the role middleware set it.
func (s *Server) caller(c *gin.Context) Caller {
	if v, ok := c.Get(callerKey); ok {
		return v.(Caller)
	}
	return Caller{Role: RoleSearcher}
}

// authorize is the one place roles are enforced; New puts it in front of
// every route with that route's Role from the route table.
//
// Public and searcher routes are open to every caller: searchers are told
// apart by the proxy's identity headers (or are anonymous), never by
// tokens, and an Authorization header there is ignored (a proxy may pass
// its own). Librarian and admin routes need a bearer token of that role or
// a stronger one: no token or an unknown one answers 401 with a
// WWW-Authenticate: Bearer challenge, a weaker token 403 (RFC 6750 section
// 3.1: invalid_token, insufficient_scope).
//
// DEMO MODE ONLY: a caller from the loopback address that sends no token is
// granted admin (and so librarian), so the demo pages work on a laptop
// without setup. Responses then carry X-Kinword-Demo-Role. Outside demo
// mode there is no such grant, loopback or not.
func (s *Server) authorize(need Role) gin.HandlerFunc {
	return func(c *gin.Context) {
		if need.rank() <= RoleSearcher.rank() {
			c.Set(callerKey, Caller{Role: RoleSearcher})
			c.Next()
			return
		}
		token, present := bearer(c)
		var who Caller
		switch {
		case !present && s.opts.Demo && loopback(c.Request.RemoteAddr):
			who = Caller{Name: demoName, Role: RoleAdmin, Demo: true}
			c.Header("X-Kinword-Demo-Role", string(RoleAdmin))
		case !present:
			c.Header("WWW-Authenticate", `Bearer realm="kinword"`)
			apiError(c, http.StatusUnauthorized, "unauthorized", fmt.Sprintf("this route needs a %s token (Authorization: Bearer)", need))
			return
		default:
			var t Token
			ok := false
			if len(token) <= maxTokenLen {
				t, ok = s.tokens.match(token)
			}
			if !ok {
				// The token is not logged, nor any part of it.
				s.opts.Log.Warn("rejected an unknown API token", "route", c.FullPath(), "remote", c.Request.RemoteAddr)
				c.Header("WWW-Authenticate", `Bearer realm="kinword", error="invalid_token"`)
				apiError(c, http.StatusUnauthorized, "invalid_token", "the token is not valid")
				return
			}
			who = Caller{Name: t.Name, Role: t.Role}
		}
		if who.Role.rank() < need.rank() {
			s.opts.Log.Warn("refused a token with a weaker role", "token", who.Name, "role", who.Role, "route", c.FullPath())
			c.Header("WWW-Authenticate", fmt.Sprintf(`Bearer realm="kinword", error="insufficient_scope", scope="%s"`, need))
			apiError(c, http.StatusForbidden, "forbidden", fmt.Sprintf("this route needs the %s role; the token has %s", need, who.Role))
			return
		}
		c.Set(callerKey, who)
		c.Next()
	}
}

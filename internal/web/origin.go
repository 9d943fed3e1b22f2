package web

import (
	"fmt"
	"net/http"
	"net/url"
	"strings"
	"unicode/utf8"

	"github.com/gin-gonic/gin"
)

// Cross-site request protection. A page on another site can make the
// browser send a request here with whatever ambient authority the browser
// holds: the intranet proxy's sign-in (which becomes identity headers) or,
// in demo mode, the loopback admin grant. Reading answers is stopped by
// the same-origin policy; changing state is not, so every state-changing
// request a browser marks as coming from elsewhere is refused (403) before
// any handler runs:
//
//   - Safe methods (GET, HEAD, OPTIONS; RFC 9110 section 9.2.1) pass.
//   - An Origin listed in Options.AllowedOrigins passes (the widget's
//     pages, which CORS already admits).
//   - Sec-Fetch-Site (W3C Fetch Metadata Request Headers) "same-origin"
//     passes; "cross-site", "same-site" (another host of the same site)
//     and any other value are refused.
//   - Without Sec-Fetch-Site, or with "none" (a request the user started),
//     an Origin header must equal the server's own origin: the scheme
//     (https when the connection is TLS or a trusted proxy says
//     X-Forwarded-Proto: https, else http), "://" and the Host header, as
//     browsers serialise both (RFC 6454 section 6.2). "null" and any other
//     origin are refused.
//   - A request with neither header is not from a browser's page (curl, a
//     script with a token) and passes; such clients carry no ambient
//     authority.
//
// This follows the OWASP Cross-Site Request Forgery Prevention Cheat Sheet
// (Fetch Metadata and Origin verification; from memory) and agrees with
// Go's net/http CrossOriginProtection, except that it compares the scheme
// too and reads Origin when Sec-Fetch-Site is "none".

// stateChanging reports whether a request method may change state, that
// is whether it is not one of the safe methods of RFC 9110 section 9.2.1
// that Kinword routes.
func stateChanging(method string) bool {
	switch method {
	case http.MethodGet, http.MethodHead, http.MethodOptions:
		return false
	}
	return true
}

// validOrigin checks an Options.AllowedOrigins entry: the serialised form
// of an origin (RFC 6454 section 6.1), scheme "http" or "https", a host,
// an optional port, nothing else.
func validOrigin(o string) error {
	u, err := url.Parse(o)
	if err != nil {
		return fmt.Errorf("web: allowed origin %q: %w", o, err)
	}
	if (u.Scheme != "http" && u.Scheme != "https") || u.Host == "" || u.User != nil ||
		u.Path != "" || u.RawQuery != "" || u.Fragment != "" || u.Opaque != "" || strings.ToLower(o) != o {
		return fmt.Errorf("web: allowed origin %q is not scheme://host[:port] in lower case", o)
	}
	return nil
}

// ownOrigin is the origin a same-origin page of this server sends: the
// scheme and the Host header as the browser wrote it.
func (s *Server) ownOrigin(c *gin.Context) string {
	scheme := "http"
	if c.Request.TLS != nil {
		scheme = "https"
	} else if p := c.GetHeader("X-Forwarded-Proto"); strings.EqualFold(strings.TrimSpace(p), "https") && s.trusted(c, s.opts.Identity.resolved()) {
		scheme = "https"
	}
	return scheme + "://" + c.Request.Host
}

// crossSiteReason says why a request is refused, or "" when it passes.
func (s *Server) crossSiteReason(c *gin.Context) string {
	if !stateChanging(c.Request.Method) {
		return ""
	}
	origin := c.GetHeader("Origin")
	if origin != "" && s.allowedOrigin(origin) {
		return ""
	}
	switch site := c.GetHeader("Sec-Fetch-Site"); site {
	case "same-origin":
		return ""
	case "", "none":
	default:
		return "the browser marked it Sec-Fetch-Site: " + truncate(site, 32)
	}
	if origin == "" {
		return ""
	}
	if origin == s.ownOrigin(c) {
		return ""
	}
	return "its Origin " + truncate(origin, 128) + " is neither this server's nor an allowed one"
}

func (s *Server) allowedOrigin(origin string) bool {
	for _, o := range s.opts.AllowedOrigins {
		if o == origin {
			return true
		}
	}
	return false
}

// sameOrigin refuses cross-site state-changing requests (403).
func (s *Server) sameOrigin() gin.HandlerFunc {
	return func(c *gin.Context) {
		if why := s.crossSiteReason(c); why != "" {
			s.opts.Log.Warn("refused a cross-site request", "method", logMethod(c.Request.Method), "route", c.FullPath(), "reason", why)
			apiError(c, http.StatusForbidden, "cross_site", "a request from another site may not change anything here: "+why)
			return
		}
		c.Next()
	}
}

// truncate shortens s to at most n bytes for a message, keeping UTF-8
// whole and quoting it (strconv-style) so nothing odd reaches a log line.
func truncate(s string, n int) string {
	if len(s) > n {
		cut := n
		for cut > 0 && !utf8.RuneStart(s[cut]) {
			cut--
		}
		s = s[:cut] + "…"
	}
	return fmt.Sprintf("%q", s)
}

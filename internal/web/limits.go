package web

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"strings"

	"github.com/gin-gonic/gin"
)

// defaultMaxBody is the default request body limit: 1 MiB, the most any
// handler reads (maxBody).
const defaultMaxBody = 1 << 20

// DefaultJSONRoutes are the routes ("METHOD /pattern" as in the route
// table) whose request bodies are JSON: a request that sends one of them a
// body must label it application/json (415 otherwise). Left out on
// purpose: POST /api/v1/rules/import (its body is a CSV, N-Triples or
// JSON-LD file), POST /api/v1/reload and the DELETE routes (no body), and
// POST /api/v1/signals, whose handler checks its own Content-Type after
// answering 503 when the server records no events; add it through
// Options.JSONRoutes to have the middleware check it too.
func DefaultJSONRoutes() []string {
	return []string{
		"POST /api/v1/documents",
		"POST /api/v1/rules",
		"PUT /api/v1/rules/:id",
		"POST /api/v1/rules/preview",
		"POST /api/v1/rules/audit/:seq/revert",
		"POST /api/v1/trials",
	}
}

// jsonRouteSet checks Options.JSONRoutes against the route table.
func (s *Server) jsonRouteSet() (map[string]bool, error) {
	names := s.opts.JSONRoutes
	if names == nil {
		names = DefaultJSONRoutes()
	}
	table := map[string]bool{}
	for _, r := range s.routes() {
		table[r.Method+" "+r.Path] = true
	}
	set := map[string]bool{}
	for _, n := range names {
		if !table[n] {
			return nil, fmt.Errorf("web: JSON route %q is not in the route table", n)
		}
		set[n] = true
	}
	return set, nil
}

// limitBody reads every request body, before any handler, through
// http.MaxBytesReader with Options.MaxBodyBytes as the limit: a declared
// Content-Length over it answers 413 at once, an undeclared (chunked) body
// 413 as soon as it passes the limit. The body handlers then read is the
// buffered copy, with ContentLength set to its size.
func (s *Server) limitBody() gin.HandlerFunc {
	limit := s.opts.MaxBodyBytes
	return func(c *gin.Context) {
		r := c.Request
		if r.Body == nil || r.Body == http.NoBody {
			c.Next()
			return
		}
		if r.ContentLength > limit {
			tooLarge(c, limit)
			return
		}
		data, err := io.ReadAll(http.MaxBytesReader(c.Writer, r.Body, limit))
		var big *http.MaxBytesError
		switch {
		case errors.As(err, &big):
			tooLarge(c, limit)
			return
		case err != nil:
			apiError(c, http.StatusBadRequest, "bad_body", "could not read the body")
			return
		}
		r.Body.Close()
		r.Body, r.ContentLength = io.NopCloser(bytes.NewReader(data)), int64(len(data))
		c.Next()
	}
}

// tooLarge answers 413 Content Too Large (RFC 9110 section 15.5.14).
func tooLarge(c *gin.Context, limit int64) {
	size := fmt.Sprintf("%d bytes", limit)
	if limit%(1<<20) == 0 {
		size = fmt.Sprintf("%d MiB", limit>>20)
	}
	apiError(c, http.StatusRequestEntityTooLarge, "too_large", "the body exceeds "+size)
}

// requireJSON answers 415 Unsupported Media Type (RFC 9110 section
// 15.5.16) when a JSON route (Options.JSONRoutes) gets a non-empty body
// that is not labelled application/json, or is labelled with a charset
// other than UTF-8 (RFC 8259 section 8.1: JSON between systems is UTF-8).
// It runs after limitBody, so ContentLength is the body's real size.
func (s *Server) requireJSON(routes map[string]bool) gin.HandlerFunc {
	return func(c *gin.Context) {
		if c.Request.ContentLength == 0 || !routes[c.Request.Method+" "+c.FullPath()] {
			c.Next()
			return
		}
		mt, params, err := mime.ParseMediaType(c.GetHeader("Content-Type"))
		if cs, ok := params["charset"]; err != nil || mt != "application/json" || ok && !strings.EqualFold(cs, "utf-8") {
			apiError(c, http.StatusUnsupportedMediaType, "content_type", "send application/json (UTF-8)")
			return
		}
		c.Next()
	}
}

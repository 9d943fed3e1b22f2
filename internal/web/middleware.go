package web

import (
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"
	"slices"
	"time"

	"github.com/gin-gonic/gin"
)

// securityHeaders sets a content security policy and the usual hardening
// headers on every response.
func (s *Server) securityHeaders() gin.HandlerFunc {
	return func(c *gin.Context) {
		h := c.Writer.Header()
		h.Set("Content-Security-Policy", "default-src 'self'; img-src 'self' data:; style-src 'self'; script-src 'self'; frame-ancestors 'none'; base-uri 'none'")
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Referrer-Policy", "same-origin")
		c.Next()
	}
}

// cors lets configured intranet origins call the API for the widget.
func (s *Server) cors() gin.HandlerFunc {
	return func(c *gin.Context) {
		origin := c.GetHeader("Origin")
		if origin != "" && slices.Contains(s.opts.AllowedOrigins, origin) {
			h := c.Writer.Header()
			h.Set("Access-Control-Allow-Origin", origin)
			h.Set("Vary", "Origin")
			h.Set("Access-Control-Allow-Methods", "GET, POST")
			h.Set("Access-Control-Allow-Headers", "Content-Type")
			if c.Request.Method == http.MethodOptions {
				c.AbortWithStatus(http.StatusNoContent)
				return
			}
		}
		c.Next()
	}
}

// recoverPanics turns a handler's panic into a 500 in the API's error
// shape and one error line in Options.Log. It stands in for gin.Recovery,
// which writes the request's headers (all but Authorization) to stderr on
// some panics: those headers carry the proxy's shared secret. The line
// names the route, the method and the panic value, never a header.
func (s *Server) recoverPanics() gin.HandlerFunc {
	return func(c *gin.Context) {
		defer func() {
			v := recover()
			if v == nil {
				return
			}
			if v == http.ErrAbortHandler {
				panic(v)
			}
			s.opts.Log.Error("handler panic", "method", logMethod(c.Request.Method), "route", c.FullPath(), "panic", fmt.Sprint(v), "stack", string(debug.Stack()))
			if c.Writer.Written() {
				c.Abort()
				return
			}
			apiError(c, http.StatusInternalServerError, "internal", "the server failed to answer")
		}()
		c.Next()
	}
}

// logRequests writes one debug line per request: method, route pattern,
// status, duration and the caller's token name (Caller.Name). Nothing
// else of the request is logged: not the URL (its query is the searcher's
// words), not a header (Authorization carries a token, the proxy's header
// its shared secret, the identity headers a person's groups), not the body.
func (s *Server) logRequests() gin.HandlerFunc {
	return func(c *gin.Context) {
		ctx := c.Request.Context()
		if !s.opts.Log.Enabled(ctx, slog.LevelDebug) {
			c.Next()
			return
		}
		start := time.Now()
		c.Next()
		route := c.FullPath()
		if route == "" {
			route = "unmatched"
		}
		s.opts.Log.LogAttrs(ctx, slog.LevelDebug, "request", slog.String("method", logMethod(c.Request.Method)),
			slog.String("route", route), slog.Int("status", c.Writer.Status()),
			slog.Duration("took", time.Since(start)), slog.String("caller", s.caller(c).Name))
	}
}

// logMethod is a request method for a log line: the methods of RFC 9110
// section 9.3 as they are, anything else (a client may send any token)
// as "other".
func logMethod(m string) string {
	switch m {
	case http.MethodGet, http.MethodHead, http.MethodPost, http.MethodPut, http.MethodDelete,
		http.MethodConnect, http.MethodOptions, http.MethodTrace, http.MethodPatch:
		return m
	}
	return "other"
}

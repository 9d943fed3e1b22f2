package web

import (
	"errors"
	"net/http"
	"strings"
	"unicode/utf8"

	"github.com/gin-gonic/gin"

	"kinword/internal/finder"
	"kinword/internal/index"
)

// lookupQuery is the query string of /api/v1/lookup and /api/v1/hints.
type lookupQuery struct {
	Q        string `form:"q"`
	Accepted string `form:"accepted"` // suggestion keys joined by "|"
	Useful   string `form:"useful"`   // IDs of results marked useful, joined by "|"
}

func (s *Server) bindLookup(c *gin.Context) (finder.Request, bool) {
	var lq lookupQuery
	if err := c.ShouldBindQuery(&lq); err != nil {
		apiError(c, http.StatusBadRequest, "bad_request", err.Error())
		return finder.Request{}, false
	}
	if strings.TrimSpace(lq.Q) == "" {
		apiError(c, http.StatusBadRequest, "missing_query", "parameter q is required")
		return finder.Request{}, false
	}
	if !utf8.ValidString(lq.Q) || !utf8.ValidString(lq.Accepted) || !utf8.ValidString(lq.Useful) {
		apiError(c, http.StatusBadRequest, "invalid_utf8", "parameters must be valid UTF-8")
		return finder.Request{}, false
	}
	for _, r := range lq.Q {
		if r < 0x20 && r != '\t' {
			apiError(c, http.StatusBadRequest, "control_characters", "the query contains control characters")
			return finder.Request{}, false
		}
	}
	var acc []string
	if lq.Accepted != "" {
		acc = strings.Split(lq.Accepted, "|")
	}
	var useful []string
	if lq.Useful != "" {
		useful = strings.Split(lq.Useful, "|")
	}
	return finder.Request{Query: lq.Q, Accepted: acc, Useful: useful, Viewer: s.viewer(c)}, true
}

func (s *Server) answer(c *gin.Context, req finder.Request) {
	resp, err := s.f.Search(c.Request.Context(), req)
	switch {
	case errors.Is(err, index.ErrBadQuery):
		apiError(c, http.StatusBadRequest, "bad_query", err.Error())
		return
	case errors.Is(err, finder.ErrNotReady):
		c.Header("Retry-After", "5")
		apiError(c, http.StatusServiceUnavailable, "not_ready", "the index is not loaded yet")
		return
	case err != nil:
		s.opts.Log.Error("lookup", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the search failed")
		return
	}
	s.metrics.impressions.Add(float64(len(resp.Suggestions)))
	s.metrics.accepted.Add(float64(len(resp.Accepted)))
	c.JSON(http.StatusOK, resp)
}

// lookup answers a search with results, snippets and suggestions.
func (s *Server) lookup(c *gin.Context) {
	req, ok := s.bindLookup(c)
	if !ok {
		return
	}
	req.WithResults = true
	s.answer(c, req)
}

// hints answers with suggestions only, for a widget on another page.
func (s *Server) hints(c *gin.Context) {
	req, ok := s.bindLookup(c)
	if !ok {
		return
	}
	s.answer(c, req)
}

// whoami tells the page which viewer it is and, in demo mode, the personas.
func (s *Server) whoami(c *gin.Context) {
	c.JSON(http.StatusOK, gin.H{"viewer": s.viewer(c), "demo": s.opts.Demo, "personas": s.opts.Personas})
}

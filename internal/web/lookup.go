package web

import (
	"errors"
	"fmt"
	"net/http"
	"strings"

	"github.com/gin-gonic/gin"

	"kinword/internal/finder"
	"kinword/internal/index"
)

// lookupParams are the parameters of /api/v1/lookup and /api/v1/hints:
// q (the query), accepted (suggestion keys joined by "|"), useful (IDs of
// results marked useful, joined by "|") and persona (demo mode). Any other
// parameter, or one given twice, answers 400.
var lookupParams = []string{"q", "accepted", "useful", "persona"}

// bindLookup checks the query string (strictQuery) and the query's length
// (Options.MaxQueryBytes, in bytes as sent, 400 bad_query beyond it); the
// finder then refuses a query of more distinct terms than its limit with
// index.ErrBadQuery, which answer maps to 400 bad_query as well.
func (s *Server) bindLookup(c *gin.Context) (finder.Request, bool) {
	p, ok := strictQuery(c, lookupParams...)
	if !ok {
		return finder.Request{}, false
	}
	q := p["q"]
	if strings.TrimSpace(q) == "" {
		apiError(c, http.StatusBadRequest, "missing_query", "parameter q is required")
		return finder.Request{}, false
	}
	if len(q) > s.opts.MaxQueryBytes {
		apiError(c, http.StatusBadRequest, "bad_query", fmt.Sprintf("the query is %d bytes; the limit is %d", len(q), s.opts.MaxQueryBytes))
		return finder.Request{}, false
	}
	var acc []string
	if p["accepted"] != "" {
		acc = strings.Split(p["accepted"], "|")
	}
	var useful []string
	if p["useful"] != "" {
		useful = strings.Split(p["useful"], "|")
	}
	return finder.Request{Query: q, Accepted: acc, Useful: useful, Viewer: s.viewer(c)}, true
}

func (s *Server) answer(c *gin.Context, req finder.Request) {
	resp, err := s.f.Search(c.Request.Context(), req)
	switch {
	case errors.Is(err, index.ErrBadQuery):
		// The searcher reads the reason, not the package it came from.
		apiError(c, http.StatusBadRequest, "bad_query", strings.TrimPrefix(err.Error(), index.ErrBadQuery.Error()+": "))
		return
	case errors.Is(err, finder.ErrNotReady):
		c.Header("Retry-After", "5")
		apiError(c, http.StatusServiceUnavailable, "not_ready", "the index is not loaded yet")
		return
	case err != nil && c.Request.Context().Err() != nil:
		// The caller went away (or its deadline passed): nothing failed here,
		// and nobody reads the answer; 499 in the access log's manner.
		s.opts.Log.Debug("lookup abandoned by the caller", "err", err)
		c.AbortWithStatus(499)
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

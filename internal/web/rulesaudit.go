package web

import (
	"bytes"
	"encoding/json"
	"net/http"
	"strconv"

	"github.com/gin-gonic/gin"
)

// Audit page sizes of GET /api/v1/rules/audit.
const (
	defaultAuditLimit = 100
	maxAuditLimit     = 1000
)

// ruleAudit answers GET /api/v1/rules/audit?rule=&limit=.
func (s *Server) ruleAudit(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	limit := defaultAuditLimit
	if v := c.Query("limit"); v != "" {
		n, err := strconv.Atoi(v)
		if err != nil || n < 1 || n > maxAuditLimit {
			apiError(c, http.StatusBadRequest, "bad_limit", "limit is a whole number from 1 to "+strconv.Itoa(maxAuditLimit))
			return
		}
		limit = n
	}
	entries, err := b.Audit(c.Request.Context(), c.Query("rule"), limit)
	if s.ruleError(c, err) {
		return
	}
	if entries == nil {
		entries = []AuditEntry{}
	}
	c.JSON(http.StatusOK, gin.H{"entries": entries})
}

// revertIn is the optional body of POST /api/v1/rules/audit/:seq/revert.
type revertIn struct {
	Why string `json:"why"`
}

// revertRule answers POST /api/v1/rules/audit/:seq/revert: the rule goes
// back to its state before entry seq, unless it changed since (409).
func (s *Server) revertRule(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	seq, err := strconv.ParseInt(c.Param("seq"), 10, 64)
	if err != nil || seq <= 0 {
		apiError(c, http.StatusBadRequest, "bad_seq", "name the audit entry by its seq, a positive whole number")
		return
	}
	var in revertIn
	if c.Request.ContentLength != 0 {
		body, ok := readJSONBody(c)
		if !ok {
			return
		}
		dec := json.NewDecoder(bytes.NewReader(body))
		dec.DisallowUnknownFields()
		if len(bytes.TrimSpace(body)) > 0 {
			if err := dec.Decode(&in); err != nil {
				apiError(c, http.StatusBadRequest, "malformed_json", "malformed JSON: "+err.Error())
				return
			}
		}
	}
	e, err := b.Revert(c.Request.Context(), seq, s.actor(c), in.Why)
	s.ruleChanged(c, http.StatusOK, e, err)
}

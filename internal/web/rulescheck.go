package web

import (
	"errors"
	"net/http"
	"regexp"
	"strings"

	"github.com/gin-gonic/gin"

	"kinword/internal/curate"
)

// problemOut is one validation problem in a 400 or 409 answer.
type problemOut struct {
	Field   string `json:"field"`
	Message string `json:"message"`
	RuleID  string `json:"rule_id,omitempty"` // the other rule, when there is one
}

// ruleID is the shape of a rule ID a client may choose: one path segment
// of URL-safe characters (RFC 3986 section 2.3, unreserved), so PUT and
// DELETE can name it.
var ruleID = regexp.MustCompile(`^[A-Za-z0-9._~-]{1,64}$`)

// bindRule reads a rule body, rejecting unknown fields.
func bindRule(c *gin.Context) (ruleIn, bool) {
	var in ruleIn
	ok := bindStrict(c, &in)
	return in, ok
}

// checkRule validates r as it would stand among the stored rules (without
// the rule replacing, when replacing is set): field problems answer 400,
// contradictions with other rules 409, each with the problems listed.
func (s *Server) checkRule(c *gin.Context, stored []RuleRecord, replacing string, r curate.Rule) bool {
	set := make([]curate.Rule, 0, len(stored)+1)
	for _, x := range stored {
		if x.ID != replacing {
			set = append(set, x.Rule)
		}
	}
	set = append(set, r)
	last := len(set) - 1
	var out []problemOut
	contradiction := false
	for _, p := range curate.ValidateSet(set, s.departments(), s.opts.Pipeline) {
		if p.Index != last {
			continue // a problem among the stored rules is not this caller's
		}
		contradiction = contradiction || errors.Is(p.Err, curate.ErrContradiction)
		out = append(out, problemOut{Field: p.Field, Message: p.Message})
	}
	if len(out) == 0 {
		return true
	}
	status, code := http.StatusBadRequest, "invalid_rule"
	if contradiction {
		status, code = http.StatusConflict, "contradiction"
	}
	msgs := make([]string, len(out))
	for i, p := range out {
		msgs[i] = p.Field + ": " + p.Message
	}
	c.AbortWithStatusJSON(status, gin.H{"error": gin.H{"code": code, "message": strings.Join(msgs, "; ")}, "problems": out})
	return false
}

// hasRule reports whether id is among rules.
func hasRule(rules []RuleRecord, id string) bool {
	for _, r := range rules {
		if r.ID == id {
			return true
		}
	}
	return false
}

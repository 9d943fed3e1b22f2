package web

import (
	"context"
	"errors"
	"net/http"
	"strconv"
	"time"

	"github.com/gin-gonic/gin"

	"kinword/internal/curate"
)

// Sentinel errors a RuleBook wraps so the rule routes can answer 400, 404
// and 409 without knowing the store.
var (
	// ErrRuleInvalid: the store refused the input (400).
	ErrRuleInvalid = errors.New("web: invalid rule")
	// ErrRuleNotFound: no such rule or audit entry (404).
	ErrRuleNotFound = errors.New("web: rule not found")
	// ErrRuleConflict: a stale version, an ID in use, or a revert over a
	// later change (409).
	ErrRuleConflict = errors.New("web: rule conflict")
)

// RuleRecord is a stored rule: its curation fields, and the version and
// time of its last change, which the store sets.
type RuleRecord struct {
	curate.Rule
	// Version is the optimistic-concurrency version: 1 on creation, +1 per
	// change; updates and deletes must send the version they read.
	Version int64 `json:"version"`
	// Updated is when the rule last changed (UTC).
	Updated time.Time `json:"updated"`
}

// AuditEntry is one change of one rule.
type AuditEntry struct {
	Seq    int64       `json:"seq"`     // position in the log, increasing in commit order
	RuleID string      `json:"rule_id"` // the rule changed
	Actor  string      `json:"actor"`   // API token name, or "demo"
	Action string      `json:"action"`  // create, update, delete, revert or import
	Reason string      `json:"reason"`  // why, as the librarian said
	At     time.Time   `json:"at"`      // when it committed (UTC)
	Before *RuleRecord `json:"before"`  // null when the rule did not exist
	After  *RuleRecord `json:"after"`   // null when the rule was deleted
}

// Impression is one list of suggestions as it was shown.
type Impression struct {
	Time       time.Time
	Department string   // the searcher's department; "" = none
	Query      string   // normalised query key: stem keys joined by spaces
	Shown      []string // the suggestion keys shown, in order
}

// RuleBook is what the librarian routes need of the rule store. Errors
// wrap ErrRuleInvalid, ErrRuleNotFound or ErrRuleConflict when the caller
// is at fault; anything else answers 500.
type RuleBook interface {
	// Rules returns every rule, sorted by ID, and the rules version (the
	// newest audit sequence number; 0 before the first change).
	Rules(ctx context.Context) ([]RuleRecord, int64, error)
	// Create stores a new rule; an empty ID is assigned.
	Create(ctx context.Context, r curate.Rule, actor, why string) (RuleRecord, error)
	// Update replaces rule r.ID; r.Version must be the stored version.
	Update(ctx context.Context, r RuleRecord, actor, why string) (RuleRecord, error)
	// Delete removes rule id at version.
	Delete(ctx context.Context, id string, version int64, actor, why string) error
	// Audit returns the newest limit entries (of rule ruleID; "" = all),
	// newest first.
	Audit(ctx context.Context, ruleID string, limit int) ([]AuditEntry, error)
	// Revert undoes audit entry seq and returns the entry recording it.
	Revert(ctx context.Context, seq int64, actor, why string) (AuditEntry, error)
	// Import adds rules (replace false) or makes them the whole rule set
	// (replace true), all or nothing.
	Import(ctx context.Context, rules []curate.Rule, replace bool, actor, why string) error
	// Impressions calls fn for every impression since since, oldest first,
	// and stops at fn's first error.
	Impressions(ctx context.Context, since time.Time, fn func(Impression) error) error
}

// ruleIn is the body of POST and PUT /api/v1/rules.
type ruleIn struct {
	curate.Rule
	Version int64  `json:"version"`
	Why     string `json:"why"`
}

// book returns the rule book, or answers 503 and returns nil.
func (s *Server) book(c *gin.Context) RuleBook {
	if s.opts.Rules == nil {
		apiError(c, http.StatusServiceUnavailable, "no_store", "this server keeps no rules")
	}
	return s.opts.Rules
}

// actor is the name recorded in the audit log for this caller.
func (s *Server) actor(c *gin.Context) string {
	w := s.caller(c)
	switch {
	case w.Demo:
		return demoName
	case w.Name != "":
		return w.Name
	}
	return "unknown"
}

// changed tells the server's rules refresher that rules changed.
func (s *Server) changed() {
	if s.opts.RulesChanged != nil {
		s.opts.RulesChanged()
	}
}

// departments is the set rules are checked against; nil accepts any.
func (s *Server) departments() curate.Departments {
	if len(s.opts.Departments) == 0 {
		return nil
	}
	return curate.NewDepartmentSet(s.opts.Departments...)
}

// listRules answers GET /api/v1/rules.
func (s *Server) listRules(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	rules, v, err := b.Rules(c.Request.Context())
	if s.ruleError(c, err) {
		return
	}
	if rules == nil {
		rules = []RuleRecord{}
	}
	c.JSON(http.StatusOK, gin.H{"rules": rules, "version": v})
}

// createRule answers POST /api/v1/rules.
func (s *Server) createRule(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	in, ok := bindRule(c)
	if !ok {
		return
	}
	if in.ID != "" && !ruleID.MatchString(in.ID) {
		apiError(c, http.StatusBadRequest, "bad_id", "an id is 1 to 64 letters, digits, '.', '_', '~' or '-'; leave it out to have one assigned")
		return
	}
	rules, _, err := b.Rules(c.Request.Context())
	if s.ruleError(c, err) || !s.checkRule(c, rules, "", in.Rule) {
		return
	}
	out, err := b.Create(c.Request.Context(), in.Rule, s.actor(c), in.Why)
	s.ruleChanged(c, http.StatusCreated, out, err)
}

// ruleChanged answers a rule change: the store's error, or the changed
// record after the rules have been refreshed.
func (s *Server) ruleChanged(c *gin.Context, status int, out any, err error) {
	if s.ruleError(c, err) {
		return
	}
	s.changed()
	c.JSON(status, out)
}

// updateRule answers PUT /api/v1/rules/:id.
func (s *Server) updateRule(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	in, ok := bindRule(c)
	if !ok {
		return
	}
	id := c.Param("id")
	if in.ID != "" && in.ID != id {
		apiError(c, http.StatusBadRequest, "id_mismatch", "the body's id differs from the path's")
		return
	}
	if in.Version <= 0 {
		apiError(c, http.StatusBadRequest, "missing_version", "send the version of the rule you read")
		return
	}
	in.ID = id
	rules, _, err := b.Rules(c.Request.Context())
	if s.ruleError(c, err) {
		return
	}
	if !hasRule(rules, id) {
		apiError(c, http.StatusNotFound, "not_found", "no rule "+strconv.Quote(id))
		return
	}
	if !s.checkRule(c, rules, id, in.Rule) {
		return
	}
	out, err := b.Update(c.Request.Context(), RuleRecord{Rule: in.Rule, Version: in.Version}, s.actor(c), in.Why)
	s.ruleChanged(c, http.StatusOK, out, err)
}

// deleteRule answers DELETE /api/v1/rules/:id?version=N&why=.
func (s *Server) deleteRule(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	v, err := strconv.ParseInt(c.Query("version"), 10, 64)
	if err != nil || v <= 0 {
		apiError(c, http.StatusBadRequest, "missing_version", "send ?version= with the version of the rule you read")
		return
	}
	if s.ruleError(c, b.Delete(c.Request.Context(), c.Param("id"), v, s.actor(c), c.Query("why"))) {
		return
	}
	s.changed()
	c.Status(http.StatusNoContent)
}

// ruleError answers a failed rule-book call and reports whether it did.
func (s *Server) ruleError(c *gin.Context, err error) bool {
	switch {
	case err == nil:
		return false
	case errors.Is(err, ErrRuleInvalid):
		apiError(c, http.StatusBadRequest, "invalid_rule", err.Error())
	case errors.Is(err, ErrRuleNotFound):
		apiError(c, http.StatusNotFound, "not_found", err.Error())
	case errors.Is(err, ErrRuleConflict):
		apiError(c, http.StatusConflict, "conflict", err.Error())
	default:
		s.opts.Log.Error("rules", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the rule store failed")
	}
	return true
}

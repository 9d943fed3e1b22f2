package web

import (
	"context"
	"errors"
	"net/http"
	"strings"
	"time"

	"github.com/gin-gonic/gin"

	"kinword/internal/trial"
)

// Sentinel errors a TrialKeeper wraps so the trial routes can answer
// without knowing the store. Invalid proposals wrap trial.ErrInvalid (400).
var (
	// ErrNoJudgedSet: no judged set is configured (503).
	ErrNoJudgedSet = errors.New("web: no judged set configured")
	// ErrTrialNotFound: no stored trial has the ID (404).
	ErrTrialNotFound = errors.New("web: trial not found")
)

// TrialSummary lists one stored trial.
type TrialSummary struct {
	ID      string    `json:"id"`
	Created time.Time `json:"created"`
	Actor   string    `json:"actor"`
	Title   string    `json:"title"`
}

// TrialKeeper runs and keeps the admin's offline trials of proposed
// changes against the organisation's judged set.
type TrialKeeper interface {
	// Run tries p, running the judged topics as viewers holding groups,
	// stores the report under actor and returns it with its ID.
	Run(ctx context.Context, p trial.Proposal, groups []string, actor string) (*trial.Report, error)
	// List returns the newest stored trials, newest first.
	List(ctx context.Context) ([]TrialSummary, error)
	// Get returns one stored report.
	Get(ctx context.Context, id string) (*trial.Report, error)
}

// maxTrialTime bounds one trial run.
const maxTrialTime = 2 * time.Minute

// keeper returns the trial keeper, or answers 503 and returns nil.
func (s *Server) keeper(c *gin.Context) TrialKeeper {
	if s.opts.Trials == nil {
		apiError(c, http.StatusServiceUnavailable, "no_trials", "this server runs no trials (no store or no judged set configured: review.judged_dir)")
	}
	return s.opts.Trials
}

// runTrial answers POST /api/v1/trials: the proposal is run against the
// judged set as the caller's groups (so the report draws only on what the
// caller may read) and stored; 201 with the report.
func (s *Server) runTrial(c *gin.Context) {
	k := s.keeper(c)
	if k == nil {
		return
	}
	var p trial.Proposal
	if !bindStrict(c, &p) {
		return
	}
	if strings.TrimSpace(p.Title) == "" {
		apiError(c, http.StatusBadRequest, "invalid_trial", "title: say what the trial tries")
		return
	}
	if p.Empty() {
		apiError(c, http.StatusBadRequest, "invalid_trial", "the proposal changes nothing: add or remove rules, or set auto_expand or accepted_weight")
		return
	}
	ctx, cancel := context.WithTimeout(c.Request.Context(), maxTrialTime)
	defer cancel()
	rep, err := k.Run(ctx, p, s.viewer(c).Groups, s.actor(c))
	if s.trialError(c, err) {
		return
	}
	c.JSON(http.StatusCreated, rep)
}

// listTrials answers GET /api/v1/trials.
func (s *Server) listTrials(c *gin.Context) {
	k := s.keeper(c)
	if k == nil {
		return
	}
	list, err := k.List(c.Request.Context())
	if s.trialError(c, err) {
		return
	}
	if list == nil {
		list = []TrialSummary{}
	}
	c.JSON(http.StatusOK, gin.H{"trials": list})
}

// getTrial answers GET /api/v1/trials/:id, as JSON or, with
// ?format=markdown or csv, as the Markdown report or its tables as CSV.
func (s *Server) getTrial(c *gin.Context) {
	k := s.keeper(c)
	if k == nil {
		return
	}
	format := c.DefaultQuery("format", "json")
	if format != "json" && format != "markdown" && format != "csv" {
		apiError(c, http.StatusBadRequest, "bad_format", "format is json, markdown or csv")
		return
	}
	rep, err := k.Get(c.Request.Context(), c.Param("id"))
	if s.trialError(c, err) {
		return
	}
	if format == "json" {
		c.JSON(http.StatusOK, rep)
		return
	}
	var b strings.Builder
	write, ext, mime := rep.WriteMarkdown, "md", "text/markdown; charset=utf-8"
	if format == "csv" {
		write, ext, mime = rep.WriteCSV, "csv", "text/csv; charset=utf-8"
	}
	if err := write(&b); err != nil {
		s.trialError(c, err)
		return
	}
	c.Header("Content-Disposition", `attachment; filename="kinword-trial-`+rep.ID+`.`+ext+`"`)
	c.Data(http.StatusOK, mime, []byte(b.String()))
}

// trialError answers err (if any) and reports whether it did.
func (s *Server) trialError(c *gin.Context, err error) bool {
	switch {
	case err == nil:
		return false
	case errors.Is(err, trial.ErrInvalid):
		apiError(c, http.StatusBadRequest, "invalid_trial", err.Error())
	case errors.Is(err, ErrTrialNotFound):
		apiError(c, http.StatusNotFound, "not_found", "no trial has this ID")
	case errors.Is(err, ErrNoJudgedSet):
		apiError(c, http.StatusServiceUnavailable, "no_trials", "no judged set is configured (review.judged_dir)")
	case errors.Is(err, context.DeadlineExceeded):
		apiError(c, http.StatusServiceUnavailable, "timeout", "the trial took longer than "+maxTrialTime.String())
	default:
		s.opts.Log.Error("trial", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the trial failed")
	}
	return true
}

package web

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"net/http"
	"slices"
	"strings"
	"time"

	"github.com/gin-gonic/gin"

	"kinword/internal/curate"
	"kinword/internal/review"
)

// Reviewer builds the admin's review of suggestion quality.
type Reviewer interface {
	// Review reviews the stored events under opts.
	Review(ctx context.Context, opts review.Options) (*review.Report, error)
}

// reviewer returns the reviewer, or answers 503 and returns nil.
func (s *Server) reviewer(c *gin.Context) Reviewer {
	if s.opts.Reviewer == nil {
		apiError(c, http.StatusServiceUnavailable, "no_store", "this server keeps no events to review")
	}
	return s.opts.Reviewer
}

// reviewOptions reads ?from=&to=&department= (RFC 3339 times; empty =
// open), or answers 400.
func reviewOptions(c *gin.Context) (review.Options, bool) {
	var o review.Options
	for _, f := range []struct {
		name string
		t    *time.Time
	}{{"from", &o.From}, {"to", &o.To}} {
		v := c.Query(f.name)
		if v == "" {
			continue
		}
		t, err := time.Parse(time.RFC3339, v)
		if err != nil {
			apiError(c, http.StatusBadRequest, "bad_time", f.name+" is an RFC 3339 time such as 2026-03-01T00:00:00Z")
			return o, false
		}
		*f.t = t.UTC()
	}
	if !o.From.IsZero() && !o.To.IsZero() && !o.To.After(o.From) {
		apiError(c, http.StatusBadRequest, "bad_window", "to must be after from")
		return o, false
	}
	o.Department = c.Query("department")
	if len(o.Department) > curate.MaxDepartmentBytes {
		apiError(c, http.StatusBadRequest, "bad_department", fmt.Sprintf("department is at most %d bytes", curate.MaxDepartmentBytes))
		return o, false
	}
	return o, true
}

// runReview reads the options and builds the report, or answers.
func (s *Server) runReview(c *gin.Context) (*review.Report, bool) {
	rv := s.reviewer(c)
	if rv == nil {
		return nil, false
	}
	o, ok := reviewOptions(c)
	if !ok {
		return nil, false
	}
	rep, err := rv.Review(c.Request.Context(), o)
	if err != nil {
		s.opts.Log.Error("review", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the review failed")
		return nil, false
	}
	return s.scopeReport(s.viewer(c), rep), true
}

// reviewReport answers GET /api/v1/review with the report as JSON.
func (s *Server) reviewReport(c *gin.Context) {
	rep, ok := s.runReview(c)
	if !ok {
		return
	}
	c.JSON(http.StatusOK, reviewJSON(rep))
}

// reviewExport answers GET /api/v1/review/export?table= with one table of
// the report as CSV (review.Report.WriteCSV).
func (s *Server) reviewExport(c *gin.Context) {
	table := c.Query("table")
	if !slices.Contains(review.Tables(), table) {
		apiError(c, http.StatusBadRequest, "bad_table", "table is one of "+strings.Join(review.Tables(), ", "))
		return
	}
	rep, ok := s.runReview(c)
	if !ok {
		return
	}
	var buf bytes.Buffer
	if err := rep.WriteCSV(&buf, table); err != nil {
		if errors.Is(err, review.ErrUnknownTable) {
			apiError(c, http.StatusBadRequest, "bad_table", err.Error())
			return
		}
		s.opts.Log.Error("review export", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the table was not written")
		return
	}
	c.Header("Content-Disposition", fmt.Sprintf(`attachment; filename="kinword-review-%s.csv"`, table))
	c.Data(http.StatusOK, "text/csv; charset=utf-8", buf.Bytes())
}

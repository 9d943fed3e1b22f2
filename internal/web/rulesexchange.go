package web

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"net/http"

	"github.com/gin-gonic/gin"

	"kinword/internal/curate"
)

// ruleFormat is one exchange format of the rules.
type ruleFormat struct {
	contentType string
	ext         string
	export      func(io.Writer, []curate.Rule, curate.Options) error
	imp         func(io.Reader, curate.Options) ([]curate.Rule, *curate.Report, error)
}

// ruleFormats are the formats of ?format=: CSV (RFC 4180), N-Triples (W3C
// RDF 1.1 N-Triples, media type application/n-triples) and JSON-LD (W3C
// JSON-LD 1.1, application/ld+json), the last two in W3C SKOS.
var ruleFormats = map[string]ruleFormat{
	"csv":      {"text/csv; charset=utf-8", "csv", curate.ExportCSV, curate.ImportCSV},
	"ntriples": {"application/n-triples", "nt", curate.ExportNTriples, curate.ImportNTriples},
	"jsonld":   {"application/ld+json", "jsonld", curate.ExportJSONLD, curate.ImportJSONLD},
}

// format returns the ?format= of the request, or answers 400.
func format(c *gin.Context) (ruleFormat, bool) {
	f, ok := ruleFormats[c.Query("format")]
	if !ok {
		apiError(c, http.StatusBadRequest, "bad_format", "format is csv, ntriples or jsonld")
	}
	return f, ok
}

// curateOptions are the exchange options of this server.
func (s *Server) curateOptions() curate.Options {
	return curate.Options{Pipeline: s.opts.Pipeline, Departments: s.departments(), MaxBytes: maxBody}
}

// exportRules answers GET /api/v1/rules/export?format=: every rule as a
// file to save.
func (s *Server) exportRules(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	f, ok := format(c)
	if !ok {
		return
	}
	recs, _, err := b.Rules(c.Request.Context())
	if s.ruleError(c, err) {
		return
	}
	rules := make([]curate.Rule, len(recs))
	for i, r := range recs {
		rules[i] = r.Rule
	}
	o := s.curateOptions()
	o.Departments = nil // export what is stored, whatever the department list says now
	var buf bytes.Buffer
	if err := f.export(&buf, rules, o); err != nil {
		s.opts.Log.Error("rules export", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the stored rules do not export: "+err.Error())
		return
	}
	c.Header("Content-Disposition", fmt.Sprintf(`attachment; filename="kinword-rules.%s"`, f.ext))
	c.Data(http.StatusOK, f.contentType, buf.Bytes())
}

// reportOut is the JSON form of a rejected import's report.
type reportOut struct {
	Format   string         `json:"format"`
	Rejected []rejectionOut `json:"rejected"`
}

type rejectionOut struct {
	Line   int    `json:"line"` // 1-based input line; 0 when unknown
	Item   string `json:"item"`
	Reason string `json:"reason"`
}

// importRules answers POST /api/v1/rules/import?format=&mode=add|replace&why=
// with the file as the body (at most 1 MiB). All or nothing: any rejected
// line rejects the file (400 with the report), and so does a rule that
// contradicts or repeats a stored one in add mode. In add mode, rules
// already stored with the same content (the same curate.ContentID) are
// left as they are and counted as unchanged.
func (s *Server) importRules(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	f, ok := format(c)
	if !ok {
		return
	}
	mode := c.DefaultQuery("mode", "add")
	if mode != "add" && mode != "replace" {
		apiError(c, http.StatusBadRequest, "bad_mode", "mode is add or replace")
		return
	}
	body, err := io.ReadAll(io.LimitReader(c.Request.Body, maxBody+1))
	if err != nil {
		apiError(c, http.StatusBadRequest, "bad_body", "could not read the body")
		return
	}
	if len(body) > maxBody {
		apiError(c, http.StatusRequestEntityTooLarge, "too_large", "the file exceeds 1 MiB")
		return
	}
	rules, rep, err := f.imp(bytes.NewReader(body), s.curateOptions())
	if err != nil {
		if errors.Is(err, curate.ErrImport) && rep != nil {
			rejectImport(c, err.Error(), rep.Format, fromReport(rep.Rejected))
			return
		}
		apiError(c, http.StatusBadRequest, "import_rejected", err.Error())
		return
	}
	stored, _, err := b.Rules(c.Request.Context())
	if s.ruleError(c, err) {
		return
	}
	unchanged := 0
	if mode == "add" {
		var fresh []curate.Rule
		fresh, unchanged = newRules(stored, rules)
		if rej := s.conflicts(stored, fresh); len(rej) > 0 {
			rejectImport(c, fmt.Sprintf("curate: import %s: %d rejected: the file clashes with stored rules", rep.Format, len(rej)), rep.Format, rej)
			return
		}
		rules = fresh
	}
	if len(rules) > 0 || mode == "replace" {
		if s.ruleError(c, b.Import(c.Request.Context(), rules, mode == "replace", s.actor(c), c.Query("why"))) {
			return
		}
		s.changed()
	}
	c.JSON(http.StatusOK, gin.H{"imported": len(rules), "unchanged": unchanged})
}

// newRules drops from imported the rules stored with the same content (a
// stored ID equal to the imported ContentID and the same fields).
func newRules(stored []RuleRecord, imported []curate.Rule) (fresh []curate.Rule, unchanged int) {
	have := make(map[string]curate.Rule, len(stored))
	for _, r := range stored {
		have[r.ID] = r.Rule
	}
	for _, r := range imported {
		if old, ok := have[r.ID]; ok && curate.ContentID(old) == r.ID {
			unchanged++
			continue
		}
		fresh = append(fresh, r)
	}
	return fresh, unchanged
}

// conflicts validates fresh rules added to the stored ones and lists the
// problems of the fresh rules as rejections.
func (s *Server) conflicts(stored []RuleRecord, fresh []curate.Rule) []rejectionOut {
	set := make([]curate.Rule, 0, len(stored)+len(fresh))
	for _, r := range stored {
		set = append(set, r.Rule)
	}
	set = append(set, fresh...)
	var out []rejectionOut
	for _, p := range curate.ValidateSet(set, s.departments(), s.opts.Pipeline) {
		if p.Index < len(stored) {
			continue
		}
		r := set[p.Index]
		out = append(out, rejectionOut{Item: fmt.Sprintf("%s %q -> %q", r.Kind, r.Query, r.Term),
			Reason: fmt.Sprintf("%s: %s (%v)", p.Field, p.Message, p.Err)})
	}
	return out
}

// fromReport converts an import report's rejections.
func fromReport(rs []curate.Rejection) []rejectionOut {
	out := make([]rejectionOut, len(rs))
	for i, x := range rs {
		out[i] = rejectionOut{Line: x.Line, Item: x.Item, Reason: x.Reason}
	}
	return out
}

// rejectImport answers 400 with the import report.
func rejectImport(c *gin.Context, msg, format string, rej []rejectionOut) {
	c.AbortWithStatusJSON(http.StatusBadRequest, gin.H{"error": gin.H{"code": "import_rejected", "message": msg},
		"report": reportOut{Format: format, Rejected: rej}})
}

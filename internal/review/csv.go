package review

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"
)

// ErrUnknownTable is returned by WriteCSV for a table name not in Tables.
var ErrUnknownTable = errors.New("review: unknown table")

// Table names for WriteCSV.
const (
	TableTerms          = "terms"           // Report.Terms
	TablePairs          = "pairs"           // Report.Pairs
	TableTrend          = "trend"           // Report.Trend
	TableTermTrend      = "term_trend"      // every Terms row's Trend, one line per (row, bucket)
	TableRarelyAccepted = "rarely_accepted" // Report.RarelyAccepted
	TableOftenDismissed = "often_dismissed" // Report.OftenDismissed
	TableNoResults      = "no_results"      // Report.NoResults
	TableNoSuggestions  = "no_suggestions"  // Report.NoSuggestions
	TableRescued        = "rescued"         // Report.Rescued
)

// Tables lists every table WriteCSV writes, in a fixed order.
func Tables() []string {
	return []string{TableTerms, TablePairs, TableTrend, TableTermTrend, TableRarelyAccepted,
		TableOftenDismissed, TableNoResults, TableNoSuggestions, TableRescued}
}

var (
	rowHeader = []string{"department", "query", "term", "impressions", "exposure", "accepts", "dismissals",
		"successes", "rate", "corrected", "low", "high", "dismiss_rate", "success_rate", "mean_position"}
	trendHeader = []string{"start", "impressions", "shown", "exposure", "accepts", "dismissals", "successes",
		"zero_hits", "empty", "rate", "corrected"}
	attentionHeader = []string{"department", "query", "term", "impressions", "count", "rate", "high",
		"draft_kind", "draft_query", "draft_term", "draft_department"}
)

// WriteCSV writes one table (one of Tables) as RFC 4180 CSV with a header
// line. Numbers are written in the shortest form that parses back to the
// same value; times as RFC 3339 in UTC. Text cells that a spreadsheet
// would evaluate as a formula (starting with = + - @, tab or CR) get a
// leading apostrophe (OWASP, "CSV Injection").
func (r *Report) WriteCSV(w io.Writer, table string) error {
	var (
		header []string
		lines  [][]string
	)
	switch table {
	case TableTerms, TablePairs:
		header = rowHeader
		rows := r.Terms
		if table == TablePairs {
			rows = r.Pairs
		}
		for _, x := range rows {
			lines = append(lines, termLine(x))
		}
	case TableTrend:
		header = trendHeader
		for _, p := range r.Trend {
			lines = append(lines, pointLine(p))
		}
	case TableTermTrend:
		header = append([]string{"department", "term"}, trendHeader...)
		for _, x := range r.Terms {
			for _, p := range x.Trend {
				lines = append(lines, append([]string{text(x.Department), text(x.Term)}, pointLine(p)...))
			}
		}
	case TableRarelyAccepted, TableOftenDismissed, TableNoResults, TableNoSuggestions, TableRescued:
		header = attentionHeader
		for _, a := range r.attentionList(table) {
			lines = append(lines, []string{text(a.Department), text(a.Query), text(a.Term), itoa(a.Impressions),
				itoa(a.Count), ftoa(a.Rate), ftoa(a.High), a.Draft.Kind, text(a.Draft.Query), text(a.Draft.Term),
				text(a.Draft.Department)})
		}
	default:
		return fmt.Errorf("review: write csv: %w: %q (want one of %s)", ErrUnknownTable, table, strings.Join(Tables(), ", "))
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return fmt.Errorf("review: write csv %s: %w", table, err)
	}
	if err := cw.WriteAll(lines); err != nil {
		return fmt.Errorf("review: write csv %s: %w", table, err)
	}
	return nil
}

func (r *Report) attentionList(table string) []Attention {
	switch table {
	case TableRarelyAccepted:
		return r.RarelyAccepted
	case TableOftenDismissed:
		return r.OftenDismissed
	case TableNoResults:
		return r.NoResults
	case TableNoSuggestions:
		return r.NoSuggestions
	}
	return r.Rescued
}

func termLine(x TermRow) []string {
	return []string{text(x.Department), text(x.Query), text(x.Term), itoa(x.Impressions), ftoa(x.Exposure),
		itoa(x.Accepts), itoa(x.Dismissals), itoa(x.Successes), ftoa(x.Rate), ftoa(x.Corrected), ftoa(x.Low),
		ftoa(x.High), ftoa(x.DismissRate), ftoa(x.SuccessRate), ftoa(x.MeanPos)}
}

func pointLine(p Point) []string {
	return []string{p.Start.UTC().Format(time.RFC3339Nano), itoa(p.Impressions), itoa(p.Shown), ftoa(p.Exposure),
		itoa(p.Accepts), itoa(p.Dismissals), itoa(p.Successes), itoa(p.ZeroHits), itoa(p.Empty), ftoa(p.Rate),
		ftoa(p.Corrected)}
}

func itoa(v int) string { return strconv.Itoa(v) }

func ftoa(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// text defuses cells a spreadsheet would run as a formula.
func text(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return "'" + s
	}
	return s
}

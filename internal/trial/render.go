package trial

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"
)

// viewTitles head each view's table.
var viewTitles = map[string]string{
	ViewSearch: "The query as typed",
	ViewFirst:  "After accepting the first suggestion",
	ViewBest:   "After accepting the best of the first suggestions",
}

// WriteMarkdown renders the report: what was tried, each view's table of
// both sides with the comparison (helped, hurt, robustness index and the
// randomization test's p-value on MAP), and the changed suggestions.
func (r *Report) WriteMarkdown(w io.Writer) error {
	var b strings.Builder
	title := r.Proposal.Title
	if title == "" {
		title = "untitled"
	}
	fmt.Fprintf(&b, "# Trial: %s\n\n", md(title))
	if r.ID != "" {
		fmt.Fprintf(&b, "Report %s, run %s by %s.\n", r.ID, r.Created.UTC().Format(time.RFC3339), md(r.Actor))
	}
	fmt.Fprintf(&b, "Judged set %s: %d topics, %d of them changed by the proposal.\n", md(r.Collection), r.Topics, r.Changed)
	fmt.Fprintf(&b, "Rules in force: %d; proposed: %d (%d added or replaced, %d removed).", r.RulesInForce, r.RulesProposed, len(r.Proposal.Add), len(r.Proposal.Remove))
	if a := r.Proposal.AutoExpand; a != nil {
		fmt.Fprintf(&b, " Automatic mode on the proposed side: %v.", *a)
	}
	if w := r.Proposal.AcceptedWeight; w != nil {
		fmt.Fprintf(&b, " Accepted-term weight on the proposed side: %.2f.", *w)
	}
	b.WriteString("\n")
	for _, v := range r.Views {
		fmt.Fprintf(&b, "\n## %s\n\n", viewTitles[v.Name])
		var t strings.Builder
		if err := v.Report.WriteMarkdown(&t); err != nil {
			return err
		}
		// The collection line is already above.
		_, table, _ := strings.Cut(t.String(), "\n\n")
		if table == "" {
			table = t.String()
		}
		b.WriteString(table)
	}
	b.WriteString("\np: two-sided paired randomization test on per-topic average precision; helped/hurt: topics whose AP rose/fell.\n")
	if len(r.Samples) > 0 {
		b.WriteString("\n## Suggestions that changed\n\n| topic | query | before | after |\n|---|---|---|---|\n")
		for _, s := range r.Samples {
			fmt.Fprintf(&b, "| %s | %s | %s | %s |\n", md(s.QID), md(s.Query), md(strings.Join(s.Before, ", ")), md(strings.Join(s.After, ", ")))
		}
	}
	if _, err := io.WriteString(w, b.String()); err != nil {
		return fmt.Errorf("trial: write markdown: %w", err)
	}
	return nil
}

// md escapes table cells and line breaks.
func md(s string) string {
	return strings.NewReplacer("|", `\|`, "\n", " ", "\r", " ").Replace(s)
}

// CSVHeader is the header line of WriteCSV.
var CSVHeader = []string{"view", "method", "topics", "map", "p_at_10", "ndcg_at_10", "r_prec", "recall_at_100",
	"baseline", "helped", "hurt", "robustness", "p_value"}

// WriteCSV writes every view's runs as RFC 4180 CSV, one line per view and
// side, with CSVHeader first; numbers in the shortest form that parses back
// to the same value. The comparison columns are empty on the current side.
func (r *Report) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(CSVHeader); err != nil {
		return fmt.Errorf("trial: write csv: %w", err)
	}
	num := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	for _, v := range r.Views {
		for _, run := range v.Report.Runs {
			line := []string{v.Name, run.Method, strconv.Itoa(run.Topics), num(run.MAP), num(run.P10), num(run.NDCG10),
				num(run.RPrec), num(run.Recall100), "", "", "", "", ""}
			if c := run.Comparison; c != nil {
				copy(line[8:], []string{c.Baseline, strconv.Itoa(c.Helped), strconv.Itoa(c.Hurt), num(c.Robustness), num(c.PValue)})
			}
			if err := cw.Write(line); err != nil {
				return fmt.Errorf("trial: write csv: %w", err)
			}
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("trial: write csv: %w", err)
	}
	return nil
}

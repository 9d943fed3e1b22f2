package eval

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
)

var measureHeads = []string{"MAP", "P@10", "nDCG@10", "R-prec", "R@100"}

var compareHeads = []string{"vs", "helped", "hurt", "RI", "p"}

func measureCells(m Measures) []string {
	return []string{f4(m.MAP), f4(m.P10), f4(m.NDCG10), f4(m.RPrec), f4(m.Recall100)}
}

func f4(x float64) string { return strconv.FormatFloat(x, 'f', 4, 64) }

// rows returns the summary table: methods as rows, measures as columns,
// comparison columns only when some run has a Comparison.
func (r *Report) rows() [][]string {
	compared := false
	for _, run := range r.Runs {
		compared = compared || run.Comparison != nil
	}
	head := append([]string{"method", "topics"}, measureHeads...)
	if compared {
		head = append(head, compareHeads...)
	}
	rows := [][]string{head}
	for _, run := range r.Runs {
		row := append([]string{run.Method, strconv.Itoa(run.Topics)}, measureCells(run.Measures)...)
		if c := run.Comparison; c != nil {
			row = append(row, c.Baseline, strconv.Itoa(c.Helped), strconv.Itoa(c.Hurt), f4(c.Robustness), f4(c.PValue))
		} else if compared {
			row = append(row, "-", "-", "-", "-", "-")
		}
		rows = append(rows, row)
	}
	return rows
}

// WriteTable renders the summary as an aligned plain-text table: one row
// per method, measures to 4 decimals, plus baseline comparison columns
// (helped, hurt, robustness index, p-value) when present.
func (r *Report) WriteTable(w io.Writer) error {
	if r.Collection != "" {
		if _, err := fmt.Fprintf(w, "collection: %s\n", r.Collection); err != nil {
			return fmt.Errorf("eval: write table: %w", err)
		}
	}
	return writeAligned(w, r.rows())
}

// WriteMarkdown renders the summary as a Markdown table with numeric
// columns right-aligned.
func (r *Report) WriteMarkdown(w io.Writer) error {
	rows := r.rows()
	var b strings.Builder
	if r.Collection != "" {
		fmt.Fprintf(&b, "Collection: %s\n\n", mdEscape(r.Collection))
	}
	for i, row := range rows {
		cells := make([]string, len(row))
		for j, c := range row {
			cells[j] = mdEscape(c)
		}
		b.WriteString("| " + strings.Join(cells, " | ") + " |\n")
		if i == 0 {
			b.WriteString("|---|")
			for j := 1; j < len(row); j++ {
				if row[j] == "vs" {
					b.WriteString("---|")
				} else {
					b.WriteString("---:|")
				}
			}
			b.WriteString("\n")
		}
	}
	if _, err := io.WriteString(w, b.String()); err != nil {
		return fmt.Errorf("eval: write markdown: %w", err)
	}
	return nil
}

// WriteTopicTable renders one method's per-topic measures as an aligned
// plain-text table in qid order. When the run has been compared with a
// baseline, two more columns give the baseline's AP and the AP difference
// (run - baseline). An absent method is an error matching
// ErrUnknownMethod.
func (r *Report) WriteTopicTable(w io.Writer, method string) error {
	run := r.Find(method)
	if run == nil {
		return fmt.Errorf("%w: %q", ErrUnknownMethod, method)
	}
	var base map[string]float64
	if c := run.Comparison; c != nil {
		if b := r.Find(c.Baseline); b != nil {
			base = make(map[string]float64, len(b.PerTopic))
			for _, t := range b.PerTopic {
				base[t.QID] = t.MAP
			}
		}
	}
	head := append([]string{"qid", "rel"}, measureHeads...)
	head[2] = "AP"
	if base != nil {
		head = append(head, "base AP", "diff")
	}
	rows := [][]string{head}
	for _, t := range run.PerTopic {
		row := append([]string{t.QID, strconv.Itoa(t.NumRel)}, measureCells(t.Measures)...)
		if base != nil {
			row = append(row, f4(base[t.QID]), signed4(t.MAP-base[t.QID]))
		}
		rows = append(rows, row)
	}
	return writeAligned(w, rows)
}

func writeAligned(w io.Writer, rows [][]string) error {
	tw := tabwriter.NewWriter(w, 0, 8, 2, ' ', 0)
	for _, row := range rows {
		fmt.Fprintln(tw, strings.Join(row, "\t"))
	}
	if err := tw.Flush(); err != nil {
		return fmt.Errorf("eval: write table: %w", err)
	}
	return nil
}

// signed4 formats x to 4 decimals with a sign, never as "-0.0000".
func signed4(x float64) string {
	r := math.Round(x*1e4) / 1e4
	if r == 0 {
		r = 0 // drops the sign of -0
	}
	return fmt.Sprintf("%+.4f", r)
}

func mdEscape(s string) string { return strings.ReplaceAll(s, "|", `\|`) }

package curate

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"
	"time"
)

// CSVHeader is the first line of every rules CSV file.
var CSVHeader = []string{"kind", "query", "term", "department", "start", "expiry", "reason", "lang"}

// ExportCSV writes rules as CSV (RFC 4180 via encoding/csv, LF line ends):
// CSVHeader, then one rule a line sorted by kind, department, query, term,
// start, expiry, lang and reason; times in RFC 3339, UTC. IDs are not
// written. It validates the rules first (ValidateSet) and writes nothing
// when they fail.
func ExportCSV(w io.Writer, rules []Rule, opts Options) error {
	o, err := opts.resolved()
	if err != nil {
		return err
	}
	if ps := ValidateSet(rules, o.Departments, o.Pipeline); len(ps) > 0 {
		return problemsError("csv", ps)
	}
	rs := slices.Clone(rules)
	sortRules(rs)
	var buf bytes.Buffer
	cw := csv.NewWriter(&buf)
	cw.Write(CSVHeader)
	for _, r := range rs {
		cw.Write([]string{string(r.Kind), r.Query, r.Term, r.Department,
			formatTime(r.Start), formatTime(r.Expiry), r.Reason, r.Lang})
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("curate: export csv: %w", err)
	}
	if _, err := w.Write(buf.Bytes()); err != nil {
		return fmt.Errorf("curate: export csv: %w", err)
	}
	return nil
}

// ImportCSV reads rules from CSV in ExportCSV's layout (a UTF-8 byte order
// mark is skipped; start and expiry may also be plain dates, 2006-01-02,
// read as midnight UTC). Rules come back in file order, each with ID set to
// its ContentID. It is all or nothing: a wrong header, a malformed line, or a
// rule failing ValidateSet (against opts.Departments) rejects the whole file
// with an error wrapping ErrImport and no rules; the Report lists every
// rejection with its line number and field.
func ImportCSV(r io.Reader, opts Options) ([]Rule, *Report, error) {
	o, rep, b, err := startImport(r, opts, "csv")
	if err != nil {
		return nil, rep, err
	}
	cr := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(b, []byte("\ufeff"))))
	cr.FieldsPerRecord = -1
	head, err := cr.Read()
	switch {
	case errors.Is(err, io.EOF):
		rep.reject(1, "header", "empty file: want the header "+strings.Join(CSVHeader, ","))
		return rep.result(nil)
	case err != nil:
		rep.reject(1, "header", err.Error())
		return rep.result(nil)
	case !slices.Equal(head, CSVHeader):
		rep.reject(1, "header", fmt.Sprintf("got %q, want %q", clip(strings.Join(head, ",")), strings.Join(CSVHeader, ",")))
		return rep.result(nil)
	}
	var src []sourced
	lastBad := 0
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			if pe.Line == lastBad {
				break // no progress: stop rather than loop
			}
			lastBad = pe.Line
			rep.reject(pe.StartLine, "line", pe.Err.Error())
			continue
		} else if err != nil {
			return nil, rep, fmt.Errorf("curate: import csv: %w", err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) != len(CSVHeader) {
			rep.reject(line, "line", fmt.Sprintf("%d fields, want %d", len(rec), len(CSVHeader)))
			continue
		}
		rule := Rule{Kind: Kind(rec[0]), Query: rec[1], Term: rec[2], Department: rec[3], Reason: rec[6], Lang: rec[7]}
		okTimes := true
		for i, dst := range []*time.Time{&rule.Start, &rule.Expiry} {
			t, err := parseTime(rec[4+i])
			if err != nil {
				rep.reject(line, CSVHeader[4+i], err.Error())
				okTimes = false
			}
			*dst = t
		}
		if okTimes {
			src = append(src, sourced{Rule: rule, line: line})
		}
	}
	return finishImport(src, o, rep, false)
}

// parseTime reads an RFC 3339 time or a plain date; "" is the zero time.
func parseTime(s string) (time.Time, error) {
	if s == "" {
		return time.Time{}, nil
	}
	if t, err := time.Parse(time.RFC3339Nano, s); err == nil {
		return t.UTC(), nil
	}
	if t, err := time.Parse(time.DateOnly, s); err == nil {
		return t, nil
	}
	return time.Time{}, fmt.Errorf("%q is neither an RFC 3339 time (2006-01-02T15:04:05Z) nor a date (2006-01-02)", clip(s))
}

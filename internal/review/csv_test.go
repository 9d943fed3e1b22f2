package review

import (
	"bytes"
	"encoding/csv"
	"errors"
	"math/rand/v2"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

// TestWilson checks the interval against values worked from the formula
// and against Newcombe, "Two-sided confidence intervals for the single
// proportion: comparison of seven methods", Statistics in Medicine 17,
// 1998, Table I, score method (values from memory, to 4 decimals).
func TestWilson(t *testing.T) {
	cases := []struct {
		name     string
		k, n     int
		low, hi  float64
		tol      float64
		source   string
		wantFull bool
	}{
		// By hand: z² = 3.841459, z²/n = 0.384146, centre = (0.8 + 0.192073)
		// / 1.384146 = 0.716738, half = 1.959964/1.384146 · √(0.016 +
		// 0.009604) = 0.226579.
		{"8 of 10", 8, 10, 0.490159, 0.943317, 5e-6, "by hand from Wilson 1927", false},
		{"81 of 263", 81, 263, 0.2553, 0.3662, 5e-5, "Newcombe 1998 Table I", false},
		{"15 of 148", 15, 148, 0.0624, 0.1605, 5e-5, "Newcombe 1998 Table I", false},
		{"0 of 20", 0, 20, 0, 0.1611, 5e-5, "Newcombe 1998 Table I", false},
		{"1 of 29", 1, 29, 0.0061, 0.1718, 5e-5, "Newcombe 1998 Table I", false},
		{"no trials", 0, 0, 0, 1, 0, "convention: no information", false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi := Wilson(tc.k, tc.n)
			if !near(lo, tc.low, tc.tol) || !near(hi, tc.hi, tc.tol) {
				t.Errorf("Wilson(%d, %d) = [%.6f, %.6f], want [%.6f, %.6f] (%s)", tc.k, tc.n, lo, hi, tc.low, tc.hi, tc.source)
			}
		})
	}
}

// TestDeterministic: the report depends on the events, not on their order,
// and Build leaves its input alone.
func TestDeterministic(t *testing.T) {
	events := synth(3000, 7)
	orig := slices.Clone(events)
	a := Build(events, Options{})
	if !reflect.DeepEqual(events, orig) {
		t.Fatal("Build modified its input")
	}
	shuffled := slices.Clone(events)
	rand.New(rand.NewPCG(1, 2)).Shuffle(len(shuffled), func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
	b := Build(shuffled, Options{})
	if !reflect.DeepEqual(a, b) {
		t.Fatal("shuffled input gave a different report")
	}
	for _, table := range Tables() {
		var x, y bytes.Buffer
		if err := a.WriteCSV(&x, table); err != nil {
			t.Fatal(err)
		}
		if err := b.WriteCSV(&y, table); err != nil {
			t.Fatal(err)
		}
		if x.String() != y.String() {
			t.Errorf("table %s differs between runs", table)
		}
	}
	if len(a.Terms) == 0 || len(a.Rescued) == 0 || len(a.NoResults) == 0 || len(a.NoSuggestions) == 0 {
		t.Errorf("synthetic data exercised too little: %d terms, %d rescued, %d no-results, %d no-suggestions",
			len(a.Terms), len(a.Rescued), len(a.NoResults), len(a.NoSuggestions))
	}
}

// TestCSVRoundTrip writes every table and reads it back with
// encoding/csv (RFC 4180): same row count, and every cell parses back to
// the report's value.
func TestCSVRoundTrip(t *testing.T) {
	events := append(synth(2000, 3),
		shown("q1", "sx", "ops, west", "=HYPERLINK(\"x\")", at(time.Hour), 0, "with \"quotes\"", "line\nbreak"),
		accepted("q1", "line\nbreak", at(time.Hour+time.Second)))
	r := Build(events, Options{MinImpressions: 3, DismissRate: 0.1, LowRate: 0.5})
	want := map[string]int{
		TableTerms: len(r.Terms), TablePairs: len(r.Pairs), TableTrend: len(r.Trend),
		TableRarelyAccepted: len(r.RarelyAccepted), TableOftenDismissed: len(r.OftenDismissed),
		TableNoResults: len(r.NoResults), TableNoSuggestions: len(r.NoSuggestions), TableRescued: len(r.Rescued),
	}
	for _, x := range r.Terms {
		want[TableTermTrend] += len(x.Trend)
	}
	for _, table := range Tables() {
		t.Run(table, func(t *testing.T) {
			var buf bytes.Buffer
			if err := r.WriteCSV(&buf, table); err != nil {
				t.Fatal(err)
			}
			recs, err := csv.NewReader(&buf).ReadAll()
			if err != nil {
				t.Fatalf("read back: %v", err)
			}
			if len(recs)-1 != want[table] || want[table] == 0 {
				t.Fatalf("%d data lines, want %d (> 0)", len(recs)-1, want[table])
			}
			for i, rec := range recs[1:] {
				if err := checkLine(r, table, i, rec); err != nil {
					t.Fatalf("line %d: %v", i+1, err)
				}
			}
		})
	}
	var buf bytes.Buffer
	if err := r.WriteCSV(&buf, "everything"); !errors.Is(err, ErrUnknownTable) {
		t.Errorf("unknown table: %v, want ErrUnknownTable", err)
	}
}

// checkLine compares one CSV line with the report value it came from.
func checkLine(r *Report, table string, i int, rec []string) error {
	var want []string
	switch table {
	case TableTerms:
		want = rowCells(r.Terms[i])
	case TablePairs:
		want = rowCells(r.Pairs[i])
	case TableTrend:
		want = pointCells(r.Trend[i])
	case TableTermTrend:
		n := 0
		for _, x := range r.Terms {
			for _, p := range x.Trend {
				if n == i {
					want = append([]string{x.Department, x.Term}, pointCells(p)...)
				}
				n++
			}
		}
	default:
		a := r.attentionList(table)[i]
		want = []string{a.Department, a.Query, a.Term, strconv.Itoa(a.Impressions), strconv.Itoa(a.Count),
			fmt64(a.Rate), fmt64(a.High), a.Draft.Kind, a.Draft.Query, a.Draft.Term, a.Draft.Department}
	}
	if len(rec) != len(want) {
		return errors.New("cell count " + strconv.Itoa(len(rec)) + ", want " + strconv.Itoa(len(want)))
	}
	for j := range rec {
		got := rec[j]
		if strings.HasPrefix(want[j], "=") {
			// Formula-like text comes back with the defusing apostrophe
			// (OWASP, "CSV Injection").
			got = strings.TrimPrefix(got, "'")
		}
		if f, err := strconv.ParseFloat(got, 64); err == nil && got != want[j] {
			if w, _ := strconv.ParseFloat(want[j], 64); f != w {
				return errors.New("cell " + strconv.Itoa(j) + " = " + got + ", want " + want[j])
			}
			continue
		}
		if got != want[j] {
			return errors.New("cell " + strconv.Itoa(j) + " = " + strconv.Quote(got) + ", want " + strconv.Quote(want[j]))
		}
	}
	return nil
}

// fmt64 formats with %v's shortest round-trip form, independently of ftoa.
func fmt64(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func rowCells(x TermRow) []string {
	return []string{x.Department, x.Query, x.Term, strconv.Itoa(x.Impressions), fmt64(x.Exposure),
		strconv.Itoa(x.Accepts), strconv.Itoa(x.Dismissals), strconv.Itoa(x.Successes), fmt64(x.Rate),
		fmt64(x.Corrected), fmt64(x.Low), fmt64(x.High), fmt64(x.DismissRate), fmt64(x.SuccessRate), fmt64(x.MeanPos)}
}

func pointCells(p Point) []string {
	return []string{p.Start.Format(time.RFC3339Nano), strconv.Itoa(p.Impressions), strconv.Itoa(p.Shown),
		fmt64(p.Exposure), strconv.Itoa(p.Accepts), strconv.Itoa(p.Dismissals), strconv.Itoa(p.Successes),
		strconv.Itoa(p.ZeroHits), strconv.Itoa(p.Empty), fmt64(p.Rate), fmt64(p.Corrected)}
}

func TestCSVDefusesFormulas(t *testing.T) {
	r := Build([]Event{shown("i", "s", "", "@sum", at(0), 0, "=1+1", "+x", "-y", "plain")}, Options{})
	var buf bytes.Buffer
	if err := r.WriteCSV(&buf, TableTerms); err != nil {
		t.Fatal(err)
	}
	recs, _ := csv.NewReader(&buf).ReadAll()
	var terms []string
	for _, rec := range recs[1:] {
		terms = append(terms, rec[2])
	}
	slices.Sort(terms)
	if got, want := strings.Join(terms, " "), "'+x '-y '=1+1 plain"; got != want {
		t.Errorf("term cells %q, want %q", got, want)
	}
}

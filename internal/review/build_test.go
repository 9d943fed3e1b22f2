package review

import (
	"fmt"
	"strconv"
	"testing"
	"time"
)

// atPositions makes, for each position k, n[k] impressions showing term at
// k (after k filler terms), of which acc[k] accept it.
func atPositions(term string, n, acc []int) []Event {
	var out []Event
	c := 0
	for k := range n {
		for i := range n[k] {
			id := "p" + strconv.Itoa(c)
			c++
			terms := []string{}
			for f := range k {
				terms = append(terms, "filler"+strconv.Itoa(f))
			}
			out = append(out, shown(id, "s"+id, "operations", "pump", at(time.Duration(c)*time.Second), 5, append(terms, term)...))
			if i < acc[k] {
				out = append(out, accepted(id, term, at(time.Duration(c)*time.Second+time.Millisecond)))
			}
		}
	}
	return out
}

type rowWant struct {
	imps, accepts, dismissals int
	exposure, rate, corrected float64
	low, high                 float64 // checked when high > 0
}

func TestTermRows(t *testing.T) {
	cases := []struct {
		name      string
		events    []Event
		opts      Options
		rows      map[string]rowWant // "department|query|term"
		unmatched int
		imps      int
	}{
		{
			// Positions 0..3 with p(k) = 1/(k+1): exposure = 1 + 1/2 + 1/3 + 1/4
			// = 25/12; accepts at positions 1 and 3: corrected = 2/(25/12) = 24/25
			// = 0.96, raw 2/4. The interval is Wilson(2, 4) = [0.150039, 0.849961]
			// (worked from Wilson 1927's formula: centre 0.5, half
			// 1.959964/1.960365 · √(0.0625 + 0.060023) = 0.349961) scaled by
			// n/E = 4/(25/12) = 1.92: [0.288075, 1.631925].
			name:   "ipw by hand, 1/(k+1)",
			events: atPositions("sluice", []int{1, 1, 1, 1}, []int{0, 1, 0, 1}),
			opts:   Options{Propensity: reciprocal},
			rows: map[string]rowWant{
				"||sluice":               {imps: 4, accepts: 2, exposure: 25.0 / 12, rate: 0.5, corrected: 0.96, low: 0.288075, high: 1.631925},
				"operations|pump|sluice": {imps: 4, accepts: 2, exposure: 25.0 / 12, rate: 0.5, corrected: 0.96},
			},
			imps: 4,
		},
		{
			// Default curve p(k) = 1/(k+1)^0.7: p(1) = 2^-0.7 = e^(-0.7·ln 2)
			// = e^-0.485203 = 0.615572; exposure 1.615572; one accept at
			// position 1: corrected 1/1.615572 = 0.618976.
			name:   "ipw by hand, default curve",
			events: atPositions("weir", []int{1, 1}, []int{0, 1}),
			rows: map[string]rowWant{
				"||weir": {imps: 2, accepts: 1, exposure: 1.615572, rate: 0.5, corrected: 0.618976},
			},
			imps: 2,
		},
		{
			// Examination hypothesis (Joachims, Swaminathan & Schnabel, WSDM
			// 2017, section 3, from memory): P(accept at k) = p(k)·r. With
			// r = 0.5, p(k) = 1/(k+1) and 120 impressions per position the
			// expected accepts are 60, 30, 20, 15: the raw rate 125/480 =
			// 0.260417 is biased by position, the corrected one 125/(120 ·
			// 25/12) = 125/250 recovers r = 0.5.
			name:   "examination hypothesis recovers r",
			events: atPositions("intake", []int{120, 120, 120, 120}, []int{60, 30, 20, 15}),
			opts:   Options{Propensity: reciprocal},
			rows: map[string]rowWant{
				"||intake": {imps: 480, accepts: 125, exposure: 250, rate: 125.0 / 480, corrected: 0.5},
			},
			imps: 480,
		},
		{
			name: "repeats count once",
			events: []Event{
				shown("i1", "s1", "", "pump", at(0), 3, "seal", "valve", "seal"),
				accepted("i1", "seal", at(time.Second)), accepted("i1", "seal", at(2*time.Second)),
				dismissed("i1", "valve", at(3*time.Second)), dismissed("i1", "valve", at(4*time.Second)),
			},
			opts: Options{Propensity: reciprocal},
			rows: map[string]rowWant{
				"||seal":      {imps: 1, accepts: 1, exposure: 1, rate: 1, corrected: 1},
				"||valve":     {imps: 1, dismissals: 1, exposure: 0.5},
				"|pump|valve": {imps: 1, dismissals: 1, exposure: 0.5},
			},
			imps: 1,
		},
		{
			name: "empty query counts once",
			events: []Event{
				shown("i1", "s1", "operations", "", at(0), 3, "seal"),
				accepted("i1", "seal", at(time.Second)),
			},
			rows: map[string]rowWant{
				"||seal":           {imps: 1, accepts: 1, exposure: 1, rate: 1, corrected: 1},
				"operations||seal": {imps: 1, accepts: 1, exposure: 1, rate: 1, corrected: 1},
			},
			imps: 1,
		},
		{
			name: "unmatched reactions",
			events: []Event{
				shown("i1", "s1", "", "pump", at(0), 3, "seal"),
				accepted("nope", "seal", at(time.Second)), dismissed("i1", "gasket", at(time.Second)),
			},
			rows:      map[string]rowWant{"||seal": {imps: 1, exposure: 1}},
			unmatched: 2,
			imps:      1,
		},
		{
			name: "department rows",
			events: []Event{
				shown("i1", "s1", "operations", "pump", at(0), 3, "seal"),
				shown("i2", "s2", "finance", "pump", at(time.Minute), 3, "seal"),
				accepted("i2", "seal", at(2*time.Minute)),
			},
			rows: map[string]rowWant{
				"||seal":           {imps: 2, accepts: 1, exposure: 2, rate: 0.5, corrected: 0.5},
				"operations||seal": {imps: 1, exposure: 1},
				"finance||seal":    {imps: 1, accepts: 1, exposure: 1, rate: 1, corrected: 1},
			},
			imps: 2,
		},
		{
			name: "window and department filter",
			events: []Event{
				shown("early", "s1", "operations", "pump", at(-time.Hour), 3, "seal"),
				accepted("early", "seal", at(time.Minute)), // its impression is out of the window: skipped
				shown("i1", "s1", "operations", "pump", at(0), 3, "seal"),
				shown("i2", "s2", "finance", "pump", at(time.Minute), 3, "seal"),
				shown("late", "s1", "operations", "pump", at(time.Hour), 3, "seal"),
			},
			opts: Options{From: t0, To: at(time.Hour), Department: "operations"},
			rows: map[string]rowWant{
				"||seal":           {imps: 1, exposure: 1},
				"operations||seal": {imps: 1, exposure: 1},
			},
			imps: 1,
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := Build(tc.events, tc.opts)
			if r.Unmatched != tc.unmatched || r.Impressions != tc.imps {
				t.Errorf("unmatched %d, impressions %d; want %d, %d", r.Unmatched, r.Impressions, tc.unmatched, tc.imps)
			}
			got := map[string]TermRow{}
			for _, x := range append(r.Terms, r.Pairs...) {
				got[x.Department+"|"+x.Query+"|"+x.Term] = x
			}
			for k, w := range tc.rows {
				x, ok := got[k]
				if !ok {
					t.Errorf("row %s missing", k)
					continue
				}
				if x.Impressions != w.imps || x.Accepts != w.accepts || x.Dismissals != w.dismissals ||
					!near(x.Exposure, w.exposure, 1e-6) || !near(x.Rate, w.rate, 1e-6) || !near(x.Corrected, w.corrected, 1e-6) {
					t.Errorf("row %s = %+v, want %+v", k, x, w)
				}
				if w.high > 0 && (!near(x.Low, w.low, 1e-6) || !near(x.High, w.high, 1e-6)) {
					t.Errorf("row %s interval [%f, %f], want [%f, %f]", k, x.Low, x.High, w.low, w.high)
				}
			}
			if tc.name == "window and department filter" && len(got) != 4 {
				t.Errorf("rows %v, want only the operations impression's", keys(got))
			}
		})
	}
}

func keys(m map[string]TermRow) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	return out
}

// TestSuccess: an accept succeeds when a click listing the term follows
// within the window in the same impression, or in the same session and
// query (the refreshed impression after an accept).
func TestSuccess(t *testing.T) {
	base := []Event{
		shown("i1", "s1", "operations", "pump", at(0), 4, "seal", "valve"),
		accepted("i1", "seal", at(10*time.Second)),
		shown("i2", "s1", "operations", "pump", at(11*time.Second), 9, "gasket"),
	}
	cases := []struct {
		name  string
		click Event
		want  int
	}{
		{"same impression", clicked("i1", "s1", "pump", at(time.Minute), "seal"), 1},
		{"refreshed impression, same session and query", clicked("i2", "s1", "pump", at(time.Minute), "seal"), 1},
		{"query taken from the impression", clicked("i2", "s1", "", at(time.Minute), "seal"), 1},
		{"at the window's end", clicked("i2", "s1", "pump", at(10*time.Second+30*time.Minute), "seal"), 1},
		{"past the window", clicked("i2", "s1", "pump", at(10*time.Second+31*time.Minute), "seal"), 0},
		{"click before the accept", clicked("i1", "s1", "pump", at(5*time.Second), "seal"), 0},
		{"other term", clicked("i1", "s1", "pump", at(time.Minute), "valve"), 0},
		{"no terms", clicked("i1", "s1", "pump", at(time.Minute)), 0},
		{"other session", clicked("x", "s2", "pump", at(time.Minute), "seal"), 0},
		{"other query", clicked("x", "s1", "valve", at(time.Minute), "seal"), 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := Build(append(append([]Event{}, base...), tc.click, tc.click), Options{})
			for _, k := range [][2]string{{"", ""}, {"operations", ""}, {"operations", "pump"}} {
				x := findRow(t, r, k[0], k[1], "seal")
				if x.Successes != tc.want || x.SuccessRate != float64(tc.want) {
					t.Errorf("%v: successes %d (rate %v), want %d", k, x.Successes, x.SuccessRate, tc.want)
				}
			}
			if got := r.Trend[0].Successes; got != tc.want {
				t.Errorf("trend successes %d, want %d", got, tc.want)
			}
		})
	}
}

func TestTrend(t *testing.T) {
	events := []Event{
		shown("i1", "s1", "", "pump", at(10*time.Minute), 0, "seal"),
		accepted("i1", "seal", at(11*time.Minute)),
		shown("i2", "s2", "", "pump", at(150*time.Minute), 5),
		shown("i3", "s3", "", "weir", at(160*time.Minute), 5, "seal", "silt"),
	}
	r := Build(events, Options{From: t0, To: at(4 * time.Hour), Bucket: time.Hour})
	var got []string
	for _, p := range r.Trend {
		got = append(got, fmt.Sprintf("%s i%d s%d a%d z%d e%d", p.Start.Format("15:04"), p.Impressions, p.Shown, p.Accepts, p.ZeroHits, p.Empty))
	}
	want := "[09:00 i1 s1 a1 z1 e0 10:00 i0 s0 a0 z0 e0 11:00 i2 s2 a0 z0 e1 12:00 i0 s0 a0 z0 e0]"
	if fmt.Sprint(got) != want {
		t.Errorf("trend %v\nwant  %s", got, want)
	}
	seal := findRow(t, r, "", "", "seal")
	if len(seal.Trend) != 2 || !seal.Trend[1].Start.Equal(at(2*time.Hour)) || seal.Trend[0].Rate != 1 || seal.Trend[1].Rate != 0 {
		t.Errorf("seal trend %+v", seal.Trend)
	}
	// Without From the first bucket starts at a multiple of Bucket since
	// the zero time: UTC midnight for 24h.
	r = Build(events, Options{})
	if !r.Origin.Equal(time.Date(2026, 3, 2, 0, 0, 0, 0, time.UTC)) || len(r.Trend) != 1 || r.Trend[0].Impressions != 3 {
		t.Errorf("origin %v, %d points", r.Origin, len(r.Trend))
	}
	// A window far wider than MaxBuckets buckets widens the bucket.
	r = Build(events, Options{From: t0, To: at(1000 * time.Hour), Bucket: time.Minute})
	if len(r.Trend) > MaxBuckets || r.Bucket <= time.Minute {
		t.Errorf("bucket %v, %d points; want a wider bucket and at most %d", r.Bucket, len(r.Trend), MaxBuckets)
	}
	if r := Build(nil, Options{}); r.Trend != nil || r.Terms != nil || r.Impressions != 0 {
		t.Errorf("empty input gave %+v", r)
	}
}

package web

import (
	"encoding/csv"
	"encoding/json"
	"io/fs"
	"math"
	"slices"
	"strings"
	"testing"
	"time"

	"kinword/internal/review"
	"kinword/static"
)

// reviewEvents: two impressions showing "leak" first, one of them
// accepted.
func reviewEvents() []review.Event {
	t0 := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	return []review.Event{
		{Kind: review.KindImpression, Impression: "i1", Time: t0, Session: "s1", Department: "customer-care", Query: "burst pipe", Terms: []string{"leak", "valv"}, Hits: -1},
		{Kind: review.KindAccept, Impression: "i1", Time: t0.Add(time.Second), Session: "s1", Department: "customer-care", Query: "burst pipe", Term: "leak"},
		{Kind: review.KindImpression, Impression: "i2", Time: t0.Add(time.Hour), Session: "s2", Department: "customer-care", Query: "burst pipe", Terms: []string{"leak"}, Hits: -1},
	}
}

// TestReviewJSON: the report comes back as JSON with the window passed
// through. For "leak" (1 accept in 2 impressions at position 0, where the
// examination propensity is 1) the rate and corrected rate are 0.5 and the
// 95% interval is Wilson's for 1 of 2, [0.0945, 0.9055] (Wilson 1927;
// values from memory, and by hand from the formula in review.Wilson).
func TestReviewJSON(t *testing.T) {
	cs := newCurationServer(t)
	cs.rev.events = reviewEvents()
	rec := call(t, cs.s, "GET", "/api/v1/review?from=2026-03-01T00:00:00Z&to=2026-03-08T00:00:00Z&department=customer-care", "", cs.adm)
	if rec.Code != 200 {
		t.Fatalf("%d %s", rec.Code, rec.Body)
	}
	var out struct {
		From, To       time.Time
		Department     string
		BucketSeconds  float64 `json:"bucket_seconds"`
		Impressions    int
		Terms          []map[string]any
		Trend          []map[string]any
		RarelyAccepted []any `json:"rarely_accepted"`
		NoResults      []any `json:"no_results"`
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &out); err != nil {
		t.Fatal(err)
	}
	if out.Impressions != 2 || out.Department != "customer-care" || out.BucketSeconds != 86400 || !out.From.Equal(time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC)) {
		t.Errorf("report header %+v", out)
	}
	if got := cs.rev.last; got.Department != "customer-care" || got.To.Day() != 8 {
		t.Errorf("options passed %+v", got)
	}
	if out.RarelyAccepted == nil || out.NoResults == nil {
		t.Errorf("empty lists must be [], not null: %s", rec.Body)
	}
	var leak map[string]any
	for _, r := range out.Terms {
		if r["term"] == "leak" && r["department"] == "" {
			leak = r
		}
	}
	if leak == nil {
		t.Fatalf("no overall row for leak: %s", rec.Body)
	}
	near := func(k string, want float64) {
		if v, _ := leak[k].(float64); math.Abs(v-want) > 1e-3 {
			t.Errorf("%s = %v, want %v", k, leak[k], want)
		}
	}
	near("impressions", 2)
	near("accepts", 1)
	near("rate", 0.5)
	near("corrected", 0.5)
	near("low", 0.0945)
	near("high", 0.9055)
	// The window is 7 daily buckets, empty ones included (review.Report.Trend).
	if len(out.Trend) != 7 {
		t.Errorf("trend has %d buckets, want 7", len(out.Trend))
	}
}

// TestReviewExport: each table is RFC 4180 CSV (text/csv, RFC 4180
// section 3) with a header line; bad parameters are 400.
func TestReviewExport(t *testing.T) {
	cs := newCurationServer(t)
	cs.rev.events = reviewEvents()
	cases := []struct {
		name, query string
		status      int
		header      string
	}{
		{"terms", "table=terms", 200, "department,query,term,impressions"},
		{"trend", "table=trend&from=2026-03-01T00:00:00Z&to=2026-03-03T00:00:00Z", 200, "start,impressions,shown"},
		{"rarely accepted", "table=rarely_accepted", 200, "department,query,term,impressions,count"},
		{"unknown table", "table=secrets", 400, ""},
		{"no table", "", 400, ""},
		{"bad from", "table=terms&from=yesterday", 400, ""},
		{"to before from", "table=terms&from=2026-03-03T00:00:00Z&to=2026-03-01T00:00:00Z", 400, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := call(t, cs.s, "GET", "/api/v1/review/export?"+c.query, "", cs.adm)
			if rec.Code != c.status {
				t.Fatalf("%d, want %d: %s", rec.Code, c.status, rec.Body)
			}
			if c.status != 200 {
				return
			}
			if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, "text/csv") {
				t.Errorf("Content-Type %q", ct)
			}
			lines, err := csv.NewReader(strings.NewReader(rec.Body.String())).ReadAll()
			if err != nil || len(lines) == 0 {
				t.Fatalf("not CSV: %v %s", err, rec.Body)
			}
			if got := strings.Join(lines[0], ","); !strings.HasPrefix(got, c.header) {
				t.Errorf("header %q, want prefix %q", got, c.header)
			}
		})
	}
	if rec := call(t, cs.s, "GET", "/api/v1/review/export?table=terms", "", cs.lib); rec.Code != 403 {
		t.Errorf("a librarian token read the review: %d", rec.Code)
	}
}

// TestOpenAPIReviewTables: the described table names are review.Tables().
func TestOpenAPIReviewTables(t *testing.T) {
	b, err := fs.ReadFile(static.FS, "openapi.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Paths map[string]map[string]struct {
			Parameters []struct {
				Name   string
				Schema struct{ Enum []string }
			}
		}
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	for _, p := range doc.Paths["/api/v1/review/export"]["get"].Parameters {
		if p.Name == "table" {
			if !slices.Equal(p.Schema.Enum, review.Tables()) {
				t.Errorf("described tables %v, want %v", p.Schema.Enum, review.Tables())
			}
			return
		}
	}
	t.Errorf("the table parameter is not described")
}

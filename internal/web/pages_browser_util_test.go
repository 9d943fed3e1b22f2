package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"kinword/internal/curate"
	"kinword/internal/review"
)

// deskCall is one API request a desk page made to the stub.
type deskCall struct {
	Method, Path, Query, Auth string
	Body                      map[string]any
}

// deskStub answers the desk pages' API calls with fixtures in the real
// encodings (RuleRecord, AuditEntry, reviewJSON) and records each call; it
// passes every other path to the real server, which serves the pages.
type deskStub struct {
	mu    sync.Mutex
	calls []deskCall
	next  http.Handler
}

var (
	stubDay   = time.Date(2026, 11, 2, 0, 0, 0, 0, time.UTC)
	stubRules = []RuleRecord{
		{Rule: curate.Rule{ID: "r-burst", Kind: curate.Relate, Query: "burst main", Term: "water main break", Department: "field-operations", Reason: "crews say main break"}, Version: 2, Updated: stubDay},
		{Rule: curate.Rule{ID: "r-hydrant", Kind: curate.Block, Query: "hydrant", Term: "fire drill", Reason: "off topic"}, Version: 1, Updated: stubDay},
	}
)

func stubReport() review.Report {
	return review.Report{
		Bucket: 24 * time.Hour, Origin: stubDay, Impressions: 60,
		Terms: []review.TermRow{
			{Term: "flushing", Impressions: 40, Exposure: 30, Accepts: 9, Dismissals: 2, Successes: 6, Corrected: 0.3, Low: 0.17, High: 0.47, SuccessRate: 6.0 / 9},
			{Department: "field-operations", Term: "chamber", Impressions: 20, Exposure: 15, Accepts: 1, Corrected: 1.0 / 15, Low: 0.01, High: 0.3},
		},
		Trend: []review.Point{
			{Start: stubDay, Impressions: 10, Shown: 10, Exposure: 8, Accepts: 2, Rate: 0.2, Corrected: 0.25},
			{Start: stubDay.AddDate(0, 0, 1), Impressions: 30, Shown: 30, Exposure: 20, Accepts: 5, Rate: 1.0 / 6, Corrected: 0.25},
			{Start: stubDay.AddDate(0, 0, 2), Impressions: 20, Shown: 20, Exposure: 17, Accepts: 3, Rate: 0.15, Corrected: 3.0 / 17},
		},
		RarelyAccepted: []review.Attention{{Department: "field-operations", Query: "valve", Term: "meter & seal", Impressions: 25, Count: 0, Rate: 0, High: 0.12,
			Draft: review.RuleDraft{Kind: review.DraftBlock, Query: "valve", Term: "meter & seal", Department: "field-operations"}}},
	}
}

func (d *deskStub) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	if !strings.HasPrefix(r.URL.Path, "/api/v1/rules") && !strings.HasPrefix(r.URL.Path, "/api/v1/review") {
		d.next.ServeHTTP(w, r)
		return
	}
	c := deskCall{Method: r.Method, Path: r.URL.Path, Query: r.URL.RawQuery, Auth: r.Header.Get("Authorization")}
	raw, _ := io.ReadAll(r.Body)
	if len(raw) > 0 {
		_ = json.Unmarshal(raw, &c.Body)
	}
	var out any
	status := http.StatusOK
	switch r.Method + " " + r.URL.Path {
	case "GET /api/v1/rules":
		out = map[string]any{"rules": stubRules, "version": 7}
	case "GET /api/v1/rules/audit":
		out = map[string]any{"entries": []AuditEntry{{Seq: 4, RuleID: "r-burst", Actor: "demo", Action: "update", Reason: "wording", At: stubDay, Before: &stubRules[0], After: &stubRules[0]}}}
	case "POST /api/v1/rules/preview":
		out = map[string]any{"impressions": 40, "changed": 2, "samples": []map[string]any{
			{"department": "field-operations", "query": "burst main", "before": []string{"reservoir", "valve"}, "after": []string{"valve"}}}}
	case "POST /api/v1/rules", "PUT /api/v1/rules/r-burst":
		rec := RuleRecord{Version: 1, Updated: stubDay}
		b, _ := json.Marshal(c.Body)
		_ = json.Unmarshal(b, &rec.Rule)
		rec.ID, status = "r-new", http.StatusCreated
		if r.Method == http.MethodPut {
			rec.ID, rec.Version, status = "r-burst", 3, http.StatusOK
		}
		out = rec
	case "POST /api/v1/rules/import":
		c.Body = map[string]any{"text": string(raw)}
		if r.URL.Query().Get("format") == "csv" {
			status, out = http.StatusBadRequest, map[string]any{
				"error":  map[string]string{"code": "import_rejected", "message": "1 rejected, first line 2: unknown kind"},
				"report": reportOut{Format: "csv", Rejected: []rejectionOut{{Line: 2, Item: "kind", Reason: `unknown kind "pinned"`}}}}
		} else {
			out = map[string]any{"imported": 3, "unchanged": 0}
		}
	case "GET /api/v1/review":
		rep := stubReport()
		switch r.URL.Query().Get("department") {
		case "field-operations": // a month: more buckets than the chart labels one by one
			rep.Trend, rep.Terms = nil, nil
			for i := range 30 {
				rep.Trend = append(rep.Trend, review.Point{Start: stubDay.AddDate(0, 0, i), Impressions: 2, Shown: 2, Exposure: 2, Accepts: i % 2, Rate: float64(i%2) / 2})
				rep.Terms = append(rep.Terms, review.TermRow{Department: "field-operations", Term: fmt.Sprintf("term %02d", i), Impressions: 2})
			}
		case "nobody":
			rep = review.Report{}
		}
		out = reviewJSON(&rep)
	default:
		status, out = http.StatusNotFound, map[string]any{"error": map[string]string{"code": "not_found", "message": "not stubbed"}}
	}
	d.mu.Lock()
	d.calls = append(d.calls, c)
	d.mu.Unlock()
	w.Header().Set("Content-Type", "application/json")
	w.WriteHeader(status)
	_ = json.NewEncoder(w).Encode(out)
}

// find returns the first recorded call matching method and path.
func (d *deskStub) find(method, path string, match func(deskCall) bool) (deskCall, bool) {
	d.mu.Lock()
	defer d.mu.Unlock()
	for _, c := range d.calls {
		if c.Method == method && c.Path == path && (match == nil || match(c)) {
			return c, true
		}
	}
	return deskCall{}, false
}

// desk is a headless Chromium on the stubbed server. Each page it loads
// records CSP violations (the securitypolicyviolation event, W3C "Content
// Security Policy Level 3", section 5.3; from memory), uncaught errors and
// unhandled promise rejections (HTML Living Standard, "Runtime script
// errors"; from memory).
type desk struct {
	ctx  context.Context
	url  string
	stub *deskStub
}

func newDesk(t *testing.T) *desk {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is missing, but CI installs chromium: %v", chromiumPath, err)
		}
		t.Skipf("skipping the browser test: %s not found (install the chromium package to run it)", chromiumPath)
	}
	stub := &deskStub{next: newTestServer(t).Handler()}
	srv := httptest.NewServer(stub)
	t.Cleanup(srv.Close)
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	t.Cleanup(cancel)
	actx, acancel := chromedp.NewExecAllocator(ctx, chromedp.ExecPath(chromiumPath), chromedp.Headless, chromedp.NoSandbox,
		chromedp.DisableGPU, chromedp.WindowSize(1200, 900), chromedp.Flag("disable-quic", true), chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true), chromedp.UserDataDir(t.TempDir()))
	t.Cleanup(acancel)
	bctx, bcancel := chromedp.NewContext(actx)
	t.Cleanup(bcancel)
	d := &desk{ctx: bctx, url: srv.URL, stub: stub}
	const record = `window.__problems = [];
document.addEventListener("securitypolicyviolation", e => window.__problems.push("CSP " + e.violatedDirective + " " + e.blockedURI));
window.addEventListener("error", e => window.__problems.push("error " + e.message));
window.addEventListener("unhandledrejection", e => window.__problems.push("rejection " + e.reason));`
	if err := chromedp.Do(bctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := cdp.Call(ctx, tg, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{Source: record})
		return err
	})); err != nil {
		t.Fatalf("start chromium: %v", err)
	}
	return d
}

// run runs actions, failing the test with what on error.
func (d *desk) run(t *testing.T, what string, actions ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	if err := chromedp.Do(d.ctx, actions...); err != nil {
		t.Fatalf("%s: %v", what, err)
	}
}

// eval evaluates a JavaScript expression to T.
func eval[T any](t *testing.T, d *desk, expr string) T {
	t.Helper()
	v, err := chromedp.Run(d.ctx, chromedp.Evaluate[T](expr))
	if err != nil {
		t.Fatalf("evaluate %s: %v", expr, err)
	}
	return v
}

// clean fails the test on CSP violations, script errors or unhandled
// promise rejections the page recorded since it loaded.
func (d *desk) clean(t *testing.T, where string) {
	t.Helper()
	if v := eval[[]string](t, d, `window.__problems || ["the recorder did not run"]`); len(v) > 0 {
		t.Errorf("%s: %q", where, v)
	}
}

// shot saves a screenshot to $KINWORD_SCREENSHOT_DIR/name.png when set.
func (d *desk) shot(t *testing.T, name string) {
	t.Helper()
	dir := os.Getenv("KINWORD_SCREENSHOT_DIR")
	if dir == "" {
		return
	}
	png, err := chromedp.Run(d.ctx, chromedp.FullScreenshot(100))
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	if err := os.WriteFile(filepath.Join(dir, name+".png"), png, 0o644); err != nil {
		t.Error(err)
	}
}

// waitCall polls the stub for a matching call for up to eventWait.
func (d *desk) waitCall(t *testing.T, method, path string, match func(deskCall) bool) deskCall {
	t.Helper()
	deadline := time.Now().Add(eventWait)
	for {
		if c, ok := d.stub.find(method, path, match); ok {
			return c
		}
		if time.Now().After(deadline) {
			d.stub.mu.Lock()
			defer d.stub.mu.Unlock()
			t.Fatalf("no matching %s %s within %s; calls: %+v", method, path, eventWait, d.stub.calls)
		}
		time.Sleep(50 * time.Millisecond)
	}
}

// setSelect chooses value in a select as a user would, firing change.
func setSelect(id, value string) chromedp.Action[chromedp.Void] {
	return chromedp.Poll[chromedp.Void](`(s => { s.value = ` + jsString(value) + `; s.dispatchEvent(new Event("change")); return s.value === ` + jsString(value) + `; })(document.getElementById(` + jsString(id) + `))`)
}

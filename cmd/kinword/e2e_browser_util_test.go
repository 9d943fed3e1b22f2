package main

import (
	"context"
	"encoding/json"
	"log/slog"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"kinword/internal/config"
)

// e2eChromium is where the CI image (and Debian's chromium package)
// installs the browser.
const e2eChromium = "/usr/bin/chromium"

// e2eCorpus is the demo intranet, from this package's folder.
var e2eCorpus = filepath.Join("..", "..", "testdata", "tarnwick")

// e2eNeedChromium skips the test without the browser, except in CI, which
// installs it.
func e2eNeedChromium(t *testing.T) {
	t.Helper()
	if _, err := os.Stat(e2eChromium); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is missing, but CI installs chromium: %v", e2eChromium, err)
		}
		t.Skipf("skipping the browser test: %s not found (install the chromium package to run it)", e2eChromium)
	}
}

// e2eIsolateEnv clears the variables that would point the commands at
// another store, configuration or token file.
func e2eIsolateEnv(t *testing.T) {
	t.Helper()
	for _, k := range []string{"KINWORD_STORE_DSN", "KINWORD_CONFIG", "KINWORD_TOKENS_FILE", "KINWORD_PROXY_SECRET"} {
		t.Setenv(k, "")
	}
}

// e2eDemoData ingests and mines the demo intranet into a new data folder.
func e2eDemoData(t *testing.T) string {
	t.Helper()
	data := filepath.Join(t.TempDir(), "data")
	if code, _, errs := runCLI(t, "ingest", "--data", data, filepath.Join(e2eCorpus, "docs")); code != 0 {
		t.Fatalf("ingest: %s", errs)
	}
	if code, _, errs := runCLI(t, "mine", "--data", data, "--json"); code != 0 {
		t.Fatalf("mine: %s", errs)
	}
	return data
}

// simRecordedLine is simulate --record's summary line.
var simRecordedLine = regexp.MustCompile(`recorded (\d+) events in the event store \((\d+) impressions, (\d+) accepts, (\d+) clicks\)`)

// recorded is what one simulate --record run says it stored.
type simRecorded struct{ events, impressions, accepts, clicks int }

// parseSimRecorded reads the summary line from out, or fails the test.
func parseSimRecorded(t *testing.T, out string) simRecorded {
	t.Helper()
	m := simRecordedLine.FindStringSubmatch(out)
	if m == nil {
		t.Fatalf("no summary line in %q", out)
	}
	n := make([]int, 4)
	for i := range n {
		n[i], _ = strconv.Atoi(m[i+1])
	}
	return simRecorded{n[0], n[1], n[2], n[3]}
}

// e2eStartServer runs e.serve in demo mode on 127.0.0.1 port 0 over data
// with the configuration file cfg, in this process, until the test ends.
func e2eStartServer(t *testing.T, data, cfg string) string {
	t.Helper()
	c, err := config.Load(cfg)
	if err != nil {
		t.Fatal(err)
	}
	stdout, stderr := &servingWriter{base: make(chan string, 1)}, &servingWriter{base: make(chan string, 1)}
	e := &env{stdout: stdout, stderr: stderr, cmd: commands["serve"], cfg: c, dataDir: data}
	e.log = slog.New(slog.NewTextHandler(stderr, &slog.HandlerOptions{Level: slog.LevelWarn}))
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- e.serve(ctx, "127.0.0.1:0", true) }()
	t.Cleanup(func() {
		cancel()
		select {
		case err := <-done:
			if err != nil {
				t.Errorf("serve: %v; log: %s", err, stderr)
			}
		case <-time.After(30 * time.Second):
			t.Errorf("serve did not stop within 30s of its context ending")
		}
	})
	select {
	case base := <-stdout.base:
		return base
	case err := <-done:
		done <- err
		t.Fatalf("serve ended before serving: %v; log: %s", err, stderr)
	case <-time.After(60 * time.Second):
		t.Fatalf("serve printed no serving line: %s", stderr)
	}
	return ""
}

// e2eOffer is one suggestion as /api/v1/lookup returns it.
type e2eOffer struct {
	Term     string `json:"term"`
	Display  string `json:"display"`
	Evidence struct {
		Parts map[string]float64 `json:"parts"`
	} `json:"evidence"`
}

// e2eLookup asks the API which suggestions q gets as persona.
func e2eLookup(t *testing.T, base, q, persona string) []e2eOffer {
	t.Helper()
	code, body := request(t, http.MethodGet, base+"/api/v1/lookup?q="+url.QueryEscape(q)+"&persona="+url.QueryEscape(persona), "", "")
	if code != http.StatusOK {
		t.Fatalf("lookup %q as %s: %d %s", q, persona, code, body)
	}
	var out struct {
		Suggestions []e2eOffer `json:"suggestions"`
	}
	if err := json.Unmarshal([]byte(body), &out); err != nil {
		t.Fatalf("lookup %q as %s: %v", q, persona, err)
	}
	return out.Suggestions
}

// browser is a headless Chromium whose pages record CSP violations (the
// securitypolicyviolation event, W3C "Content Security Policy Level 3",
// section 5.3; from memory), uncaught errors and unhandled promise
// rejections (HTML Living Standard, "Runtime script errors"; from memory).
type e2eBrowser struct{ ctx context.Context }

func newE2EBrowser(t *testing.T, within time.Duration) *e2eBrowser {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), within)
	t.Cleanup(cancel)
	actx, acancel := chromedp.NewExecAllocator(ctx, chromedp.ExecPath(e2eChromium), chromedp.Headless, chromedp.NoSandbox,
		chromedp.DisableGPU, chromedp.WindowSize(1200, 900), chromedp.Flag("disable-quic", true), chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true), chromedp.UserDataDir(t.TempDir()))
	t.Cleanup(acancel)
	bctx, bcancel := chromedp.NewContext(actx)
	t.Cleanup(bcancel)
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
	return &e2eBrowser{ctx: bctx}
}

// run runs actions, failing the test with what on error.
func (b *e2eBrowser) run(t *testing.T, what string, actions ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	if err := chromedp.Do(b.ctx, actions...); err != nil {
		t.Fatalf("%s: %v", what, err)
	}
}

// e2eEval evaluates a JavaScript expression to T.
func e2eEval[T any](t *testing.T, b *e2eBrowser, expr string) T {
	t.Helper()
	v, err := chromedp.Run(b.ctx, chromedp.Evaluate[T](expr))
	if err != nil {
		t.Fatalf("evaluate %s: %v", expr, err)
	}
	return v
}

// clean fails the test on CSP violations, script errors or unhandled
// promise rejections the page recorded since it loaded.
func (b *e2eBrowser) clean(t *testing.T, where string) {
	t.Helper()
	if v := e2eEval[[]string](t, b, `window.__problems || ["the recorder did not run"]`); len(v) > 0 {
		t.Errorf("%s: %q", where, v)
	}
}

// shot saves a full-page screenshot as $KINWORD_SCREENSHOTS/e2e-NAME.png
// when that variable names a folder (made if missing).
func (b *e2eBrowser) shot(t *testing.T, name string) {
	t.Helper()
	dir := os.Getenv("KINWORD_SCREENSHOTS")
	if dir == "" {
		return
	}
	png, err := chromedp.Run(b.ctx, chromedp.FullScreenshot(100)) // quality 100: PNG
	if err != nil {
		t.Fatalf("screenshot %s: %v", name, err)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "e2e-"+name+".png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Errorf("writing screenshot: %v", err)
		return
	}
	t.Logf("screenshot written to %s (%d bytes)", path, len(png))
}

// e2eQuote quotes s as a JavaScript string literal.
func e2eQuote(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

// e2eSetValue sets a form control's value as a user's choice would, firing
// input and change.
func e2eSetValue(id, value string) chromedp.Action[chromedp.Void] {
	return chromedp.Poll[chromedp.Void](`(s => { s.value = ` + e2eQuote(value) + `; s.dispatchEvent(new Event("input")); s.dispatchEvent(new Event("change")); return s.value === ` + e2eQuote(value) + `; })(document.getElementById(` + e2eQuote(id) + `))`)
}

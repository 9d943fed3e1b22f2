package web

import (
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"os"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// seenRequest is what the recorder saw of one request and its answer.
type seenRequest struct {
	method, path, site, origin string
	status                     int
}

// requestRecorder wraps a handler and keeps each request's Fetch Metadata
// and answer.
type requestRecorder struct {
	h    http.Handler
	mu   sync.Mutex
	seen []seenRequest
}

func (r *requestRecorder) ServeHTTP(w http.ResponseWriter, req *http.Request) {
	rec := &statusWriter{ResponseWriter: w, status: http.StatusOK}
	r.h.ServeHTTP(rec, req)
	r.mu.Lock()
	r.seen = append(r.seen, seenRequest{req.Method, req.URL.Path, req.Header.Get("Sec-Fetch-Site"), req.Header.Get("Origin"), rec.status})
	r.mu.Unlock()
}

// find waits up to 10 s for a request to path whose Sec-Fetch-Site is site.
func (r *requestRecorder) find(t *testing.T, method, path, site string) seenRequest {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for time.Now().Before(deadline) {
		r.mu.Lock()
		for _, s := range r.seen {
			if s.method == method && s.path == path && s.site == site {
				r.mu.Unlock()
				return s
			}
		}
		r.mu.Unlock()
		time.Sleep(50 * time.Millisecond)
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	t.Fatalf("no %s %s with Sec-Fetch-Site %q arrived; saw %+v", method, path, site, r.seen)
	return seenRequest{}
}

type statusWriter struct {
	http.ResponseWriter
	status int
}

func (w *statusWriter) WriteHeader(code int) { w.status = code; w.ResponseWriter.WriteHeader(code) }

// TestOriginRealBrowser: a real Chromium, not headers written by hand. A
// demo server (loopback callers hold admin, an ambient authority) listens
// on 127.0.0.1; a page on localhost, another site (W3C Fetch Metadata: a
// different host is cross-site unless they share a registrable domain),
// makes the browser POST to the reload route without a preflight
// (mode "no-cors"). The browser labels it Sec-Fetch-Site: cross-site with
// its Origin, and the server refuses it with 403; the same POST from the
// server's own page is labelled same-origin and succeeds.
func TestOriginRealBrowser(t *testing.T) {
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is missing, but CI installs chromium: %v", chromiumPath, err)
		}
		t.Skipf("skipping the browser test: %s not found (install the chromium package to run it)", chromiumPath)
	}
	s, _, _ := hardenedServer(t, func(o *Options) { o.Demo = true })
	rr := &requestRecorder{h: s.Handler()}
	kw := httptest.NewServer(rr)
	defer kw.Close()
	attacker := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Type", "text/html; charset=utf-8")
		fmt.Fprintf(w, `<!doctype html><title>elsewhere</title><p id="done">sending</p>
<script>fetch(%q, {method: "POST", mode: "no-cors"}).finally(function () { document.getElementById("done").textContent = "sent"; });</script>`,
			kw.URL+"/api/v1/reload")
	}))
	defer attacker.Close()
	attackerURL := strings.Replace(attacker.URL, "127.0.0.1", "localhost", 1)

	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	actx, acancel := chromedp.NewExecAllocator(ctx, chromedp.ExecPath(chromiumPath), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU,
		chromedp.Flag("no-first-run", true), chromedp.Flag("disable-background-networking", true), chromedp.UserDataDir(t.TempDir()))
	defer acancel()
	bctx, bcancel := chromedp.NewContext(actx)
	defer bcancel()

	if err := chromedp.Do(bctx, chromedp.Navigate(attackerURL+"/")); err != nil {
		t.Fatalf("open the other site's page: %v", err)
	}
	forged := rr.find(t, http.MethodPost, "/api/v1/reload", "cross-site")
	if forged.origin != attackerURL || forged.status != http.StatusForbidden {
		t.Fatalf("cross-site POST: origin %q, status %d; want %q and 403", forged.origin, forged.status, attackerURL)
	}

	if err := chromedp.Do(bctx, chromedp.Navigate(kw.URL+"/")); err != nil {
		t.Fatalf("open the search page: %v", err)
	}
	status, err := chromedp.Run(bctx, chromedp.Evaluate[int](`fetch("/api/v1/reload", {method: "POST"}).then(r => r.status)`, chromedp.EvalAwaitPromise))
	if err != nil {
		t.Fatalf("same-origin POST: %v", err)
	}
	own := rr.find(t, http.MethodPost, "/api/v1/reload", "same-origin")
	if status != http.StatusOK || own.status != http.StatusOK || own.origin != kw.URL {
		t.Fatalf("same-origin POST: page saw %d, server answered %d with origin %q", status, own.status, own.origin)
	}
}

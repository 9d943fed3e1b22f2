package web

import (
	"context"
	"os"
	"slices"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"kinword/internal/store"
)

// eventWait bounds how long a page's signal may take to reach the store.
const eventWait = 5 * time.Second

// TestBrowserSearchPage drives the embedded search page in headless
// Chromium, by keyboard only: search with Enter, accept the first
// suggestion with Enter, set the next one aside with Escape, and checks the
// page and the event store after each step.
//
// Enter on a focused button activating it (a click) is the HTML Living
// Standard's activation behaviour for button elements (WHATWG, section
// "The button element"; from memory). Escape and Delete setting a chip
// aside is this page's own contract, stated in its hint text.
func TestBrowserSearchPage(t *testing.T) {
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is missing, but CI installs chromium: %v", chromiumPath, err)
		}
		t.Skipf("skipping the browser test: %s not found (install the chromium package to run it)", chromiumPath)
	}
	fx := newBrowserFixture(t)
	terms := fx.suggestedTerms(t, "valve") // display -> term key, from the API

	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(chromiumPath),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
	}
	actx, acancel := chromedp.NewExecAllocator(ctx, opts...)
	defer acancel()
	bctx, bcancel := chromedp.NewContext(actx)
	defer bcancel()

	const titlesJS = `Array.from(document.querySelectorAll('#results li .kw-title')).map(a => a.textContent)`
	const chipsJS = `Array.from(document.querySelectorAll('#suggestions .kw-chip')).map(b => b.textContent)`
	const acceptedJS = `Array.from(document.querySelectorAll('#accepted .kw-chip')).map(b => b.textContent)`
	firstChip := chromedp.CSS(`#suggestions .kw-chip`)
	list := func(expr string) []string {
		t.Helper()
		v, err := chromedp.Run(bctx, chromedp.Evaluate[[]string](expr))
		if err != nil {
			t.Fatalf("evaluate %s: %v", expr, err)
		}
		return v
	}

	// 1. Search by typing and pressing Enter in the box.
	if err := chromedp.Do(bctx,
		chromedp.Navigate(fx.srv.URL+"/"),
		chromedp.WaitVisible(chromedp.CSS(`#q`)),
		chromedp.SendKeys(chromedp.CSS(`#q`), "valve"),
		chromedp.KeyEvent(kb.Enter),
		chromedp.WaitVisible(firstChip),
	); err != nil {
		t.Fatalf("search: %v", err)
	}
	before, chipsBefore := list(titlesJS), list(chipsJS)
	status, err := chromedp.Run(bctx, chromedp.Text(chromedp.CSS(`#status`)))
	if err != nil {
		t.Fatalf("status: %v", err)
	}
	t.Logf("search: status %q, results %q, suggestions %q", status, before, chipsBefore)
	// The corpus has four documents with "valve" (see browserCorpus).
	if len(before) != 4 || status != "4 documents found" {
		t.Fatalf("plain search: %d results, status %q; want the 4 valve notes", len(before), status)
	}
	first := chipsBefore[0]
	firstTerm, ok := terms[first]
	if !ok {
		t.Fatalf("first chip %q is not among the API's suggestions %v", first, terms)
	}

	// 2. Accept the first suggestion: focus it and press Enter.
	if err := chromedp.Do(bctx,
		chromedp.Focus(firstChip),
		chromedp.KeyEvent(kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`#accepted .kw-chip`)),
		chromedp.Poll[chromedp.Void](`(() => { const t = `+titlesJS+`; return t.length > 0 && JSON.stringify(t) !== `+jsString(jsonText(before))+`; })()`),
	); err != nil {
		t.Fatalf("accept %q: %v", first, err)
	}
	after, accepted := list(titlesJS), list(acceptedJS)
	t.Logf("accepted %q: results %q", accepted, after)
	if !slices.Equal(accepted, []string{first}) {
		t.Errorf("accepted chips %q, want [%q]", accepted, first)
	}
	// Every offered term is in two documents without "valve": accepting it
	// must add them and keep all four valve notes.
	if len(after) != len(before)+2 {
		t.Errorf("after accepting %q: %d results %q, want %d", first, len(after), after, len(before)+2)
	}
	for _, b := range before {
		if !slices.Contains(after, b) {
			t.Errorf("after accepting %q the valve note %q is gone", first, b)
		}
	}

	imp := fx.waitEvent(ctx, t, eventWait, "impression", func(evs []store.Event) (store.Event, bool) {
		for _, e := range evs {
			if e.Kind == store.KindImpression {
				return e, true
			}
		}
		return store.Event{}, false
	})
	if len(imp.Terms) != len(chipsBefore) || imp.Terms[0] != firstTerm || imp.Query != "valv" {
		t.Errorf("impression %+v: want %d terms starting with %q for query key %q", imp, len(chipsBefore), firstTerm, "valv")
	}
	acc := fx.waitEvent(ctx, t, eventWait, "accept of "+firstTerm, func(evs []store.Event) (store.Event, bool) {
		for _, e := range evs {
			if e.Kind == store.KindAccept && e.Term == firstTerm {
				return e, true
			}
		}
		return store.Event{}, false
	})
	if acc.Impression != imp.Impression || acc.Position != 0 {
		t.Errorf("accept %+v: want impression %s, position 0", acc, imp.Impression)
	}

	// 3. Set the next suggestion aside: focus it and press Escape.
	if err := chromedp.Do(bctx, chromedp.WaitVisible(firstChip)); err != nil {
		t.Fatalf("suggestions after accepting: %v", err)
	}
	chipsNow := list(chipsJS)
	if slices.Contains(chipsNow, first) {
		t.Errorf("accepted %q is still offered: %q", first, chipsNow)
	}
	aside := chipsNow[0]
	if err := chromedp.Do(bctx,
		chromedp.Focus(firstChip),
		chromedp.KeyEvent(kb.Escape),
		chromedp.Poll[chromedp.Void](`!(`+chipsJS+`).includes(`+jsString(aside)+`)`),
	); err != nil {
		t.Fatalf("set aside %q: %v", aside, err)
	}
	chipsLeft := list(chipsJS)
	t.Logf("set aside %q: suggestions left %q", aside, chipsLeft)
	if len(chipsLeft) != len(chipsNow)-1 {
		t.Errorf("after Escape on %q: suggestions %q, want one fewer than %q", aside, chipsLeft, chipsNow)
	}
	png, err := chromedp.Run(bctx, chromedp.FullScreenshot(100)) // quality 100: PNG
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	screenshotTo(t, png)

	asideTerm, ok := terms[aside]
	if !ok {
		t.Fatalf("chip %q is not among the API's suggestions %v", aside, terms)
	}
	dis := fx.waitEvent(ctx, t, eventWait, "dismiss of "+asideTerm, func(evs []store.Event) (store.Event, bool) {
		for _, e := range evs {
			if e.Kind == store.KindDismiss && e.Term == asideTerm {
				return e, true
			}
		}
		return store.Event{}, false
	})
	if dis.Impression == imp.Impression || dis.Position != 0 {
		t.Errorf("dismiss %+v: want the second impression (not %s), position 0", dis, imp.Impression)
	}
	// The dismiss refers to the impression the page recorded after the
	// accept, which showed the set-aside term first.
	second := fx.waitEvent(ctx, t, eventWait, "second impression", func(evs []store.Event) (store.Event, bool) {
		for _, e := range evs {
			if e.Kind == store.KindImpression && e.Impression == dis.Impression {
				return e, true
			}
		}
		return store.Event{}, false
	})
	if len(second.Terms) != len(chipsNow) || second.Terms[0] != asideTerm || slices.Contains(second.Terms, firstTerm) {
		t.Errorf("second impression %+v: want %d terms starting with %q, without the accepted %q", second, len(chipsNow), asideTerm, firstTerm)
	}
}

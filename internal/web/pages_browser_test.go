package web

import (
	"net/url"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// The desk pages are tested in headless Chromium against deskStub (see
// pages_browser_util_test.go): fixtures in the API's own encodings, so the
// pages read the field names the handlers write. Keyboard use: Enter on a
// focused button activates it, and Enter in a text field submits its form
// (HTML Living Standard, "The button element" and "Implicit submission";
// from memory).

const rulesRowsJS = `Array.from(document.querySelectorAll('#rules tbody tr')).map(tr => Array.from(tr.cells).slice(0, 4).map(c => c.textContent).join("|"))`

// TestBrowserPageLibrarian: the rules table renders the stub's rules,
// sorts by a header and filters; a pasted token is kept for the tab and
// sent as a bearer header; the change log offers a revert; a draft in the
// URL fills the form, its preview posts the draft and shows the samples, and
// saving it posts it.
func TestBrowserPageLibrarian(t *testing.T) {
	d := newDesk(t)
	d.run(t, "load /librarian", chromedp.Navigate(d.url+"/librarian"),
		chromedp.Poll[chromedp.Void](`document.querySelectorAll('#rules tbody tr').length === 2 && document.querySelectorAll('#log li button').length === 1`))
	want := []string{"relate|burst main|water main break|field-operations", "block|hydrant|fire drill|whole organisation"}
	if got := eval[[]string](t, d, rulesRowsJS); !slices.Equal(got, want) {
		t.Errorf("rules table %q, want %q", got, want)
	}
	if _, ok := d.stub.find("GET", "/api/v1/rules", func(c deskCall) bool { return c.Auth == "" }); !ok {
		t.Errorf("without a token the page must send no Authorization header")
	}

	// Sort by term with the keyboard: ascending, then descending.
	termSort := chromedp.CSS(`#rules thead th:nth-child(3) button`)
	d.run(t, "sort by term", chromedp.Focus(termSort), chromedp.KeyEvent(kb.Enter))
	if got := eval[[]string](t, d, rulesRowsJS); !slices.Equal(got, []string{want[1], want[0]}) {
		t.Errorf("sorted by term ascending: %q", got)
	}
	if got := eval[string](t, d, `document.querySelector('#rules thead th:nth-child(3)').getAttribute('aria-sort')`); got != "ascending" {
		t.Errorf("aria-sort %q after one sort, want ascending", got)
	}
	d.run(t, "sort by term again", chromedp.Focus(termSort), chromedp.KeyEvent(kb.Enter))
	if got := eval[[]string](t, d, rulesRowsJS); !slices.Equal(got, want) {
		t.Errorf("sorted by term descending: %q", got)
	}

	// Filters: by kind, then by text.
	d.run(t, "filter by kind", setSelect("flt-kind", "block"))
	if got := eval[[]string](t, d, rulesRowsJS); !slices.Equal(got, want[1:]) {
		t.Errorf("kind block: %q", got)
	}
	d.run(t, "filter by text", setSelect("flt-kind", ""), chromedp.SendKeys(chromedp.CSS(`#flt-text`), "main b"))
	if got := eval[[]string](t, d, rulesRowsJS); !slices.Equal(got, want[:1]) {
		t.Errorf("text %q: %q", "main b", got)
	}
	if got := eval[string](t, d, `document.getElementById('rules-count').textContent`); got != "1 of 2 rules shown" {
		t.Errorf("rules count %q", got)
	}
	logText := eval[string](t, d, `document.querySelector('#log li').textContent`)
	revert := eval[string](t, d, `document.querySelector('#log li button').getAttribute('aria-label')`)
	if !strings.Contains(logText, "#4") || !strings.Contains(logText, "water main break") || !strings.HasPrefix(revert, "Revert change 4") {
		t.Errorf("change log entry %q, button %q", logText, revert)
	}

	// Edit: the row's rule fills the form; saving sends its version.
	d.run(t, "edit", chromedp.Focus(chromedp.CSS(`#rules tbody tr:first-child button`)), chromedp.KeyEvent(kb.Enter))
	if got := eval[string](t, d, `document.getElementById('draft-mode').textContent + "|" + document.getElementById('f-reason').value`); got != "(editing r-burst, version 2)|crews say main break" {
		t.Errorf("editing state %q", got)
	}
	d.run(t, "save the edit", chromedp.SendKeys(chromedp.CSS(`#f-why`), "clearer"), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.getElementById('live').textContent.startsWith('Changed')`))
	ed := d.waitCall(t, "PUT", "/api/v1/rules/r-burst", nil)
	if ed.Body["version"] != float64(2) || ed.Body["term"] != "water main break" || ed.Body["why"] != "clearer" || ed.Body["kind"] != "relate" {
		t.Errorf("edit call %+v", ed)
	}

	// A token pasted under Access goes out as a bearer header.
	d.run(t, "paste a token", chromedp.Click(chromedp.CSS(`#access summary`)),
		chromedp.SendKeys(chromedp.CSS(`#token`), "kw_pagetoken"), chromedp.KeyEvent(kb.Enter))
	d.waitCall(t, "GET", "/api/v1/rules", func(c deskCall) bool { return c.Auth == "Bearer kw_pagetoken" })
	if got := eval[string](t, d, `sessionStorage.getItem("kinword.token")`); got != "kw_pagetoken" {
		t.Errorf("sessionStorage token %q", got)
	}
	d.clean(t, "/librarian")

	// A draft from the review page, as its links write it.
	d.run(t, "load a draft", chromedp.Navigate(d.url+"/librarian?kind=block&query=valve&term=meter+%26+seal&department=field-operations"),
		chromedp.WaitVisible(chromedp.CSS(`#f-term`)))
	fields := eval[[]string](t, d, `["f-kind", "f-query", "f-term", "f-department"].map(id => document.getElementById(id).value)`)
	if !slices.Equal(fields, []string{"block", "valve", "meter & seal", "field-operations"}) {
		t.Errorf("draft fields %q", fields)
	}
	if got := eval[string](t, d, `document.activeElement.id`); got != "preview-btn" {
		t.Errorf("focus on %q, want the preview button", got)
	}
	d.run(t, "preview", chromedp.KeyEvent(kb.Enter), chromedp.Poll[chromedp.Void](`document.querySelectorAll('#preview li.kw-gone').length > 0`))
	pv := d.waitCall(t, "POST", "/api/v1/rules/preview", nil)
	if pv.Auth != "Bearer kw_pagetoken" || pv.Body["kind"] != "block" || pv.Body["query"] != "valve" || pv.Body["term"] != "meter & seal" ||
		pv.Body["department"] != "field-operations" {
		t.Errorf("preview call %+v", pv)
	}
	if _, ok := pv.Body["start"]; ok {
		t.Errorf("preview body has a start date the form left empty: %v", pv.Body)
	}
	if got := eval[[]string](t, d, `Array.from(document.querySelectorAll('#preview li.kw-gone')).map(li => li.textContent)`); !slices.Equal(got, []string{"reservoir"}) {
		t.Errorf("terms the rule would remove %q, want [reservoir]", got)
	}
	if got := eval[string](t, d, `document.getElementById('live').textContent`); got != "Preview ready: 2 of 40 impressions change." {
		t.Errorf("live region %q", got)
	}

	d.run(t, "save", chromedp.Focus(chromedp.CSS(`#save-btn`)), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.getElementById('live').textContent.startsWith('Saved')`))
	sv := d.waitCall(t, "POST", "/api/v1/rules", nil)
	if sv.Body["term"] != "meter & seal" || sv.Body["why"] != "Drafted from the suggestion review" {
		t.Errorf("save call %+v", sv)
	}
	if got := eval[string](t, d, `document.getElementById('live').textContent`); got != "Saved block \u201cmeter & seal\u201d for \u201cvalve\u201d in field-operations." {
		t.Errorf("live region after save %q", got)
	}
	// Import: a refused file shows its rejections; an accepted one its count.
	dir := t.TempDir()
	csvFile, ntFile := filepath.Join(dir, "rules.csv"), filepath.Join(dir, "rules.nt")
	for _, f := range []string{csvFile, ntFile} {
		if err := os.WriteFile(f, []byte("kind,query,term\npinned,valve,chamber\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	d.run(t, "import a refused file", chromedp.SetUploadFiles(chromedp.CSS(`#imp-file`), []string{csvFile}),
		chromedp.Focus(chromedp.CSS(`#import-form button[type=submit]`)), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.querySelectorAll('#import-report tbody tr').length === 1`))
	im := d.waitCall(t, "POST", "/api/v1/rules/import", nil)
	if im.Query != "format=csv&mode=add" || im.Body["text"] != "kind,query,term\npinned,valve,chamber\n" {
		t.Errorf("import call %+v", im)
	}
	if got := eval[string](t, d, `Array.from(document.querySelectorAll('#import-report tbody td')).map(c => c.textContent).join("|")`); got != `2|kind|unknown kind "pinned"` {
		t.Errorf("rejection row %q", got)
	}
	d.run(t, "import an accepted file", setSelect("imp-format", "ntriples"), chromedp.SetUploadFiles(chromedp.CSS(`#imp-file`), []string{ntFile}),
		chromedp.Focus(chromedp.CSS(`#import-form button[type=submit]`)), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.getElementById('live').textContent === 'Imported 3 rules from rules.nt.'`))
	d.shot(t, "librarian")
	d.clean(t, "/librarian with a draft")
}

// TestBrowserPageAdmin: the review page draws the trend with uPlot (a
// canvas), fills the terms table and the attention lists, each row linking
// to the draft on the librarian page, and sends the period filter in RFC
// 3339 form.
func TestBrowserPageAdmin(t *testing.T) {
	d := newDesk(t)
	d.run(t, "load /admin", chromedp.Navigate(d.url+"/admin"), chromedp.WaitVisible(chromedp.CSS(`#trend-chart canvas`)),
		chromedp.Poll[chromedp.Void](`document.querySelectorAll('#terms tbody tr').length === 2`))
	if got := eval[bool](t, d, `(c => c.width > 0 && c.height > 0 && !!c.closest('.uplot'))(document.querySelector('#trend-chart canvas'))`); !got {
		t.Errorf("the trend canvas is empty or not uPlot's")
	}
	// The stub's trend: 10+30+20 impressions and 2+5+3 accepts on three days.
	if got := eval[string](t, d, `document.getElementById('trend-summary').textContent`); got != "3 days from 2026-11-02 to 2026-11-04: 60 impressions, 10 accepts." {
		t.Errorf("trend summary %q", got)
	}
	const termsJS = `Array.from(document.querySelectorAll('#terms tbody tr')).map(tr => Array.from(tr.cells).map(c => c.textContent).join("|"))`
	want := []string{"flushing|all|40|9|30.0% (17.0%\u201347.0%)|2|66.7%", "chamber|field-operations|20|1|6.7% (1.0%\u201330.0%)|0|0.0%"}
	if got := eval[[]string](t, d, termsJS); !slices.Equal(got, want) {
		t.Errorf("terms table %q, want %q", got, want)
	}
	d.run(t, "sort by impressions", chromedp.Focus(chromedp.CSS(`#terms thead th:nth-child(3) button`)), chromedp.KeyEvent(kb.Enter))
	if got := eval[[]string](t, d, termsJS); !slices.Equal(got, []string{want[1], want[0]}) {
		t.Errorf("terms by impressions ascending %q", got)
	}

	link := eval[string](t, d, `document.querySelector('#att-rarely_accepted a.kw-draft').getAttribute('href')`)
	if link != "/librarian?kind=block&query=valve&term=meter+%26+seal&department=field-operations" {
		t.Errorf("attention link %q", link)
	}
	csv := eval[string](t, d, `document.querySelector('#att-rarely_accepted .kw-exports a').getAttribute('href')`)
	if !strings.HasSuffix(csv, "/api/v1/review/export?table=rarely_accepted") {
		t.Errorf("attention CSV link %q", csv)
	}
	if got := eval[string](t, d, `document.querySelector('#att-no_results tbody td').textContent`); got != "Nothing here in this period." {
		t.Errorf("empty attention list says %q", got)
	}

	d.run(t, "chart the rate", setSelect("chart-mode", "rate"), chromedp.WaitVisible(chromedp.CSS(`#trend-chart canvas`)))
	if got := eval[string](t, d, `document.getElementById('trend-chart').getAttribute('aria-label')`); !strings.Contains(got, "acceptance rate") {
		t.Errorf("chart label %q after switching to the rate", got)
	}
	d.run(t, "filter the period", chromedp.SendKeys(chromedp.CSS(`#p-dept`), "field-operations"), chromedp.KeyEvent(kb.Enter))
	d.waitCall(t, "GET", "/api/v1/review", func(c deskCall) bool { return c.Query == "department=field-operations" })
	d.run(t, "a month of trend", chromedp.Poll[chromedp.Void](`document.getElementById('trend-summary').textContent.startsWith('30 days from 2026-11-02 to 2026-12-01')`))
	// 30 term rows: the table shows 25 until asked for all.
	if n := eval[int](t, d, `document.querySelectorAll('#terms tbody tr').length`); n != 26 {
		t.Errorf("30 term rows: %d rows shown, want 25 and the show-all row", n)
	}
	d.run(t, "show all rows", chromedp.Focus(chromedp.CSS(`#terms .kw-more`)), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.querySelectorAll('#terms tbody tr').length === 30`))
	if got := eval[string](t, d, `document.activeElement.cells[0].textContent`); got != "term 25" {
		t.Errorf("after show all, focus is on %q, want the first new row", got)
	}
	d.run(t, "a period from a date", chromedp.Poll[chromedp.Void](`(i => { i.value = "2026-11-01"; return true; })(document.getElementById("p-from"))`),
		chromedp.Focus(chromedp.CSS(`#period button[type=submit]`)), chromedp.KeyEvent(kb.Enter))
	d.waitCall(t, "GET", "/api/v1/review", func(c deskCall) bool {
		q, _ := url.ParseQuery(c.Query)
		return len(q) == 2 && q.Get("department") == "field-operations" && q.Get("from") == "2026-11-01T00:00:00Z"
	})
	d.run(t, "an empty review", chromedp.Poll[chromedp.Void](`(i => { i.value = "nobody"; return true; })(document.getElementById("p-dept"))`),
		chromedp.Focus(chromedp.CSS(`#period button[type=submit]`)), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.getElementById('trend-summary').textContent === 'No impressions in this period.'`))
	if n := eval[int](t, d, `document.querySelectorAll('#terms tbody tr').length`); n != 1 {
		t.Errorf("empty review: %d term rows, want the one 'nothing' row", n)
	}
	d.run(t, "back to the month", chromedp.Poll[chromedp.Void](`(i => { i.value = "field-operations"; return true; })(document.getElementById("p-dept"))`),
		chromedp.Focus(chromedp.CSS(`#period button[type=submit]`)), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.getElementById('trend-summary').textContent.startsWith('30 days')`))
	d.shot(t, "admin")
	d.clean(t, "/admin")

	// Enter on a focused link follows it; the new page then loads.
	d.run(t, "follow the draft link", chromedp.Focus(chromedp.CSS(`#att-rarely_accepted a.kw-draft`)), chromedp.KeyEvent(kb.Enter))
	d.run(t, "the draft link's page", chromedp.WaitVisible(chromedp.CSS(`#f-term`)),
		chromedp.Poll[chromedp.Void](`location.pathname === "/librarian" && document.getElementById("f-term").value === "meter & seal"`))
	d.clean(t, "/librarian from the link")
}

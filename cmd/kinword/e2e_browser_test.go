package main

import (
	"encoding/json"
	"fmt"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// e2eQuery is the search of the scenario: field operations' "burst pipe"
// from the demo's walk-through (kinword demo).
const e2eQuery = "burst pipe"

// e2eRefresh is the server's refresh interval in the scenario (seconds):
// learning, rules and the suggestion cache renew this often, so that a
// page loaded again after it gets a fresh impression.
const e2eRefresh = 2

// e2eLoads bounds how often a page is loaded for a check that one
// impression's exploration could upset (see e2eOfferedWithin).
const e2eLoads = 5

// TestE2EBrowserBlockAndReview drives the three pages of one demo server
// in headless Chromium over the demo intranet, whose event store holds a
// month of simulated traffic (kinword simulate --record):
//
//  1. the search page as field-operations offers a term T for "burst
//     pipe" that asset-engineering is offered too (both checked by the API
//     first);
//  2. on the vocabulary desk a librarian blocks T for field-operations
//     through the draft form, and the rule shows in the rules table;
//  3. the search page as field-operations no longer offers T, on any of
//     several loads, while asset-engineering still is offered it: the
//     block is scoped to its department;
//  4. the suggestion review shows the recorded month: a uPlot chart, a
//     trend of about 30 days with exactly the recorded accepts and the
//     recorded impressions (plus at most the ones these page loads sent),
//     every recorded click counted as an accept followed by a click, and
//     the terms table and attention lists as long as the review API says.
//
// Exploration (a tenth of impressions ranked by a Thompson sample, see
// internal/prefs) can reorder one impression, so "offered" checks allow up
// to e2eLoads loads; "not offered" must hold on every load.
func TestE2EBrowserBlockAndReview(t *testing.T) {
	e2eNeedChromium(t)
	e2eIsolateEnv(t)
	data := e2eDemoData(t)
	code, out, errs := runCLI(t, "simulate", "--record", "--sessions", "300", "--data", data, "--corpus", e2eCorpus)
	if code != 0 {
		t.Fatalf("simulate --record: exit %d: %s", code, errs)
	}
	rec := parseSimRecorded(t, out)
	t.Logf("simulated: %+v", rec)
	cfg := filepath.Join(t.TempDir(), "kinword.toml")
	judged, err := filepath.Abs(e2eCorpus)
	if err != nil {
		t.Fatal(err)
	}
	conf := "[server]\nrefresh_seconds = " + strconv.Itoa(e2eRefresh) + "\n[review]\njudged_dir = " + strconv.Quote(judged) + "\n"
	if err := os.WriteFile(cfg, []byte(conf), 0o644); err != nil {
		t.Fatal(err)
	}
	base := e2eStartServer(t, data, cfg)
	b := newE2EBrowser(t, 4*time.Minute)
	loads := 0 // search page loads, each sending at most one impression

	// 1. T: offered to both departments, once the learned model serves
	// (its scores appear as evidence part "learned").
	fo, ae := e2eLearnedOffers(t, base, "field-operations"), e2eLearnedOffers(t, base, "asset-engineering")
	var term, display string
	for _, o := range fo {
		if slices.ContainsFunc(ae, func(x e2eOffer) bool { return x.Term == o.Term }) {
			term, display = o.Term, o.Display
			break
		}
	}
	if term == "" {
		t.Fatalf("no term offered to both departments for %q: field-operations %v, asset-engineering %v", e2eQuery, e2eDisplays(fo), e2eDisplays(ae))
	}
	t.Logf("T = %q (key %q); field-operations %q, asset-engineering %q", display, term, e2eDisplays(fo), e2eDisplays(ae))
	for _, persona := range []string{"field-operations", "asset-engineering"} {
		chips, n := e2eOfferedWithin(t, b, base, persona, display, &loads)
		if !slices.Contains(chips, display) {
			t.Fatalf("before the block, %s's search page did not offer %q in %d loads: %q", persona, display, n, chips)
		}
		if persona == "field-operations" {
			b.shot(t, "search")
		}
	}

	// 2. Block T for field-operations on the vocabulary desk. Enter on a
	// focused button activates it (HTML Living Standard, "The button
	// element"; from memory).
	const rulesJS = `Array.from(document.querySelectorAll('#rules tbody tr')).map(tr => Array.from(tr.cells).slice(0, 4).map(c => c.textContent).join("|"))`
	b.run(t, "load /librarian", chromedp.Navigate(base+"/librarian"), chromedp.WaitVisible(chromedp.CSS(`#f-term`)),
		chromedp.Poll[chromedp.Void](`document.getElementById('rules-count').textContent === '0 of 0 rules shown'`))
	reason := "Field crews report " + display + " is not what they look for after a burst pipe"
	b.run(t, "fill the draft", e2eSetValue("f-kind", "block"),
		chromedp.SendKeys(chromedp.CSS(`#f-term`), display),
		chromedp.SendKeys(chromedp.CSS(`#f-department`), "field-operations"),
		chromedp.SendKeys(chromedp.CSS(`#f-reason`), reason),
		chromedp.SendKeys(chromedp.CSS(`#f-why`), "end-to-end test"))
	b.run(t, "save the rule", chromedp.Focus(chromedp.CSS(`#save-btn`)), chromedp.KeyEvent(kb.Enter),
		chromedp.Poll[chromedp.Void](`document.getElementById('live').textContent.startsWith('Saved')`),
		chromedp.Poll[chromedp.Void](`document.getElementById('rules-count').textContent === '1 of 1 rules shown'`),
		chromedp.Poll[chromedp.Void](`document.querySelectorAll('#log li button').length === 1`)) // the new entry's Revert
	if got, want := e2eEval[[]string](t, b, rulesJS), []string{"block||" + display + "|field-operations"}; !slices.Equal(got, want) {
		t.Errorf("rules table %q, want %q", got, want)
	}
	if got := e2eEval[string](t, b, `document.getElementById('live').textContent`); got != "Saved block \u201c"+display+"\u201d in field-operations." {
		t.Errorf("live region %q", got)
	}
	if got := e2eEval[string](t, b, `document.querySelector('#log li').textContent`); !strings.Contains(got, "create") || !strings.Contains(got, "by demo") || !strings.Contains(got, "end-to-end test") {
		t.Errorf("change log entry %q: want the create by the demo grant, with its note", got)
	}
	b.clean(t, "/librarian")
	b.shot(t, "librarian")

	// 3. The block holds for field-operations on every load; the API
	// agrees. Asset-engineering is still offered T.
	for i := range 3 {
		chips := e2eSearchChips(t, b, base, "field-operations", &loads)
		if len(chips) == 0 || slices.Contains(chips, display) {
			t.Fatalf("after the block, load %d of field-operations' search page offers %q, want suggestions without %q", i+1, chips, display)
		}
		if i == 0 {
			b.shot(t, "search-blocked")
		}
		if slices.ContainsFunc(e2eLookup(t, base, e2eQuery, "field-operations"), func(o e2eOffer) bool { return o.Term == term }) {
			t.Fatalf("after the block, the API still offers %q to field-operations", term)
		}
		time.Sleep(e2eRefresh * time.Second)
	}
	if chips, n := e2eOfferedWithin(t, b, base, "asset-engineering", display, &loads); !slices.Contains(chips, display) {
		t.Errorf("after field-operations' block, asset-engineering was not offered %q in %d loads: %q", display, n, chips)
	}

	// 4. The review of the recorded month.
	b.run(t, "load /admin", chromedp.Navigate(base+"/admin"), chromedp.WaitVisible(chromedp.CSS(`#trend-chart canvas`)),
		chromedp.Poll[chromedp.Void](`document.getElementById('live').textContent.startsWith('Review loaded')`))
	if !e2eEval[bool](t, b, `(c => c.width > 0 && c.height > 0 && !!c.closest('.uplot'))(document.querySelector('#trend-chart canvas'))`) {
		t.Errorf("the trend canvas is empty or not uPlot's")
	}
	summary := e2eEval[string](t, b, `document.getElementById('trend-summary').textContent`)
	m := regexp.MustCompile(`^(\d+) days from \S+ to \S+: (\d+) impressions, (\d+) accepts\.$`).FindStringSubmatch(summary)
	if m == nil {
		t.Fatalf("trend summary %q", summary)
	}
	days, _ := strconv.Atoi(m[1])
	imps, _ := strconv.Atoi(m[2])
	accs, _ := strconv.Atoi(m[3])
	// The recorded sessions span just under 30 days (30 or 31 UTC dates);
	// this test's own impressions may add the next date when it runs
	// across midnight.
	if days < 30 || days > 32 || imps < rec.impressions || imps > rec.impressions+loads || accs != rec.accepts {
		t.Errorf("trend summary %q: want 30 to 32 days, %d to %d impressions, %d accepts", summary, rec.impressions, rec.impressions+loads, rec.accepts)
	}
	// The page shows what the review API reports (loopback is admin in
	// demo mode): every term row counted, each attention list's length.
	code, body := request(t, "GET", base+"/api/v1/review", "", "")
	if code != 200 {
		t.Fatalf("review API: %d %s", code, body)
	}
	var rep map[string]json.RawMessage
	if err := json.Unmarshal([]byte(body), &rep); err != nil {
		t.Fatal(err)
	}
	var terms []struct {
		Department string `json:"department"`
		Successes  int    `json:"successes"`
	}
	if err := json.Unmarshal(rep["terms"], &terms); err != nil {
		t.Fatal(err)
	}
	successes := 0
	for _, r := range terms {
		if r.Department == "" {
			successes += r.Successes
		}
	}
	// Each recorded click follows its accept in the same impression
	// within the review's 30-minute window, so it is one success.
	if len(terms) == 0 || successes != rec.clicks {
		t.Errorf("review API: %d term rows, %d accepts followed by a click overall; want rows and %d", len(terms), successes, rec.clicks)
	}
	if got, want := e2eEval[string](t, b, `document.getElementById('terms-count').textContent`), fmt.Sprintf("%d of %d rows", len(terms), len(terms)); !strings.HasPrefix(got, want) {
		t.Errorf("terms caption %q, want it to start %q", got, want)
	}
	// Rows with a numeric impressions cell: not the table's "nothing" row.
	if n := e2eEval[int](t, b, `Array.from(document.querySelectorAll('#terms tbody tr')).filter(tr => tr.cells.length > 2 && /^\d+$/.test(tr.cells[2].textContent)).length`); n != min(len(terms), 25) {
		t.Errorf("terms table shows %d rows, want %d (at most 25 before 'show all')", n, min(len(terms), 25))
	}
	for _, list := range []string{"rarely_accepted", "often_dismissed", "no_results", "no_suggestions", "rescued"} {
		var rows []json.RawMessage
		if err := json.Unmarshal(rep[list], &rows); err != nil {
			t.Fatalf("review API %s: %v", list, err)
		}
		head := e2eEval[string](t, b, `(h => h ? h.textContent : "missing")(document.querySelector('#att-`+list+` h3'))`)
		if !strings.HasSuffix(head, fmt.Sprintf("(%d)", len(rows))) {
			t.Errorf("attention list %s: heading %q, want %d rows", list, head, len(rows))
		}
		if list == "rarely_accepted" && len(rows) == 0 {
			t.Errorf("no rarely accepted suggestion after the simulated traffic: the attention list shows nothing to act on")
		}
	}
	// Attention rows link to rule drafts on the librarian's desk.
	if n := e2eEval[int](t, b, `document.querySelectorAll('#att-rarely_accepted a[href^="/librarian?"]').length`); n == 0 {
		t.Errorf("rarely accepted rows carry no rule-draft link")
	}
	b.clean(t, "/admin")
	b.shot(t, "admin")

	// 5. A trial on the same page: the demo's judged topics with the rules
	// in force (the block) against a proposal adding the equivalence
	// "burst pipe" -> "main break"; the page shows the three views and the
	// stored trial, with the figures the API stored.
	b.run(t, "draft a trial", chromedp.SendKeys(chromedp.CSS(`#t-title`), "burst pipe means main break"),
		e2eSetValue("t-kind", "use"), chromedp.SendKeys(chromedp.CSS(`#t-query`), "burst pipe"),
		chromedp.SendKeys(chromedp.CSS(`#t-term`), "main break"), chromedp.Click(chromedp.CSS(`#t-add`)),
		chromedp.Poll[chromedp.Void](`document.querySelectorAll('#t-rules li').length === 1`))
	b.run(t, "run the trial", chromedp.Click(chromedp.CSS(`#t-run`)),
		chromedp.Poll[chromedp.Void](`document.getElementById('live').textContent.startsWith('Trial stored')`),
		chromedp.Poll[chromedp.Void](`document.querySelectorAll('#trials tbody tr').length === 1 && document.querySelector('#trials tbody tr').cells.length === 4`))
	code, body = request(t, "GET", base+"/api/v1/trials", "", "")
	var list struct {
		Trials []struct{ ID, Title string } `json:"trials"`
	}
	if err := json.Unmarshal([]byte(body), &list); code != 200 || err != nil || len(list.Trials) != 1 || list.Trials[0].Title != "burst pipe means main break" {
		t.Fatalf("trials API: %d %s (%v)", code, body, err)
	}
	code, body = request(t, "GET", base+"/api/v1/trials/"+list.Trials[0].ID, "", "")
	var stored struct {
		Views []struct {
			Name   string `json:"name"`
			Report struct {
				Runs []struct {
					Method string  `json:"method"`
					MAP    float64 `json:"map"`
				} `json:"runs"`
			} `json:"report"`
		} `json:"views"`
	}
	if err := json.Unmarshal([]byte(body), &stored); code != 200 || err != nil || len(stored.Views) != 3 {
		t.Fatalf("trial API: %d %s (%v)", code, body, err)
	}
	cells := e2eEval[[]string](t, b, `Array.from(document.querySelectorAll('#trial-views tbody tr')).map(tr => tr.cells[1].textContent + "|" + tr.cells[2].textContent)`)
	var want []string
	for _, v := range stored.Views {
		want = append(want, fmt.Sprintf("%.4f|%.4f", v.Report.Runs[0].MAP, v.Report.Runs[1].MAP))
	}
	if !slices.Equal(cells, want) {
		t.Errorf("trial table MAP cells %q, want the stored %q", cells, want)
	}
	if s := stored.Views[0].Report.Runs; s[1].MAP <= s[0].MAP {
		t.Errorf("the equivalence should raise the plain search's MAP on the judged topics: %.4f -> %.4f", s[0].MAP, s[1].MAP)
	}
	b.clean(t, "/admin trial")
	b.shot(t, "admin-trial")
}

// e2eLearnedOffers polls the API until persona's suggestions for e2eQuery
// carry learned scores, and returns them.
func e2eLearnedOffers(t *testing.T, base, persona string) []e2eOffer {
	t.Helper()
	deadline := time.Now().Add(60 * time.Second)
	for {
		got := e2eLookup(t, base, e2eQuery, persona)
		if len(got) > 0 && !slices.ContainsFunc(got, func(o e2eOffer) bool { _, ok := o.Evidence.Parts["learned"]; return !ok }) {
			return got
		}
		if time.Now().After(deadline) {
			t.Fatalf("no learned suggestions for %q as %s within 60s: %+v", e2eQuery, persona, got)
		}
		time.Sleep(200 * time.Millisecond)
	}
}

func e2eDisplays(offers []e2eOffer) []string {
	out := make([]string, len(offers))
	for i, o := range offers {
		out[i] = o.Display
	}
	return out
}

// e2eSearchChips loads the search page with e2eQuery as persona (the
// parameters app.js reads from a shared link) and returns the chips shown
// once the search has rendered.
func e2eSearchChips(t *testing.T, b *e2eBrowser, base, persona string, loads *int) []string {
	t.Helper()
	*loads++
	u := base + "/?persona=" + url.QueryEscape(persona) + "&q=" + url.QueryEscape(e2eQuery)
	// The persona picker is filled from /api/v1/whoami in demo mode.
	b.run(t, "search as "+persona, chromedp.Navigate(u),
		chromedp.Poll[chromedp.Void](`/ found$/.test(document.getElementById('status').textContent)`),
		chromedp.Poll[chromedp.Void](`document.getElementById('persona').value === `+e2eQuote(persona)))
	chips := e2eEval[[]string](t, b, `Array.from(document.querySelectorAll('#suggestions .kw-chip')).map(b => b.textContent)`)
	b.clean(t, "search as "+persona)
	return chips
}

// e2eOfferedWithin loads persona's search page until it offers display, at
// most e2eLoads times, one refresh interval apart (each load after the
// first gets a fresh impression); it returns the last chips and the loads.
func e2eOfferedWithin(t *testing.T, b *e2eBrowser, base, persona, display string, loads *int) ([]string, int) {
	t.Helper()
	var chips []string
	for n := 1; ; n++ {
		chips = e2eSearchChips(t, b, base, persona, loads)
		if slices.Contains(chips, display) || n == e2eLoads {
			return chips, n
		}
		time.Sleep(e2eRefresh*time.Second + 100*time.Millisecond)
	}
}

package main

import (
	"context"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/demo"
	"kinword/internal/finder"
	"kinword/internal/store"
	"kinword/internal/text"
)

// sessionToken is the search page's session id: its UTC day, a dot and 32
// hex digits (internal/web/signals.go).
var sessionToken = regexp.MustCompile(`^(\d{8})\.[0-9a-f]{32}$`)

// TestSimulateRecordWritesStoreEvents runs `kinword simulate` on the demo
// intranet without and then twice with --record, and checks the event
// store against the run and against the demo's judged set:
//
//   - the JSON report is byte for byte the same with --record, and the
//     summary line (on stderr with --json) counts what the store holds;
//   - the same seed records the same traffic again, under fresh ids;
//   - every impression is one session of a simulated department's topic:
//     its canonical query key, no groups hash, no sources, a session token
//     of the page's shape dated on its day, times spread over the last 30
//     days;
//   - every accept names the shown term at its position, 4 s later;
//   - every click follows an accept of its impression, carries the
//     accepted key, and opens the first result of the refined search that
//     the demo's qrels judge relevant, at its 0-based rank;
//   - clicks are about 0.7 of the accepts whose refined search has a
//     relevant result (binomial mean within 4 standard deviations; common
//     practice).
func TestSimulateRecordWritesStoreEvents(t *testing.T) {
	ctx := context.Background()
	e2eIsolateEnv(t)
	data := e2eDemoData(t)
	args := []string{"simulate", "--sessions", "40", "--data", data, "--corpus", e2eCorpus, "--json"}
	code, plain, errs := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("simulate: exit %d: %s", code, errs)
	}
	before := time.Now().UTC()
	code, withRecord, errs := runCLI(t, append(args, "--record")...)
	after := time.Now().UTC()
	if code != 0 {
		t.Fatalf("simulate --record: exit %d: %s", code, errs)
	}
	if withRecord != plain {
		t.Errorf("--record changed the JSON report:\n%s\nwant\n%s", withRecord, plain)
	}
	rec := parseSimRecorded(t, errs)
	if code, _, errs = runCLI(t, append(args, "--record")...); code != 0 {
		t.Fatalf("simulate --record again: exit %d: %s", code, errs)
	}
	if again := parseSimRecorded(t, errs); again != rec {
		t.Errorf("the same seed recorded %+v, then %+v", rec, again)
	}

	st, err := store.Open(ctx, "sqlite:"+filepath.Join(data, "kinword.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	var evs []store.Event
	if err := st.Events(ctx, time.Time{}, func(e store.Event) error { evs = append(evs, e); return nil }); err != nil {
		t.Fatal(err)
	}
	if len(evs) != 2*rec.events || rec.events != rec.impressions+rec.accepts+rec.clicks || rec.impressions != 40*8 {
		t.Fatalf("store holds %d events after two runs of %+v; want twice the run, and 40 sessions of 8 departments", len(evs), rec)
	}
	imps := map[string]bool{}
	for _, e := range evs {
		if e.Kind == store.KindImpression {
			imps[e.Impression] = true
		}
	}
	if len(imps) != 2*rec.impressions {
		t.Errorf("%d distinct impression ids for %d impressions", len(imps), 2*rec.impressions)
	}

	f, topics, judged := recordOracle(t, data)
	first := evs[:rec.events]
	checkRecordedTimes(t, first, before, after)
	byImp := map[string]store.Event{}
	accepted := map[string]store.Event{}
	withRelevant, clicks := 0, 0
	for i, e := range first {
		switch e.Kind {
		case store.KindImpression:
			m := sessionToken.FindStringSubmatch(e.Session)
			if e.ID == e.Impression || e.GroupsHash != "" || len(e.Sources) != 0 || m == nil || m[1] != e.Time.Format("20060102") ||
				topics[e.Department][e.Query] == nil {
				t.Fatalf("event %d, impression %+v: want its own id, no groups hash or sources, a dated session token, a simulated topic's query", i, e)
			}
			byImp[e.Impression] = e
		case store.KindAccept:
			imp, ok := byImp[e.Impression]
			if !ok || e.Position >= len(imp.Terms) || imp.Terms[e.Position] != e.Term || e.Session != imp.Session ||
				e.Query != imp.Query || e.Department != imp.Department || e.Time.Sub(imp.Time) != recordAcceptAfter {
				t.Fatalf("event %d, accept %+v does not match its impression %+v", i, e, imp)
			}
			accepted[e.Impression] = e
			doc, rank := firstRelevant(ctx, t, f, topics[e.Department][e.Query], e.Term, judged)
			if doc != "" {
				withRelevant++
			}
			if i+1 < len(first) && first[i+1].Kind == store.KindClick {
				c := first[i+1]
				if c.Impression != e.Impression || !slices.Equal(c.Terms, []string{e.Term}) || c.Doc != doc || c.Rank != rank ||
					c.Session != e.Session || c.Time.Sub(e.Time) != recordClickAfter-recordAcceptAfter {
					t.Fatalf("event %d, click %+v after accept %+v: want the first relevant result %q at rank %d", i+1, c, e, doc, rank)
				}
			}
		case store.KindClick:
			clicks++
			if _, ok := accepted[e.Impression]; !ok || first[i-1].Kind != store.KindAccept {
				t.Fatalf("event %d, click %+v follows no accept of its impression", i, e)
			}
		default:
			t.Fatalf("event %d: unexpected kind %q (the cascade model sets nothing aside)", i, e.Kind)
		}
	}
	mean, sd := recordClickProb*float64(withRelevant), math.Sqrt(float64(withRelevant)*recordClickProb*(1-recordClickProb))
	t.Logf("%d accepts, %d with a relevant refined result, %d clicks (expected %.1f ± %.1f)", rec.accepts, withRelevant, clicks, mean, sd)
	if clicks != rec.clicks || withRelevant == 0 || math.Abs(float64(clicks)-mean) > 4*sd {
		t.Errorf("%d clicks (summary %d) for %d accepts with a relevant result: want about %.1f", clicks, rec.clicks, withRelevant, mean)
	}
}

// recordOracle opens a finder on data and returns the judged set and, per
// department, the simulated topics by canonical query key.
func recordOracle(t *testing.T, data string) (*finder.Finder, map[string]map[string]*demo.Topic, *demo.Judged) {
	t.Helper()
	j, err := demo.LoadJudged(e2eCorpus)
	if err != nil {
		t.Fatal(err)
	}
	p, _ := text.NewPipeline("")
	f, err := finder.Open(context.Background(), data, p, finder.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	topics := map[string]map[string]*demo.Topic{}
	for i := range j.Topics {
		tp := &j.Topics[i]
		if len(j.Preferences[tp.ID]) == 0 {
			continue // simulated departments are those with preferred terms
		}
		if topics[tp.Department] == nil {
			topics[tp.Department] = map[string]*demo.Topic{}
		}
		topics[tp.Department][f.CanonicalQuery(tp.Text)] = tp
	}
	return f, topics, j
}

// firstRelevant is the first result of tp's search refined with term that
// the qrels judge relevant, and its 0-based rank ("", -1 if none).
func firstRelevant(ctx context.Context, t *testing.T, f *finder.Finder, tp *demo.Topic, term string, j *demo.Judged) (string, int) {
	t.Helper()
	resp, err := f.Search(ctx, finder.Request{Query: tp.Text, Accepted: []string{term}, Viewer: access.Viewer{Department: tp.Department}, WithResults: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range resp.Results {
		if j.Qrels[tp.ID][r.ID] > 0 {
			return r.ID, r.Rank - 1
		}
	}
	return "", -1
}

// checkRecordedTimes: impressions in commit order are evenly spread from
// 30 days before the run to its end, on at least 30 UTC days, and no event
// is later than the run.
func checkRecordedTimes(t *testing.T, evs []store.Event, before, after time.Time) {
	t.Helper()
	var times []time.Time
	days := map[string]bool{}
	for _, e := range evs {
		if e.Time.After(after) {
			t.Fatalf("event %+v is later than the run (%s)", e, after)
		}
		if e.Kind == store.KindImpression {
			times = append(times, e.Time)
			days[e.Time.Format(time.DateOnly)] = true
		}
	}
	step := recordSpan / time.Duration(len(times))
	for i, tm := range times {
		lo, hi := before.Add(-recordSpan+time.Duration(i)*step), after.Add(-recordSpan+time.Duration(i)*step)
		if tm.Before(lo) || tm.After(hi) {
			t.Fatalf("impression %d of %d at %s, want between %s and %s", i, len(times), tm, lo, hi)
		}
	}
	if len(days) < 30 {
		t.Errorf("impressions on %d UTC days, want at least 30", len(days))
	}
}

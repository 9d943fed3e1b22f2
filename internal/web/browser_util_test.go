package web

import (
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"testing"
	"time"

	"kinword/internal/doc"
	"kinword/internal/store"
)

// chromiumPath is where the CI image (and Debian's chromium package)
// installs the browser.
const chromiumPath = "/usr/bin/chromium"

// browserCorpus is 22 invented documents built so that a search for "valve"
// is certain to offer suggestions and accepting any of them changes the
// result list:
//
//   - four "valve" documents (v1-v4) use, besides words every document
//     shares, only hydrant, flushing and chamber;
//   - each of those three words is in exactly two valve documents and two
//     other documents (n1-n5), so its document frequency is 4 of 22: inside
//     the suggestion filters' defaults (MinDF 2, MaxDFShare 0.2) and in half
//     of the feedback documents;
//   - words all documents share (tarnwick, crew, record, note) are too
//     common to be offered, and title numbers are never offered;
//   - thirteen fillers (f01-f13) about meters make up the collection size.
//
// Accepting any offered term therefore adds its two non-valve documents,
// which the plain "valve" search does not return.
func browserCorpus() []doc.Document {
	type d struct{ id, title, body string }
	ds := []d{
		{"v1", "Note 01 valve and hydrant", "Tarnwick crews recorded the valve beside the hydrant."},
		{"v2", "Note 02 valve, hydrant and flushing", "Tarnwick crews recorded the valve, the hydrant and the flushing."},
		{"v3", "Note 03 valve flushing in the chamber", "Tarnwick crews recorded valve flushing in the chamber."},
		{"v4", "Note 04 valve chamber", "Tarnwick crews recorded the valve chamber."},
		{"n1", "Note 05 hydrant", "Tarnwick crews recorded the hydrant."},
		{"n2", "Note 06 hydrant flushing", "Tarnwick crews recorded hydrant flushing."},
		{"n3", "Note 07 flushing", "Tarnwick crews recorded the flushing."},
		{"n4", "Note 08 chamber", "Tarnwick crews recorded the chamber."},
		{"n5", "Note 09 chamber lid", "Tarnwick crews recorded the chamber."},
	}
	for i := 1; i <= 13; i++ {
		ds = append(ds, d{fmt.Sprintf("f%02d", i), fmt.Sprintf("Note %02d meter reading", 9+i),
			"Tarnwick crews recorded the meter reading for billing."})
	}
	out := make([]doc.Document, len(ds))
	for i, x := range ds {
		out[i] = doc.Document{ID: x.id, Title: x.title, Body: x.body, Department: "field-operations"}
	}
	return out
}

// browserFixture is a real HTTP server over browserCorpus with an SQLite
// event store in a temporary directory.
type browserFixture struct {
	srv   *httptest.Server
	store *store.Store
}

func newBrowserFixture(t *testing.T) *browserFixture {
	t.Helper()
	ctx := context.Background()
	dir := t.TempDir()
	f := indexFinder(t, dir, browserCorpus())
	st, err := store.Open(ctx, "sqlite:"+filepath.Join(dir, "events.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	s, err := New(f, Options{Events: st})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(s.Handler())
	t.Cleanup(srv.Close)
	return &browserFixture{srv: srv, store: st}
}

// suggestedTerms asks the API (not the page) which suggestions "q" gets,
// mapping each chip's display text to its term key.
func (fx *browserFixture) suggestedTerms(t *testing.T, q string) map[string]string {
	t.Helper()
	resp, err := http.Get(fx.srv.URL + "/api/v1/lookup?q=" + url.QueryEscape(q))
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	var body struct {
		Suggestions []struct{ Term, Display string } `json:"suggestions"`
	}
	if err := json.NewDecoder(resp.Body).Decode(&body); err != nil {
		t.Fatal(err)
	}
	out := map[string]string{}
	for _, s := range body.Suggestions {
		out[s.Display] = s.Term
	}
	return out
}

// events returns every stored event, in commit order.
func (fx *browserFixture) events(ctx context.Context) ([]store.Event, error) {
	var out []store.Event
	err := fx.store.Events(ctx, time.Time{}, func(e store.Event) error {
		out = append(out, e)
		return nil
	})
	return out, err
}

// waitEvent polls the store until match finds an event or the bound ends.
func (fx *browserFixture) waitEvent(ctx context.Context, t *testing.T, within time.Duration, what string, match func([]store.Event) (store.Event, bool)) store.Event {
	t.Helper()
	deadline := time.Now().Add(within)
	for {
		evs, err := fx.events(ctx)
		if err != nil {
			t.Fatalf("reading events: %v", err)
		}
		if e, ok := match(evs); ok {
			return e
		}
		if time.Now().After(deadline) {
			t.Fatalf("no %s stored within %s; events: %+v", what, within, evs)
		}
		time.Sleep(50 * time.Millisecond)
	}
}

// screenshotTo writes png to the path in KINWORD_SCREENSHOT, if set.
func screenshotTo(t *testing.T, png []byte) {
	t.Helper()
	path := os.Getenv("KINWORD_SCREENSHOT")
	if path == "" {
		return
	}
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Errorf("writing screenshot: %v", err)
		return
	}
	t.Logf("screenshot written to %s (%d bytes)", path, len(png))
}

// jsString quotes s as a JavaScript string literal.
func jsString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

// jsonText is v as JSON text.
func jsonText(v any) string {
	b, _ := json.Marshal(v)
	return string(b)
}

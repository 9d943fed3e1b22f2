package web

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"kinword/internal/store"
)

// newSignalServer is newTestServer's corpus with sink as the event sink.
func newSignalServer(t *testing.T, sink EventSink) *Server {
	t.Helper()
	s, err := New(indexFinder(t, t.TempDir(), testDocs[:3]), Options{Events: sink})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// fakeSink records batches, or fails every Append with err.
type fakeSink struct {
	mu      sync.Mutex
	batches [][]store.Event
	err     error
	retry   time.Duration // RetryAfter; 0 = not advised
	depth   atomic.Int64
}

func (f *fakeSink) Append(_ context.Context, b []store.Event) error {
	f.mu.Lock()
	defer f.mu.Unlock()
	if f.err != nil {
		return f.err
	}
	f.batches = append(f.batches, b)
	return nil
}

func (f *fakeSink) RetryAfter() time.Duration { return f.retry }
func (f *fakeSink) QueueDepth() int           { return int(f.depth.Load()) }

func postBody(s *Server, body []byte) *httptest.ResponseRecorder {
	req := httptest.NewRequest(http.MethodPost, "/api/v1/signals", bytes.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	rec := httptest.NewRecorder()
	s.Handler().ServeHTTP(rec, req)
	return rec
}

// errorCode returns the code of the API's error shape, or fails.
func errorCode(t *testing.T, rec *httptest.ResponseRecorder) string {
	t.Helper()
	var e struct {
		Error struct {
			Code    string `json:"code"`
			Message string `json:"message"`
		} `json:"error"`
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &e); err != nil || e.Error.Code == "" || e.Error.Message == "" {
		t.Fatalf("status %d: body %q is not the error shape", rec.Code, rec.Body.String())
	}
	return e.Error.Code
}

const okEvent = `{"id":"e1","impression":"i1","kind":"impression","query":"valve","terms":["main"]}`

func manyEvents(n int) string {
	ev := make([]string, n)
	for i := range ev {
		ev[i] = fmt.Sprintf(`{"id":"e%d","impression":"i%d","kind":"impression","terms":["main"]}`, i, i)
	}
	return `{"events":[` + strings.Join(ev, ",") + `]}`
}

// TestSignalBadInput posts bodies the route must refuse before the store
// sees them. Limits: store.MaxBatch events (1000) and 1 MiB per body,
// both documented in static/openapi.json. JSON grammar per RFC 8259
// (section 6: numbers; section 8.1: UTF-8); an out-of-range integer is a
// decoding error in encoding/json (common practice: refuse, not clamp).
// The sink is a real SQLite store, so its validation (negative position)
// answers too, and the check that nothing was stored is real.
func TestSignalBadInput(t *testing.T) {
	st, err := store.Open(context.Background(), "sqlite:"+filepath.Join(t.TempDir(), "events.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	s := newSignalServer(t, st)
	for _, c := range []struct {
		name   string
		body   string
		status int
		code   string
	}{
		{"malformed JSON", `{"events":[` + okEvent, 400, "malformed_json"},
		{"trailing data", `{"events":[` + okEvent + `]} {}`, 400, "malformed_json"},
		{"not an object", `[1,2]`, 400, "malformed_json"},
		{"unknown top-level field", `{"events":[` + okEvent + `],"user":"x"}`, 400, "malformed_json"},
		{"unknown event field", `{"events":[{"id":"e1","impression":"i1","kind":"impression","email":"x"}]}`, 400, "malformed_json"},
		{"invalid UTF-8 in a string", "{\"events\":[{\"id\":\"e\xff\",\"impression\":\"i1\",\"kind\":\"impression\"}]}", 400, "invalid_utf8"},
		{"huge integer", `{"events":[{"id":"e1","impression":"i1","kind":"accept","term":"t","position":99999999999999999999}]}`, 400, "malformed_json"},
		{"huge exponent", `{"events":[{"id":"e1","impression":"i1","kind":"accept","term":"t","position":1e99}]}`, 400, "malformed_json"},
		{"fraction for an integer", `{"events":[{"id":"e1","impression":"i1","kind":"click","doc":"a","rank":1.5}]}`, 400, "malformed_json"},
		{"negative position", `{"events":[{"id":"e1","impression":"i1","kind":"accept","term":"t","position":-1}]}`, 400, "invalid_event"},
		{"no events", `{"events":[]}`, 400, "batch_size"},
		{"events missing", `{}`, 400, "batch_size"},
		{"one event over the limit", manyEvents(store.MaxBatch + 1), 400, "batch_size"},
		{"body over 1 MiB", `{"events":[{"id":"` + strings.Repeat("x", 1<<20) + `"}]}`, 413, "too_large"},
	} {
		t.Run(c.name, func(t *testing.T) {
			rec := postBody(s, []byte(c.body))
			if rec.Code != c.status {
				t.Fatalf("status %d, want %d: %s", rec.Code, c.status, rec.Body.String())
			}
			if code := errorCode(t, rec); code != c.code {
				t.Errorf("code %q, want %q", code, c.code)
			}
		})
	}
	if n, err := st.Count(context.Background()); err != nil || n != 0 {
		t.Errorf("%d events stored from refused bodies (%v)", n, err)
	}
	// The limit itself is accepted.
	if rec := postBody(s, []byte(manyEvents(store.MaxBatch))); rec.Code != http.StatusAccepted {
		t.Errorf("batch of %d events: %d %s", store.MaxBatch, rec.Code, rec.Body.String())
	}
}

// TestSignalStoreErrors maps each store sentinel to its answer: 503 with
// Retry-After for ErrUnavailable (RFC 9110, sections 15.6.4 and 10.2.3:
// Retry-After as delay-seconds), 400/409/422 for rejections, and nothing
// acknowledged for any of them.
func TestSignalStoreErrors(t *testing.T) {
	body := []byte(`{"events":[` + okEvent + `]}`)
	for _, c := range []struct {
		name   string
		err    error
		retry  time.Duration
		status int
		code   string
		after  string
	}{
		{"unavailable, default retry", fmt.Errorf("store: append: %w: boom", store.ErrUnavailable), 0, 503, "store_unavailable", "5"},
		{"unavailable, advised retry", fmt.Errorf("store: append: %w: boom", store.ErrUnavailable), 12 * time.Second, 503, "store_unavailable", "12"},
		{"unavailable, sub-second retry rounds up", fmt.Errorf("store: append: %w: boom", store.ErrUnavailable), 300 * time.Millisecond, 503, "store_unavailable", "1"},
		{"caller gave up", fmt.Errorf("store: append: %w", context.Canceled), 0, 503, "store_unavailable", "5"},
		{"invalid", fmt.Errorf("store: append: %w: event 0", store.ErrInvalid), 0, 400, "invalid_event", ""},
		{"replay", fmt.Errorf("store: append: %w: event 0", store.ErrReplay), 0, 409, "replayed_event", ""},
		{"unknown impression", fmt.Errorf("store: append: %w: event 0", store.ErrUnknownImpression), 0, 422, "unknown_impression", ""},
		{"other", errors.New("surprise"), 0, 500, "internal", ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := newSignalServer(t, &fakeSink{err: c.err, retry: c.retry})
			rec := postBody(s, body)
			if rec.Code != c.status {
				t.Fatalf("status %d, want %d: %s", rec.Code, c.status, rec.Body.String())
			}
			if code := errorCode(t, rec); code != c.code {
				t.Errorf("code %q, want %q", code, c.code)
			}
			if got := rec.Header().Get("Retry-After"); got != c.after {
				t.Errorf("Retry-After %q, want %q", got, c.after)
			}
		})
	}
}

// TestQueueDepthMetric checks that /metrics reads the sink's queue depth
// at each scrape and that the store-error series exist by kind.
func TestQueueDepthMetric(t *testing.T) {
	sink := &fakeSink{}
	s := newSignalServer(t, sink)
	for _, depth := range []int64{0, 7, 2} {
		sink.depth.Store(depth)
		body := get(t, s, "/metrics", nil).Body.String()
		if want := fmt.Sprintf("kinword_event_queue_depth %d\n", depth); !strings.Contains(body, want) {
			t.Fatalf("metrics lack %q", want)
		}
		for _, k := range []string{"connection", "disk_full", "read_only", "internal"} {
			if !strings.Contains(body, `kinword_store_errors_total{kind="`+k+`"}`) {
				t.Errorf("metrics lack kinword_store_errors_total{kind=%q}", k)
			}
		}
	}
}

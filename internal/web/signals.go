package web

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"net/http"
	"strconv"
	"strings"
	"time"

	"github.com/gin-gonic/gin"

	"kinword/internal/access"
	"kinword/internal/store"
)

// EventSink is where interaction events go; *store.Store satisfies it.
type EventSink interface {
	Append(ctx context.Context, batch []store.Event) error
}

// maxBody bounds a request body (bytes).
const maxBody = 1 << 20

// defaultRetryAfter is what a 503 from the signals route advises when the
// sink gives no RetryAfter.
const defaultRetryAfter = 5 * time.Second

// RetryAdvisor may be implemented by an EventSink (*store.Store does, from
// store.Options.RetryAfter) to choose the Retry-After of the signals
// route's 503; without it the route advises 5 s.
type RetryAdvisor interface {
	RetryAfter() time.Duration
}

// QueueDepther may be implemented by an EventSink (*store.Store does) to
// report how many batches wait for its writer; /metrics shows it as
// kinword_event_queue_depth.
type QueueDepther interface {
	QueueDepth() int
}

// signalIn is one event as the page sends it. The server adds the time,
// the session, the department and the groups' hash itself.
type signalIn struct {
	ID         string   `json:"id"`
	Impression string   `json:"impression"`
	Kind       string   `json:"kind"`
	Query      string   `json:"query"`
	Term       string   `json:"term"`
	Position   int      `json:"position"`
	Doc        string   `json:"doc"`
	Rank       int      `json:"rank"`
	Terms      []string `json:"terms"`
	Sources    []string `json:"sources"`
}

type signalsIn struct {
	Events []signalIn `json:"events"`
}

// signals records a batch of interaction events and answers 202 only once
// they are durably committed.
func (s *Server) signals(c *gin.Context) {
	if s.opts.Events == nil {
		apiError(c, http.StatusServiceUnavailable, "no_store", "this server records no events")
		return
	}
	// readJSONBody refuses invalid UTF-8, which encoding/json would
	// silently turn into U+FFFD, storing something the client did not send
	// (RFC 8259, section 8.1: JSON text exchanged between systems is UTF-8).
	body, ok := readJSONBody(c)
	if !ok {
		return
	}
	var in signalsIn
	if !decodeStrict(c, body, &in) {
		return
	}
	if len(in.Events) == 0 || len(in.Events) > store.MaxBatch {
		apiError(c, http.StatusBadRequest, "batch_size", fmt.Sprintf("a batch holds 1 to %d events; this one has %d", store.MaxBatch, len(in.Events)))
		return
	}
	v := s.viewer(c)
	sess := s.session(c)
	now := time.Now().UTC()
	batch := make([]store.Event, len(in.Events))
	for i, e := range in.Events {
		batch[i] = store.Event{ID: e.ID, Impression: e.Impression, Kind: e.Kind, Time: now, Session: sess,
			Department: v.Department, GroupsHash: groupsHash(v), Query: s.f.CanonicalQuery(e.Query), Term: e.Term, Position: e.Position,
			Doc: e.Doc, Rank: e.Rank, Terms: e.Terms, Sources: e.Sources}
	}
	err := s.opts.Events.Append(c.Request.Context(), batch)
	switch {
	case err == nil:
		for _, e := range batch {
			s.metrics.events.WithLabelValues(e.Kind).Inc()
		}
		c.JSON(http.StatusAccepted, gin.H{"accepted": len(batch)})
	case errors.Is(err, store.ErrInvalid):
		apiError(c, http.StatusBadRequest, "invalid_event", err.Error())
	case errors.Is(err, store.ErrReplay):
		apiError(c, http.StatusConflict, "replayed_event", err.Error())
	case errors.Is(err, store.ErrUnknownImpression):
		apiError(c, http.StatusUnprocessableEntity, "unknown_impression", err.Error())
	case errors.Is(err, store.ErrUnavailable):
		kind := store.FailureKind(err)
		s.metrics.storeErrors.WithLabelValues(kind).Inc()
		s.opts.Log.Warn("signals: store unavailable; answered 503", "kind", kind, "events", len(batch), "err", err)
		c.Header("Retry-After", s.retryAfter())
		apiError(c, http.StatusServiceUnavailable, "store_unavailable", "events are not being recorded right now; retry later with the same ids (409 then means they were recorded)")
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		// The client went away (or its deadline passed) before the commit
		// answered; the batch may still commit, and a retry with the same
		// ids is answered 409.
		s.metrics.storeErrors.WithLabelValues(store.FailTimeout).Inc()
		c.Header("Retry-After", s.retryAfter())
		apiError(c, http.StatusServiceUnavailable, "store_unavailable", "the commit did not answer in time; retry with the same ids")
	default:
		s.metrics.storeErrors.WithLabelValues("internal").Inc()
		s.opts.Log.Error("signals", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the events were not recorded")
	}
}

// retryAfter is the Retry-After value (whole seconds, at least 1) of the
// signals route's 503 (RFC 9110, section 10.2.3: delay-seconds).
func (s *Server) retryAfter() string {
	d := defaultRetryAfter
	if ra, ok := s.opts.Events.(RetryAdvisor); ok && ra.RetryAfter() > 0 {
		d = ra.RetryAfter()
	}
	return strconv.Itoa(max(1, int(math.Ceil(d.Seconds()))))
}

// session returns the visitor's random session id, which rotates daily; it
// is the only visitor identifier Kinword keeps.
func (s *Server) session(c *gin.Context) string {
	day := time.Now().UTC().Format("20060102")
	if v, err := c.Cookie("kw_session"); err == nil && strings.HasPrefix(v, day+".") && len(v) == len(day)+1+32 {
		return v
	}
	var b [16]byte
	_, _ = rand.Read(b[:])
	v := day + "." + hex.EncodeToString(b[:])
	c.SetSameSite(http.SameSiteStrictMode)
	c.SetCookie("kw_session", v, 86400, "/", "", false, true)
	return v
}

// groupsHash identifies a group set without storing the groups.
func groupsHash(v access.Viewer) string {
	if len(v.Groups) == 0 {
		return ""
	}
	sum := sha256.Sum256([]byte(strings.Join(v.Groups, ",")))
	return hex.EncodeToString(sum[:8])
}

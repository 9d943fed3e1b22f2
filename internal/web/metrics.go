package web

import (
	"strconv"
	"time"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"
	"github.com/prometheus/client_golang/prometheus/promhttp"

	"kinword/internal/store"
)

// metrics are the server's Prometheus series.
type metrics struct {
	reg         *prometheus.Registry
	requests    *prometheus.CounterVec
	latency     *prometheus.HistogramVec
	impressions prometheus.Counter
	accepted    prometheus.Counter
	events      *prometheus.CounterVec
	storeErrors *prometheus.CounterVec
	reloads     *prometheus.CounterVec
	queueDepth  prometheus.Gauge
	rateLimited prometheus.Counter
}

func newMetrics(reg *prometheus.Registry) *metrics {
	m := &metrics{reg: reg,
		requests: prometheus.NewCounterVec(prometheus.CounterOpts{Name: "kinword_http_requests_total", Help: "HTTP requests by route and status."}, []string{"route", "status"}),
		latency: prometheus.NewHistogramVec(prometheus.HistogramOpts{Name: "kinword_http_request_seconds", Help: "HTTP request latency by route.",
			Buckets: []float64{.0005, .001, .0025, .005, .01, .025, .05, .1, .25, .5, 1, 2.5}}, []string{"route"}),
		impressions: prometheus.NewCounter(prometheus.CounterOpts{Name: "kinword_suggestion_impressions_total", Help: "Suggested terms shown."}),
		accepted:    prometheus.NewCounter(prometheus.CounterOpts{Name: "kinword_suggestion_accepts_total", Help: "Accepted terms searched with."}),
		events:      prometheus.NewCounterVec(prometheus.CounterOpts{Name: "kinword_events_total", Help: "Interaction events committed, by kind."}, []string{"kind"}),
		storeErrors: prometheus.NewCounterVec(prometheus.CounterOpts{Name: "kinword_store_errors_total", Help: "Event batches the store could not commit, by kind of failure (store.FailureKind, or internal)."}, []string{"kind"}),
		reloads:     prometheus.NewCounterVec(prometheus.CounterOpts{Name: "kinword_reload_total", Help: "Reloads of the index snapshot and association table (route or SIGHUP), by result."}, []string{"result"}),
		rateLimited: prometheus.NewCounter(prometheus.CounterOpts{Name: "kinword_rate_limited_total", Help: "Requests refused with 429 because the client's rate limit bucket was empty."}),
	}
	for _, r := range []string{"ok", "failed"} {
		m.reloads.WithLabelValues(r) // both series exist from the start, at 0
	}
	for _, k := range append([]string{"internal"}, store.FailureKinds...) {
		m.storeErrors.WithLabelValues(k) // every kind exists from the start, at 0
	}
	m.queueDepth = prometheus.NewGauge(prometheus.GaugeOpts{Name: "kinword_event_queue_depth",
		Help: "Event batches waiting for the store's group-commit writer (read at each scrape)."})
	reg.MustRegister(m.requests, m.latency, m.impressions, m.accepted, m.events, m.storeErrors, m.reloads, m.rateLimited, prometheus.NewGoCollector(), prometheus.NewProcessCollector(prometheus.ProcessCollectorOpts{}))
	reg.MustRegister(m.queueDepth)
	return m
}

// observe counts and times every request by its route pattern.
func (s *Server) observe() gin.HandlerFunc {
	return func(c *gin.Context) {
		start := time.Now()
		c.Next()
		route := c.FullPath()
		if route == "" {
			route = "unmatched"
		}
		s.metrics.requests.WithLabelValues(route, strconv.Itoa(c.Writer.Status())).Inc()
		s.metrics.latency.WithLabelValues(route).Observe(time.Since(start).Seconds())
	}
}

func (s *Server) metricsHandler(c *gin.Context) {
	if q, ok := s.opts.Events.(QueueDepther); ok {
		s.metrics.queueDepth.Set(float64(q.QueueDepth()))
	}
	promhttp.HandlerFor(s.metrics.reg, promhttp.HandlerOpts{}).ServeHTTP(c.Writer, c.Request)
}

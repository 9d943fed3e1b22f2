// Package web is Kinword's HTTP layer: one route table, one file per
// resource, handlers that bind, call the finder, and render JSON or the
// embedded page. It is the only package that imports gin; it must not
// import bleve or database drivers.
package web

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"log/slog"
	"math"
	"net"
	"net/http"
	"time"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"

	"kinword/internal/finder"
	"kinword/internal/text"
	"kinword/static"
)

// Options configure the server.
type Options struct {
	// Addr is the listen address; default 127.0.0.1:7410.
	Addr string
	// Identity says how requests are mapped to viewers.
	Identity Identity
	// Demo lets a visitor pick a department persona (kinword demo only);
	// the page says so. DEMO ONLY: it also grants admin to callers from
	// the loopback address that send no token, so the demo's librarian and
	// admin pages work without setup (see authorize). Never set it for a
	// real deployment.
	Demo bool
	// Personas are the departments offered in demo mode.
	Personas []Persona
	// AllowedOrigins may call the API from other pages (CORS), for the
	// embeddable widget; empty means same origin only.
	AllowedOrigins []string
	// Events records interaction events; nil means the server records none
	// (the signals route answers 503).
	Events EventSink
	// Tokens are the API tokens for the librarian and admin routes, kept as
	// SHA-256 hashes; none means those routes answer 401 (outside demo
	// mode).
	Tokens []Token
	// Rules is the librarian rule store behind the /api/v1/rules routes;
	// nil means those routes answer 503.
	Rules RuleBook
	// Reviewer builds the admin review behind the /api/v1/review routes;
	// nil means those routes answer 503.
	Reviewer Reviewer
	// Trials runs and keeps the admin's offline trials of proposed changes
	// behind the /api/v1/trials routes; nil means those routes answer 503.
	Trials TrialKeeper
	// Departments are the department ids rules may name; empty accepts
	// any.
	Departments []string
	// Pipeline analyses rule terms for validation and preview; nil means
	// an English pipeline. Set it to the index's pipeline.
	Pipeline *text.Pipeline
	// Readers limits what the librarian's and admin's desks show to the
	// terms and queries the caller may read, shown as words; nil shows
	// every key as it is (tests).
	Readers Readers
	// RulesChanged, when set, is called after every successful rule
	// change, before the answer is sent, so the server can apply the
	// change at once instead of at its next refresh; keep it short (one
	// store read and a compile).
	RulesChanged func()
	// RateLimit bounds each client's request rate (429 with Retry-After);
	// the zero value turns it off. See RateLimit for who a client is.
	RateLimit RateLimit
	// MaxBodyBytes bounds every request body (bytes; 413 beyond it),
	// checked before any handler reads; default and most 1 MiB, the most
	// a handler reads.
	MaxBodyBytes int64
	// MaxQueryBytes bounds q of /api/v1/lookup and /api/v1/hints (bytes;
	// 400 beyond it); default 512. Set it to the finder's query limit.
	MaxQueryBytes int
	// JSONRoutes are the routes ("METHOD /pattern" of the route table)
	// whose non-empty bodies must be application/json (415 otherwise); nil
	// means DefaultJSONRoutes(), an empty non-nil list none.
	JSONRoutes []string
	// ShutdownGrace bounds the drain of in-flight requests; default 10 s.
	ShutdownGrace time.Duration
	// Log receives request errors and lifecycle lines; default slog.Default().
	Log *slog.Logger
}

// Persona is a demo department with its groups.
type Persona struct {
	Department string   `json:"department"`
	Label      string   `json:"label"`
	Groups     []string `json:"groups,omitempty"`
}

// Server serves the API and the page.
type Server struct {
	f        *finder.Finder
	docs     Documents
	reloader Reloader
	tokens   *tokenSet
	opts     Options
	engine   *gin.Engine
	metrics  *metrics
	assets   fs.FS
}

// New builds a server; it fails if an embedded asset is missing.
func New(f *finder.Finder, opts Options) (*Server, error) {
	if opts.Addr == "" {
		opts.Addr = "127.0.0.1:7410"
	}
	if opts.ShutdownGrace <= 0 {
		opts.ShutdownGrace = 10 * time.Second
	}
	if opts.Log == nil {
		opts.Log = slog.Default()
	}
	if opts.MaxBodyBytes <= 0 || opts.MaxBodyBytes > defaultMaxBody {
		opts.MaxBodyBytes = defaultMaxBody
	}
	if opts.MaxQueryBytes <= 0 {
		opts.MaxQueryBytes = defaultMaxQueryBytes
	}
	if r := opts.RateLimit.PerSecond; !(r >= 0) || math.IsInf(r, 0) {
		return nil, fmt.Errorf("web: rate limit %v requests per second is not a finite number >= 0", r)
	}
	for _, o := range opts.AllowedOrigins {
		if err := validOrigin(o); err != nil {
			return nil, err
		}
	}
	for _, a := range requiredAssets {
		if _, err := fs.Stat(static.FS, a); err != nil {
			return nil, fmt.Errorf("web: missing embedded asset %s: %w", a, err)
		}
	}
	tokens, err := newTokenSet(opts.Tokens)
	if err != nil {
		return nil, err
	}
	gin.SetMode(gin.ReleaseMode)
	s := &Server{f: f, docs: f, reloader: f, tokens: tokens, opts: opts, engine: gin.New(), metrics: newMetrics(prometheus.NewRegistry()), assets: static.FS}
	jsonRoutes, err := s.jsonRouteSet()
	if err != nil {
		return nil, err
	}
	var lim *limiter
	if opts.RateLimit.PerSecond > 0 {
		lim = newLimiter(opts.RateLimit)
	}
	s.engine.Use(s.securityHeaders(), s.cors(), s.observe(), s.logRequests(), s.recoverPanics(),
		s.rateLimit(lim), s.sameOrigin(), s.limitBody(), s.requireJSON(jsonRoutes))
	for _, r := range s.routes() {
		if r.Role.rank() < 0 {
			return nil, fmt.Errorf("web: route %s %s has unknown role %q", r.Method, r.Path, r.Role)
		}
		s.engine.Handle(r.Method, r.Path, s.authorize(r.Role), r.Handler)
	}
	s.engine.NoRoute(func(c *gin.Context) { apiError(c, http.StatusNotFound, "not_found", "no such route") })
	return s, nil
}

// Handler returns the HTTP handler (for tests).
func (s *Server) Handler() http.Handler { return s.engine }

// Run listens until ctx ends, then drains in-flight requests.
func (s *Server) Run(ctx context.Context, ready func(addr string)) error {
	ln, err := net.Listen("tcp", s.opts.Addr)
	if err != nil {
		return fmt.Errorf("web: listen: %w", err)
	}
	srv := &http.Server{Handler: s.engine, ReadHeaderTimeout: 10 * time.Second, ReadTimeout: 30 * time.Second, WriteTimeout: 30 * time.Second}
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	if ready != nil {
		ready(ln.Addr().String())
	}
	select {
	case err := <-errc:
		return fmt.Errorf("web: serve: %w", err)
	case <-ctx.Done():
	}
	sctx, cancel := context.WithTimeout(context.WithoutCancel(ctx), s.opts.ShutdownGrace)
	defer cancel()
	if err := srv.Shutdown(sctx); err != nil && !errors.Is(err, http.ErrServerClosed) {
		return fmt.Errorf("web: shutdown: %w", err)
	}
	return nil
}

// apiError renders the one error shape of the API.
func apiError(c *gin.Context, status int, code, msg string) {
	c.AbortWithStatusJSON(status, gin.H{"error": gin.H{"code": code, "message": msg}})
}

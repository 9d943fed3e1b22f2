package web

import (
	"fmt"
	"math"
	"net"
	"net/http"
	"net/netip"
	"strconv"
	"strings"
	"sync"
	"time"

	"github.com/gin-gonic/gin"
	"golang.org/x/time/rate"
)

// RateLimit bounds how fast one client may call the server: a token
// bucket per client (golang.org/x/time/rate), refilled at PerSecond up to
// Burst; a request finding the bucket empty answers 429 Too Many Requests
// with Retry-After (RFC 6585 section 4). The health and metrics routes
// (/healthz, /readyz, /metrics) are never limited, so probes and scrapes
// keep working under load.
//
// The client is the trusted proxy's forwarded client address when the
// proxy is trusted (the request carries the shared secret, or comes from
// loopback with Identity.TrustLoopback): the rightmost X-Forwarded-For
// entry, the one the proxy itself added. Otherwise, and when that entry is
// not an IP address, it is the connection's remote host: a client cannot
// pick its own bucket by sending X-Forwarded-For. IPv6 clients are
// grouped by their /64 prefix, the usual size of one site's network
// (common practice).
//
// A request from loopback without a trusted forwarded address is not
// limited unless LimitLoopback is set: it comes from a proxy on the same
// machine, whose users cannot be told apart (one bucket would throttle
// them all; trust the proxy, or limit at the proxy), or from the
// operator's own tools.
type RateLimit struct {
	// PerSecond is the bucket's refill rate (requests per second); 0, the
	// zero value, turns limiting off. kinword serve sets it from
	// server.rate_per_second (default 50).
	PerSecond float64
	// Burst is the bucket's size (requests); default twice PerSecond,
	// at least 1.
	Burst int
	// MaxClients bounds the buckets kept (memory); default 10000. Buckets
	// that have refilled completely are dropped first (forgetting them
	// changes nothing); when every bucket is still in use, an arbitrary one
	// is dropped, which only gives that client a fresh bucket.
	MaxClients int
	// LimitLoopback limits loopback clients too (one bucket for all of
	// them); default false.
	LimitLoopback bool

	now func() time.Time // the clock; time.Now when nil (tests set it)
}

func (r RateLimit) resolved() RateLimit {
	if r.Burst <= 0 {
		r.Burst = max(1, int(math.Ceil(2*r.PerSecond)))
	}
	if r.MaxClients <= 0 {
		r.MaxClients = 10000
	}
	return r
}

// unlimitedRoutes are never rate limited.
var unlimitedRoutes = map[string]bool{"/healthz": true, "/readyz": true, "/metrics": true}

// sweepEvery is how often, at most, full buckets are looked for.
const sweepEvery = time.Second

// limiter holds the buckets by client key.
type limiter struct {
	cfg       RateLimit
	now       func() time.Time
	mu        sync.Mutex
	buckets   map[string]*rate.Limiter
	lastSweep time.Time
}

func newLimiter(cfg RateLimit) *limiter {
	l := &limiter{cfg: cfg.resolved(), now: cfg.now, buckets: map[string]*rate.Limiter{}}
	if l.now == nil {
		l.now = time.Now
	}
	return l
}

// allow takes one token from key's bucket; when there is none it returns
// false and the wait until there is one.
func (l *limiter) allow(key string) (bool, time.Duration) {
	l.mu.Lock()
	defer l.mu.Unlock()
	now := l.now()
	b := l.buckets[key]
	if b == nil {
		l.makeRoom(now)
		b = rate.NewLimiter(rate.Limit(l.cfg.PerSecond), l.cfg.Burst)
		l.buckets[key] = b
	}
	if b.AllowN(now, 1) {
		return true, 0
	}
	missing := 1 - b.TokensAt(now)
	return false, time.Duration(math.Ceil(missing / l.cfg.PerSecond * float64(time.Second)))
}

// makeRoom keeps the number of buckets under MaxClients; l.mu is held.
func (l *limiter) makeRoom(now time.Time) {
	if len(l.buckets) < l.cfg.MaxClients {
		return
	}
	if now.Sub(l.lastSweep) >= sweepEvery || now.Before(l.lastSweep) {
		l.lastSweep = now
		for k, b := range l.buckets {
			if b.TokensAt(now) >= float64(l.cfg.Burst) {
				delete(l.buckets, k)
			}
		}
	}
	for k := range l.buckets {
		if len(l.buckets) < l.cfg.MaxClients {
			break
		}
		delete(l.buckets, k)
	}
}

// size is the number of buckets held.
func (l *limiter) size() int {
	l.mu.Lock()
	defer l.mu.Unlock()
	return len(l.buckets)
}

// clientKey names the client whose bucket a request draws from; exempt
// is true for a loopback client that is not limited (see RateLimit).
func (s *Server) clientKey(c *gin.Context, limitLoopback bool) (key string, exempt bool) {
	host := c.Request.RemoteAddr
	if h, _, err := net.SplitHostPort(host); err == nil {
		host = h
	}
	addr, err := netip.ParseAddr(host)
	forwarded := false
	if s.trusted(c, s.opts.Identity.resolved()) {
		if fwd, ok := forwardedFor(c.Request.Header.Values("X-Forwarded-For")); ok {
			addr, err, forwarded = fwd, nil, true
		}
	}
	if err != nil {
		return "host:" + host, false
	}
	addr = addr.Unmap().WithZone("")
	if !forwarded && addr.IsLoopback() {
		return "loopback", !limitLoopback
	}
	if addr.Is6() {
		return netip.PrefixFrom(addr, 64).Masked().String(), false
	}
	return addr.String(), false
}

// forwardedFor returns the rightmost X-Forwarded-For entry, if it is an IP
// address (with or without a port).
func forwardedFor(lines []string) (netip.Addr, bool) {
	if len(lines) == 0 {
		return netip.Addr{}, false
	}
	parts := strings.Split(lines[len(lines)-1], ",")
	last := strings.TrimSpace(parts[len(parts)-1])
	if a, err := netip.ParseAddr(last); err == nil {
		return a, true
	}
	if ap, err := netip.ParseAddrPort(last); err == nil {
		return ap.Addr(), true
	}
	return netip.Addr{}, false
}

// rateLimit answers 429 with Retry-After (whole seconds, at least 1; RFC
// 9110 section 10.2.3) once a client's bucket is empty.
func (s *Server) rateLimit(l *limiter) gin.HandlerFunc {
	return func(c *gin.Context) {
		if l == nil || unlimitedRoutes[c.FullPath()] {
			c.Next()
			return
		}
		key, exempt := s.clientKey(c, l.cfg.LimitLoopback)
		if exempt {
			c.Next()
			return
		}
		ok, wait := l.allow(key)
		if ok {
			c.Next()
			return
		}
		secs := max(1, int(math.Ceil(wait.Seconds())))
		s.metrics.rateLimited.Inc()
		c.Header("Retry-After", strconv.Itoa(secs))
		apiError(c, http.StatusTooManyRequests, "rate_limited", fmt.Sprintf("too many requests from this client; try again in %d s", secs))
	}
}

package web

import (
	"fmt"
	"math"
	"net/http"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"
)

// rlClock is a settable clock for the rate limiter.
type rlClock struct {
	mu sync.Mutex
	t  time.Time
}

func newRLClock() *rlClock { return &rlClock{t: time.Date(2026, 3, 1, 9, 0, 0, 0, time.UTC)} }

func (c *rlClock) now() time.Time { c.mu.Lock(); defer c.mu.Unlock(); return c.t }

func (c *rlClock) advance(d time.Duration) { c.mu.Lock(); c.t = c.t.Add(d); c.mu.Unlock() }

// limitedServer is hardenedServer with a rate limit on a frozen clock.
func limitedServer(t *testing.T, rl RateLimit) (*Server, *rlClock) {
	t.Helper()
	clock := newRLClock()
	rl.now = clock.now
	s, _, _ := hardenedServer(t, func(o *Options) { o.RateLimit = rl })
	return s, clock
}

// rlClient is one documentation address (RFC 5737 section 3).
var rlClient = map[string]string{"RemoteAddr": "192.0.2.10:5000"}

// retryAfter checks a 429 against RFC 6585 section 4 (429 Too Many
// Requests, which may say how long to wait in Retry-After) and RFC 9110
// section 10.2.3 (Retry-After = HTTP-date / delay-seconds, delay-seconds
// = 1*DIGIT) and the API's error shape, and returns the seconds.
func retryAfter(t *testing.T, status int, h http.Header, code string) int {
	t.Helper()
	if status != http.StatusTooManyRequests || code != "rate_limited" {
		t.Fatalf("status %d code %q, want 429 rate_limited", status, code)
	}
	v := h.Get("Retry-After")
	n, err := strconv.Atoi(v)
	if err != nil || n < 1 || strings.TrimLeft(v, "0123456789") != "" {
		t.Fatalf("Retry-After %q is not delay-seconds >= 1", v)
	}
	return n
}

// TestRateLimitBurstThenRefill: a token bucket of size Burst refilled at
// PerSecond admits Burst requests at once, then one per 1/PerSecond
// seconds; each refusal is counted in kinword_rate_limited_total.
func TestRateLimitBurstThenRefill(t *testing.T) {
	s, clock := limitedServer(t, RateLimit{PerSecond: 2, Burst: 3})
	steps := []struct {
		name    string
		advance time.Duration
		want    int
		retry   int
	}{
		{"1st of the burst", 0, 200, 0},
		{"2nd of the burst", 0, 200, 0},
		{"3rd of the burst", 0, 200, 0},
		{"bucket empty: 0.5 s to the next token, rounded up", 0, 429, 1},
		{"still empty after 0.4 s", 400 * time.Millisecond, 429, 1},
		{"one token after 0.5 s", 100 * time.Millisecond, 200, 0},
		{"empty again", 0, 429, 1},
		{"after 10 s the bucket is full, not fuller: 3 more", 10 * time.Second, 200, 0},
		{"2 more", 0, 200, 0},
		{"1 more", 0, 200, 0},
		{"and no 4th", 0, 429, 1},
	}
	for _, st := range steps {
		clock.advance(st.advance)
		rec := call(t, s, http.MethodGet, "/api/v1/whoami", "", rlClient)
		if rec.Code != st.want {
			t.Fatalf("%s: status %d, want %d: %s", st.name, rec.Code, st.want, rec.Body)
		}
		if st.want == 429 {
			if got := retryAfter(t, rec.Code, rec.Header(), apiCode(rec)); got != st.retry {
				t.Fatalf("%s: Retry-After %d, want %d", st.name, got, st.retry)
			}
		}
	}
	m := call(t, s, http.MethodGet, "/metrics", "", rlClient).Body.String()
	if !strings.Contains(m, "kinword_rate_limited_total 4\n") {
		t.Errorf("metrics do not count 4 refusals:\n%s", rlMatching(m, "rate_limited"))
	}
	if !strings.Contains(m, `kinword_http_requests_total{route="/api/v1/whoami",status="429"} 4`) {
		t.Errorf("the request counter does not see the 429s:\n%s", rlMatching(m, "whoami"))
	}
}

func rlMatching(s, sub string) string {
	var out []string
	for _, l := range strings.Split(s, "\n") {
		if strings.Contains(l, sub) {
			out = append(out, l)
		}
	}
	return strings.Join(out, "\n")
}

// TestRateLimitRetryAfterValues: Retry-After is the wait for one token,
// (1 - tokens) / rate seconds, rounded up to whole seconds; the expected
// values are that arithmetic done by hand.
func TestRateLimitRetryAfterValues(t *testing.T) {
	cases := []struct {
		name   string
		rate   float64
		burst  int
		wait   time.Duration // after emptying the bucket
		expect int
	}{
		{"50/s: 20 ms, rounds up to 1", 50, 100, 0, 1},
		{"2/s: 0.5 s, rounds up to 1", 2, 1, 0, 1},
		{"one per 4 s", 0.25, 1, 0, 4},
		{"one per 4 s, 1 s later: 0.75 token missing", 0.25, 1, time.Second, 3},
		{"one per 10 s, 2.5 s later", 0.1, 2, 2500 * time.Millisecond, 8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, clock := limitedServer(t, RateLimit{PerSecond: c.rate, Burst: c.burst})
			for i := 0; i < c.burst; i++ {
				if rec := call(t, s, http.MethodGet, "/api/v1/whoami", "", rlClient); rec.Code != 200 {
					t.Fatalf("request %d of the burst: %d", i+1, rec.Code)
				}
			}
			clock.advance(c.wait)
			rec := call(t, s, http.MethodGet, "/api/v1/whoami", "", rlClient)
			if got := retryAfter(t, rec.Code, rec.Header(), apiCode(rec)); got != c.expect {
				t.Fatalf("Retry-After %d, want %d", got, c.expect)
			}
			clock.advance(time.Duration(c.expect) * time.Second)
			if rec := call(t, s, http.MethodGet, "/api/v1/whoami", "", rlClient); rec.Code != 200 {
				t.Fatalf("after waiting Retry-After: %d", rec.Code)
			}
		})
	}
}

// TestRateLimitClientKeys: who shares a bucket. With a bucket of one,
// request b after request a is refused exactly when both are the same
// client. Addresses are documentation ranges (RFC 5737, RFC 3849).
func TestRateLimitClientKeys(t *testing.T) {
	proxy := func(xff string) map[string]string {
		return map[string]string{"RemoteAddr": "192.0.2.1:443", "X-Kinword-Proxy-Secret": "s3cret", "X-Forwarded-For": xff}
	}
	cases := []struct {
		name     string
		loopback bool
		a, b     map[string]string
		same     bool
	}{
		{"same host, other port", false, rlClient, map[string]string{"RemoteAddr": "192.0.2.10:6000"}, true},
		{"other host", false, rlClient, map[string]string{"RemoteAddr": "192.0.2.11:5000"}, false},
		{"X-Forwarded-For without the proxy secret is ignored", false,
			map[string]string{"RemoteAddr": "192.0.2.10:1", "X-Forwarded-For": "198.51.100.1"},
			map[string]string{"RemoteAddr": "192.0.2.10:2", "X-Forwarded-For": "198.51.100.2"}, true},
		{"X-Forwarded-For with a wrong secret is ignored", false,
			map[string]string{"RemoteAddr": "192.0.2.10:1", "X-Forwarded-For": "198.51.100.1", "X-Kinword-Proxy-Secret": "guess"},
			map[string]string{"RemoteAddr": "192.0.2.10:2", "X-Forwarded-For": "198.51.100.2", "X-Kinword-Proxy-Secret": "guess"}, true},
		{"trusted proxy: two forwarded clients", false, proxy("198.51.100.1"), proxy("198.51.100.2"), false},
		{"trusted proxy: the same forwarded rlClient", false, proxy("198.51.100.1"), proxy("198.51.100.1"), true},
		{"trusted proxy: the rightmost entry counts, not what the rlClient wrote", false,
			proxy("203.0.113.9, 198.51.100.7"), proxy("203.0.113.8, 198.51.100.7"), true},
		{"trusted proxy: a forwarded port is not part of the rlClient", false, proxy("198.51.100.7:1111"), proxy("198.51.100.7:2222"), true},
		{"trusted proxy: not an address falls back to the proxy", false, proxy("unknown"), proxy("hidden"), true},
		{"IPv6: one /64", false, map[string]string{"RemoteAddr": "[2001:db8:1:2::a]:1"}, map[string]string{"RemoteAddr": "[2001:db8:1:2:ffff::b]:1"}, true},
		{"IPv6: another /64", false, map[string]string{"RemoteAddr": "[2001:db8:1:2::a]:1"}, map[string]string{"RemoteAddr": "[2001:db8:1:3::a]:1"}, false},
		{"IPv4-mapped IPv6 is the IPv4 rlClient", false, rlClient, map[string]string{"RemoteAddr": "[::ffff:192.0.2.10]:7"}, true},
		{"loopback is not limited by default", false, map[string]string{"RemoteAddr": "127.0.0.1:1"}, map[string]string{"RemoteAddr": "127.0.0.1:2"}, false},
		{"loopback with LimitLoopback", true, map[string]string{"RemoteAddr": "127.0.0.1:1"}, map[string]string{"RemoteAddr": "[::1]:2"}, true},
		{"trusted local proxy names its clients", false,
			map[string]string{"RemoteAddr": "127.0.0.1:1", "X-Kinword-Proxy-Secret": "s3cret", "X-Forwarded-For": "198.51.100.1"},
			map[string]string{"RemoteAddr": "127.0.0.1:2", "X-Kinword-Proxy-Secret": "s3cret", "X-Forwarded-For": "198.51.100.1"}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, _ := limitedServer(t, RateLimit{PerSecond: 1, Burst: 1, LimitLoopback: c.loopback})
			if rec := call(t, s, http.MethodGet, "/api/v1/whoami", "", c.a); rec.Code != 200 {
				t.Fatalf("first request: %d", rec.Code)
			}
			rec := call(t, s, http.MethodGet, "/api/v1/whoami", "", c.b)
			if same := rec.Code == http.StatusTooManyRequests; same != c.same {
				t.Fatalf("same bucket %v, want %v (%d)", same, c.same, rec.Code)
			}
		})
	}
}

// TestRateLimitExemptRoutes: health, readiness and metrics are never
// limited and take no tokens; every other route, public pages included,
// draws from the client's bucket.
func TestRateLimitExemptRoutes(t *testing.T) {
	s, _ := limitedServer(t, RateLimit{PerSecond: 1, Burst: 2})
	for i := 0; i < 20; i++ {
		for _, p := range []string{"/healthz", "/readyz", "/metrics"} {
			if rec := call(t, s, http.MethodGet, p, "", rlClient); rec.Code != 200 {
				t.Fatalf("GET %s #%d: %d", p, i, rec.Code)
			}
		}
	}
	for i, want := range []int{200, 200, 429} {
		path := []string{"/", "/api/v1/lookup?q=valve", "/static/app.js"}[i]
		if rec := call(t, s, http.MethodGet, path, "", rlClient); rec.Code != want {
			t.Fatalf("GET %s: %d, want %d", path, rec.Code, want)
		}
	}
}

// TestRateLimitConcurrentBurst: concurrent requests of one client on a
// frozen clock get exactly Burst admissions; a token bucket admits no
// more than its size without time passing, and the limiter loses none
// under the race detector.
func TestRateLimitConcurrentBurst(t *testing.T) {
	const burst, callers = 40, 100
	s, _ := limitedServer(t, RateLimit{PerSecond: 5, Burst: burst})
	var wg sync.WaitGroup
	codes := make(chan int, callers)
	for i := 0; i < callers; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			codes <- call(t, s, http.MethodGet, "/api/v1/whoami", "", rlClient).Code
		}()
	}
	wg.Wait()
	close(codes)
	count := map[int]int{}
	for c := range codes {
		count[c]++
	}
	if count[200] != burst || count[429] != callers-burst {
		t.Fatalf("got %v, want %d × 200 and %d × 429", count, burst, callers-burst)
	}
}

// TestRateLimitMemoryBound: the buckets never outnumber MaxClients;
// buckets that refilled completely go first, and a client still being
// limited keeps its empty bucket when room can be made that way.
func TestRateLimitMemoryBound(t *testing.T) {
	clock := newRLClock()
	l := newLimiter(RateLimit{PerSecond: 1, Burst: 2, MaxClients: 8, now: clock.now})
	for i := 0; i < 100; i++ {
		l.allow(fmt.Sprintf("198.51.100.%d", i))
		if n := l.size(); n > 8 {
			t.Fatalf("%d buckets after %d clients", n, i+1)
		}
	}
	l = newLimiter(RateLimit{PerSecond: 1, Burst: 2, MaxClients: 8, now: clock.now})
	for i := 0; i < 7; i++ {
		l.allow(fmt.Sprintf("198.51.100.%d", i)) // one token each
	}
	clock.advance(3 * time.Second) // 2 tokens refill in 2 s: those 7 are full again
	l.allow("busy")
	l.allow("busy")
	if ok, _ := l.allow("busy"); ok {
		t.Fatal("busy rlClient not limited")
	}
	if n := l.size(); n != 8 {
		t.Fatalf("%d buckets, want 8", n)
	}
	l.allow("newcomer")
	if n := l.size(); n != 2 {
		t.Fatalf("after the sweep %d buckets, want 2 (busy and newcomer)", n)
	}
	if ok, wait := l.allow("busy"); ok || wait != time.Second {
		t.Fatalf("busy rlClient: allowed %v, wait %v; its empty bucket was forgotten", ok, wait)
	}
}

// TestRateLimitOptions: the zero value is off; New refuses rates that are
// not finite numbers >= 0; Burst defaults to twice the rate.
func TestRateLimitOptions(t *testing.T) {
	s, _, _ := hardenedServer(t, nil)
	for i := 0; i < 300; i++ {
		if rec := call(t, s, http.MethodGet, "/api/v1/whoami", "", rlClient); rec.Code != 200 {
			t.Fatalf("request %d with limiting off: %d", i, rec.Code)
		}
	}
	for _, bad := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, err := New(nil, Options{RateLimit: RateLimit{PerSecond: bad}}); err == nil || !strings.HasPrefix(err.Error(), "web: rate limit") {
			t.Errorf("rate %v: %v", bad, err)
		}
	}
	cases := []struct {
		rate  float64
		burst int
	}{{50, 100}, {0.2, 1}, {2.5, 5}, {3.3, 7}}
	for _, c := range cases {
		if got := (RateLimit{PerSecond: c.rate}).resolved().Burst; got != c.burst {
			t.Errorf("rate %v: burst %d, want %d", c.rate, got, c.burst)
		}
	}
}

// BenchmarkRateLimit is the limiter's cost per request over 1000 clients.
func BenchmarkRateLimit(b *testing.B) {
	l := newLimiter(RateLimit{PerSecond: 50, Burst: 100})
	keys := make([]string, 1000)
	for i := range keys {
		keys[i] = fmt.Sprintf("198.51.%d.%d", i/256, i%256)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		l.allow(keys[i%len(keys)])
	}
}

package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math/rand/v2"
	"net/http"
	"net/url"
	"os"
	"sort"
	"strings"
	"sync"
	"time"
)

func init() {
	register(&command{name: "bench", summary: "drive a running server over loopback with a bounded load and report requests/s and latency percentiles",
		usage: "--url URL [--clients N] [--duration D] [--requests MAX] [--queries FILE] [--mix lookup=8,hints=1,signals=1] [--json]", run: runBench})
}

// benchResult is what one run measured.
type benchResult struct {
	Requests int            `json:"requests"`
	Seconds  float64        `json:"seconds"`
	RPS      float64        `json:"rps"`
	P50      float64        `json:"p50_ms"`
	P95      float64        `json:"p95_ms"`
	P99      float64        `json:"p99_ms"`
	Max      float64        `json:"max_ms"`
	Errors   map[string]int `json:"errors"`
	ByKind   map[string]int `json:"by_kind"`
	Events   int            `json:"events"`
}

func runBench(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("bench", e.stderr)
	base := fs.String("url", "", "server base URL, e.g. http://127.0.0.1:7410 (loopback only)")
	clients := fs.Int("clients", 1, "concurrent clients")
	duration := fs.Duration("duration", 10*time.Second, "time limit")
	maxReq := fs.Int("requests", 1_000_000, "request limit")
	queries := fs.String("queries", "", "file of queries, one a line (default: a built-in list)")
	mix := fs.String("mix", "lookup=8,hints=1,signals=1", "request mix by weight")
	batch := fs.Int("batch", 20, "events per signals batch")
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	u, err := url.Parse(*base)
	if err != nil || u.Host == "" {
		return usagef("--url must be a server base URL")
	}
	if h := u.Hostname(); h != "127.0.0.1" && h != "localhost" && h != "::1" {
		return usagef("bench drives loopback servers only (got %s)", h)
	}
	if *clients < 1 || *clients > 256 {
		return usagef("--clients must be 1..256")
	}
	qs, err := benchQueries(*queries)
	if err != nil {
		return err
	}
	kinds, err := parseMix(*mix)
	if err != nil {
		return usagef("%v", err)
	}
	res := drive(ctx, strings.TrimRight(*base, "/"), *clients, *duration, *maxReq, qs, kinds, *batch)
	if e.json {
		return e.printJSON(res)
	}
	fmt.Fprintf(e.stdout, "%d requests in %.1f s: %.0f req/s, p50 %.2f ms, p95 %.2f ms, p99 %.2f ms, max %.2f ms; %d events committed\n",
		res.Requests, res.Seconds, res.RPS, res.P50, res.P95, res.P99, res.Max, res.Events)
	for k, n := range res.Errors {
		fmt.Fprintf(e.stdout, "  errors %s: %d\n", k, n)
	}
	return nil
}

var defaultBenchQueries = []string{"burst pipe", "annual leave", "expenses", "password reset", "leak", "outage", "permit",
	"confined space", "meter reading", "new starter", "laptop", "boil notice", "pressure", "audit", "backup", "contract"}

func benchQueries(path string) ([]string, error) {
	if path == "" {
		return defaultBenchQueries, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("bench: %w", err)
	}
	defer f.Close()
	var out []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if q := strings.TrimSpace(sc.Text()); q != "" {
			out = append(out, q)
		}
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("bench: %s has no queries", path)
	}
	return out, sc.Err()
}

func parseMix(s string) ([]string, error) {
	var kinds []string
	for _, part := range strings.Split(s, ",") {
		k, w, ok := strings.Cut(strings.TrimSpace(part), "=")
		n := 0
		if _, err := fmt.Sscan(w, &n); !ok || err != nil || n < 0 || n > 100 {
			return nil, fmt.Errorf("bad mix entry %q (want kind=weight)", part)
		}
		if k != "lookup" && k != "hints" && k != "signals" {
			return nil, fmt.Errorf("unknown request kind %q", k)
		}
		for i := 0; i < n; i++ {
			kinds = append(kinds, k)
		}
	}
	if len(kinds) == 0 {
		return nil, fmt.Errorf("empty mix")
	}
	return kinds, nil
}

// drive runs the load: each client loops until the time or request limit.
func drive(ctx context.Context, base string, clients int, d time.Duration, maxReq int, qs, kinds []string, batch int) benchResult {
	ctx, cancel := context.WithTimeout(ctx, d)
	defer cancel()
	hc := &http.Client{Timeout: 10 * time.Second, Transport: &http.Transport{MaxIdleConnsPerHost: clients}}
	var mu sync.Mutex
	var lat []float64
	res := benchResult{Errors: map[string]int{}, ByKind: map[string]int{}}
	budget := make(chan struct{}, maxReq)
	for i := 0; i < maxReq; i++ {
		budget <- struct{}{}
	}
	start := time.Now()
	var wg sync.WaitGroup
	for c := 0; c < clients; c++ {
		wg.Add(1)
		go func(seed uint64) {
			defer wg.Done()
			r := rand.New(rand.NewPCG(seed, 7)) // event ids must differ across runs: the store keeps them
			imp := ""
			for ctx.Err() == nil {
				select {
				case <-budget:
				default:
					return
				}
				kind := kinds[r.IntN(len(kinds))]
				if kind == "signals" && imp == "" {
					kind = "lookup"
				}
				t0 := time.Now()
				newImp, events, errKind := benchRequest(ctx, hc, base, kind, qs[r.IntN(len(qs))], imp, batch, r)
				el := float64(time.Since(t0).Microseconds()) / 1000
				if ctx.Err() != nil && errKind != "" {
					return // cut off by the time limit: not an error of the server
				}
				if newImp != "" {
					imp = newImp
				}
				mu.Lock()
				lat = append(lat, el)
				res.ByKind[kind]++
				res.Events += events
				if errKind != "" {
					res.Errors[errKind]++
				}
				mu.Unlock()
			}
		}(uint64(time.Now().UnixNano()) + uint64(c))
	}
	wg.Wait()
	res.Seconds = time.Since(start).Seconds()
	res.Requests = len(lat)
	if res.Seconds > 0 {
		res.RPS = float64(res.Requests) / res.Seconds
	}
	sort.Float64s(lat)
	pct := func(p float64) float64 {
		if len(lat) == 0 {
			return 0
		}
		return lat[min(len(lat)-1, int(p*float64(len(lat))))]
	}
	res.P50, res.P95, res.P99 = pct(0.50), pct(0.95), pct(0.99)
	if len(lat) > 0 {
		res.Max = lat[len(lat)-1]
	}
	return res
}

// benchRequest sends one request; it returns a new impression id (from a
// lookup), the events committed, and an error kind ("" if fine).
func benchRequest(ctx context.Context, hc *http.Client, base, kind, q, imp string, batch int, r *rand.Rand) (string, int, string) {
	var req *http.Request
	switch kind {
	case "signals":
		evs := make([]map[string]any, batch)
		for i := range evs {
			evs[i] = map[string]any{"id": fmt.Sprintf("b%x", r.Uint64()), "impression": imp, "kind": "dismiss", "term": "x", "position": i % 5, "query": q}
		}
		evs[0]["kind"] = "impression"
		delete(evs[0], "term")
		delete(evs[0], "position")
		evs[0]["impression"] = fmt.Sprintf("bi%x", r.Uint64())
		evs[0]["terms"] = []string{"x"}
		for i := 1; i < len(evs); i++ {
			evs[i]["impression"] = evs[0]["impression"]
		}
		body, _ := json.Marshal(map[string]any{"events": evs})
		req, _ = http.NewRequestWithContext(ctx, http.MethodPost, base+"/api/v1/signals", bytes.NewReader(body))
		req.Header.Set("Content-Type", "application/json")
	default:
		req, _ = http.NewRequestWithContext(ctx, http.MethodGet, base+"/api/v1/"+kind+"?q="+url.QueryEscape(q), nil)
	}
	resp, err := hc.Do(req)
	if err != nil {
		return "", 0, "transport"
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	if resp.StatusCode >= 300 {
		if os.Getenv("KINWORD_BENCH_DEBUG") != "" {
			fmt.Fprintf(os.Stderr, "%d %s\n", resp.StatusCode, b)
		}
		return "", 0, fmt.Sprintf("http_%d", resp.StatusCode)
	}
	if kind == "signals" {
		return "", batch, ""
	}
	var lr struct {
		Impression string `json:"impression"`
	}
	_ = json.Unmarshal(b, &lr)
	return lr.Impression, 0, ""
}

package main

// Helpers for the fault tests in faults_test.go: a TCP proxy that can cut
// the server off from PostgreSQL and restore it, self-contained event
// batches, and a /metrics reader.

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"kinword/internal/store"
)

// tcpProxy forwards connections from a 127.0.0.1 port to target. cut
// closes the listener and every open connection, so the server sees its
// sessions drop and new connections refused, as when the database host
// goes down; restore listens on the same port again.
type tcpProxy struct {
	target, addr string
	mu           sync.Mutex
	ln           net.Listener
	conns        map[net.Conn]bool
	wg           sync.WaitGroup
}

func startProxy(t *testing.T, target string) *tcpProxy {
	t.Helper()
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	p := &tcpProxy{target: target, addr: ln.Addr().String(), conns: map[net.Conn]bool{}}
	p.serve(ln)
	t.Cleanup(func() { p.cut(); p.wg.Wait() })
	return p
}

func (p *tcpProxy) serve(ln net.Listener) {
	p.mu.Lock()
	p.ln = ln
	p.mu.Unlock()
	p.wg.Add(1)
	go func() {
		defer p.wg.Done()
		for {
			c, err := ln.Accept()
			if err != nil {
				return
			}
			up, err := net.DialTimeout("tcp", p.target, 5*time.Second)
			if err != nil {
				c.Close()
				continue
			}
			if !p.track(c, up) {
				continue
			}
			for _, pair := range [][2]net.Conn{{c, up}, {up, c}} {
				p.wg.Add(1)
				go func(dst, src net.Conn) {
					defer p.wg.Done()
					_, _ = io.Copy(dst, src)
					dst.Close()
					src.Close()
				}(pair[0], pair[1])
			}
		}
	}()
}

// track registers a forwarded pair, or closes it if the proxy was cut
// meanwhile.
func (p *tcpProxy) track(c, up net.Conn) bool {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.ln == nil {
		c.Close()
		up.Close()
		return false
	}
	p.conns[c], p.conns[up] = true, true
	return true
}

// cut closes the listener and every forwarded connection.
func (p *tcpProxy) cut() {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.ln != nil {
		p.ln.Close()
		p.ln = nil
	}
	for c := range p.conns {
		c.Close()
		delete(p.conns, c)
	}
}

// restore listens on the proxy's port again.
func (p *tcpProxy) restore(t *testing.T) {
	t.Helper()
	var err error
	for i := 0; i < 50; i++ {
		var ln net.Listener
		if ln, err = net.Listen("tcp", p.addr); err == nil {
			p.serve(ln)
			return
		}
		time.Sleep(20 * time.Millisecond)
	}
	t.Fatalf("proxy: listen again on %s: %v", p.addr, err)
}

// viaProxy returns dsn with its host replaced by the proxy's address.
func viaProxy(t *testing.T, dsn string, p *tcpProxy) string {
	t.Helper()
	u, err := url.Parse(dsn)
	if err != nil {
		t.Fatal(err)
	}
	u.Host = p.addr
	return u.String()
}

// ownBatch is an impression and two accepts of it: a batch that needs no
// earlier batch, so any subset of batches can be acknowledged.
func ownBatch(t testing.TB) []signalEv {
	imp := randomID(t)
	return []signalEv{
		{ID: imp, Impression: imp, Kind: store.KindImpression, Query: "valve", Terms: []string{"main", "crew"}},
		{ID: randomID(t), Impression: imp, Kind: store.KindAccept, Query: "valve", Term: "main", Position: 0},
		{ID: randomID(t), Impression: imp, Kind: store.KindAccept, Query: "valve", Term: "crew", Position: 1},
	}
}

// postResult is the outcome of one signals post.
type postResult struct {
	status     int
	retryAfter string
	errCode    string // the error shape's code, "" if none
}

// postSignalsFull is postSignals that also returns the Retry-After header
// and the error code of the answer.
func postSignalsFull(ctx context.Context, base string, v viewer, events []signalEv) (postResult, error) {
	body, err := json.Marshal(map[string]any{"events": events})
	if err != nil {
		return postResult{}, err
	}
	req, err := http.NewRequestWithContext(ctx, http.MethodPost, base+"/api/v1/signals", strings.NewReader(string(body)))
	if err != nil {
		return postResult{}, err
	}
	req.Header.Set("Content-Type", "application/json")
	v.prepare(req)
	resp, err := httpClient.Do(req)
	if err != nil {
		return postResult{}, err
	}
	defer resp.Body.Close()
	r := postResult{status: resp.StatusCode, retryAfter: resp.Header.Get("Retry-After")}
	if resp.StatusCode != http.StatusAccepted {
		var e struct {
			Error struct {
				Code    string `json:"code"`
				Message string `json:"message"`
			} `json:"error"`
		}
		if json.NewDecoder(resp.Body).Decode(&e) == nil && e.Error.Message != "" {
			r.errCode = e.Error.Code
		}
	}
	_, _ = io.Copy(io.Discard, resp.Body)
	return r, nil
}

// scrape returns the value of every sample of /metrics whose name and
// labels start with prefix (e.g. `kinword_reload_total{result="failed"}`).
func scrape(t *testing.T, base, prefix string) map[string]float64 {
	t.Helper()
	resp, err := httpClient.Get(base + "/metrics")
	if err != nil {
		t.Fatalf("metrics: %v", err)
	}
	defer resp.Body.Close()
	out := map[string]float64{}
	sc := bufio.NewScanner(resp.Body)
	for sc.Scan() {
		line := sc.Text()
		if !strings.HasPrefix(line, prefix) {
			continue
		}
		i := strings.LastIndexByte(line, ' ')
		v, err := strconv.ParseFloat(line[i+1:], 64)
		if err != nil {
			t.Fatalf("metrics line %q: %v", line, err)
		}
		out[line[:i]] = v
	}
	return out
}

// lookupOK runs one lookup and reports a non-200 or transport failure.
func lookupOK(ctx context.Context, base string) error {
	_, err := getSuggestions(ctx, base, "/api/v1/lookup", "valve", viewer{})
	if err != nil && errors.Is(ctx.Err(), context.Canceled) {
		return nil // the test is stopping its clients
	}
	if err != nil {
		return fmt.Errorf("lookup: %w", err)
	}
	return nil
}

// firstError keeps the first error set on it; safe for concurrent use
// (errors of different types, unlike atomic.Value).
type firstError struct {
	mu  sync.Mutex
	err error
}

func (f *firstError) set(err error) {
	f.mu.Lock()
	defer f.mu.Unlock()
	if f.err == nil {
		f.err = err
	}
}

func (f *firstError) get() error {
	f.mu.Lock()
	defer f.mu.Unlock()
	return f.err
}

package main

// Helpers for the process-level tests in replica_test.go: build the kinword
// binary once per test process, write a small corpus, start and kill
// `kinword serve` processes on 127.0.0.1, and make PostgreSQL schemas.

import (
	"bufio"
	"bytes"
	"context"
	"crypto/rand"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sync"
	"syscall"
	"testing"
	"time"
)

// pgTestBase is the test server (trust auth); KINWORD_TEST_PG overrides it.
const pgTestBase = "postgres://postgres@127.0.0.1:5432/test?sslmode=disable"

var (
	binOnce sync.Once
	binPath string
	binErr  error
)

// kinwordBinary builds ./cmd/kinword once per test process into a temp
// folder, which TestMain removes after the last test.
func kinwordBinary(t *testing.T) string {
	t.Helper()
	binOnce.Do(func() {
		dir, err := os.MkdirTemp("", "kinword-bin-")
		if err != nil {
			binErr = err
			return
		}
		binPath = filepath.Join(dir, "kinword")
		ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
		defer cancel()
		cmd := exec.CommandContext(ctx, "go", "build", "-o", binPath, ".")
		out, err := cmd.CombinedOutput()
		if err != nil {
			binErr = fmt.Errorf("go build: %v\n%s", err, out)
		}
	})
	if binErr != nil {
		t.Fatal(binErr)
	}
	return binPath
}

// writeCorpus writes markdown documents into dir/ops, owned by
// field-operations and open to every viewer.
func writeCorpus(t *testing.T, dir string, docs map[string]string) {
	t.Helper()
	ops := filepath.Join(dir, "ops")
	if err := os.MkdirAll(ops, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(ops, ".kinword-folder.toml"), []byte("department = \"field-operations\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for name, body := range docs {
		if err := os.WriteFile(filepath.Join(ops, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// ingestCorpus runs `kinword ingest` on src into a new data folder.
func ingestCorpus(t *testing.T, bin, src string) string {
	t.Helper()
	data := filepath.Join(t.TempDir(), "data")
	out, err := exec.Command(bin, "ingest", "--data", data, src).CombinedOutput()
	if err != nil {
		t.Fatalf("ingest: %v\n%s", err, out)
	}
	return data
}

// copyTree copies every regular file of src into dst.
func copyTree(t *testing.T, src, dst string) {
	t.Helper()
	err := filepath.Walk(src, func(p string, fi os.FileInfo, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(src, p)
		target := filepath.Join(dst, rel)
		if fi.IsDir() {
			return os.MkdirAll(target, 0o755)
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		return os.WriteFile(target, b, fi.Mode().Perm())
	})
	if err != nil {
		t.Fatalf("copy %s: %v", src, err)
	}
}

// server is one running `kinword serve` process.
type server struct {
	cmd    *exec.Cmd
	base   string // http://127.0.0.1:PORT
	stderr *bytes.Buffer
	done   chan error
}

var servingLine = regexp.MustCompile(`serving \d+ documents on (http://127\.0\.0\.1:\d+)/`)

// startServer starts `kinword serve` on 127.0.0.1 port 0 and waits for its
// "serving" line. extraEnv is appended to the environment. It is killed
// at the end of the test if still running.
func startServer(t *testing.T, bin, data string, extraEnv []string, args ...string) *server {
	t.Helper()
	argv := append([]string{"serve", "--data", data, "--addr", "127.0.0.1:0"}, args...)
	cmd := exec.Command(bin, argv...)
	cmd.Env = append(os.Environ(), extraEnv...)
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	s := &server{cmd: cmd, stderr: &bytes.Buffer{}, done: make(chan error, 1)}
	cmd.Stderr = &lockedWriter{w: s.stderr}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.kill() })
	found := make(chan string, 1)
	go func() {
		sc := bufio.NewScanner(stdout)
		for sc.Scan() {
			if m := servingLine.FindStringSubmatch(sc.Text()); m != nil {
				select {
				case found <- m[1]:
				default:
				}
			}
		}
		_, _ = io.Copy(io.Discard, stdout)
		s.done <- cmd.Wait()
	}()
	select {
	case s.base = <-found:
	case err := <-s.done:
		s.done <- err
		t.Fatalf("serve exited before serving: %v\n%s", err, s.stderr)
	case <-time.After(20 * time.Second):
		t.Fatalf("serve printed no serving line within 20 s\n%s", s.stderr)
	}
	return s
}

// kill sends SIGKILL (no-op once exited) and waits for the process.
func (s *server) kill() {
	_ = s.cmd.Process.Signal(syscall.SIGKILL)
	s.wait(10 * time.Second)
}

// stop sends SIGTERM and returns the exit error (nil for a clean exit).
func (s *server) stop(t *testing.T) error {
	t.Helper()
	_ = s.cmd.Process.Signal(syscall.SIGTERM)
	err, ok := s.wait(20 * time.Second)
	if !ok {
		t.Fatalf("serve did not exit within 20 s of SIGTERM")
	}
	return err
}

func (s *server) wait(d time.Duration) (error, bool) {
	select {
	case err, ok := <-s.done:
		if ok {
			close(s.done)
		}
		return err, true
	case <-time.After(d):
		return nil, false
	}
}

type lockedWriter struct {
	mu sync.Mutex
	w  io.Writer
}

func (l *lockedWriter) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.w.Write(p)
}

// viewer is what a simulated searcher sends: its session cookie and, when
// dept is set, the identity headers a trusted proxy would add.
type viewer struct {
	session, dept, secret string
}

// newSession returns a session cookie value of the form the server keeps:
// today's UTC date, a dot and 32 hex digits.
func newSession(t *testing.T) string {
	var b [16]byte
	if _, err := rand.Read(b[:]); err != nil {
		t.Fatal(err)
	}
	return time.Now().UTC().Format("20060102") + "." + hex.EncodeToString(b[:])
}

func (v viewer) prepare(req *http.Request) {
	if v.session != "" {
		req.AddCookie(&http.Cookie{Name: "kw_session", Value: v.session})
	}
	if v.dept != "" {
		req.Header.Set("X-Kinword-Department", v.dept)
		req.Header.Set("X-Kinword-Proxy-Secret", v.secret)
	}
}

type suggestionOut struct {
	Term     string `json:"term"`
	Evidence struct {
		Parts map[string]float64 `json:"parts"`
	} `json:"evidence"`
}

type lookupOut struct {
	Suggestions []suggestionOut `json:"suggestions"`
	Impression  string          `json:"impression"`
}

var httpClient = &http.Client{Timeout: 10 * time.Second}

// getSuggestions calls route (/api/v1/lookup or /api/v1/hints) for q.
func getSuggestions(ctx context.Context, base, route, q string, v viewer) (lookupOut, error) {
	req, err := http.NewRequestWithContext(ctx, http.MethodGet, base+route+"?q="+url.QueryEscape(q), nil)
	if err != nil {
		return lookupOut{}, err
	}
	v.prepare(req)
	resp, err := httpClient.Do(req)
	if err != nil {
		return lookupOut{}, err
	}
	defer resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		b, _ := io.ReadAll(resp.Body)
		return lookupOut{}, fmt.Errorf("%s: status %d: %s", route, resp.StatusCode, b)
	}
	var out lookupOut
	if err := json.NewDecoder(resp.Body).Decode(&out); err != nil {
		return lookupOut{}, err
	}
	return out, nil
}

// signalEv is one event as the page posts it.
type signalEv struct {
	ID         string   `json:"id"`
	Impression string   `json:"impression"`
	Kind       string   `json:"kind"`
	Query      string   `json:"query"`
	Term       string   `json:"term,omitempty"`
	Position   int      `json:"position"`
	Terms      []string `json:"terms,omitempty"`
}

// postSignals posts one batch and returns the HTTP status.
func postSignals(ctx context.Context, base string, v viewer, events []signalEv) (int, error) {
	body, err := json.Marshal(map[string]any{"events": events})
	if err != nil {
		return 0, err
	}
	req, err := http.NewRequestWithContext(ctx, http.MethodPost, base+"/api/v1/signals", bytes.NewReader(body))
	if err != nil {
		return 0, err
	}
	req.Header.Set("Content-Type", "application/json")
	v.prepare(req)
	resp, err := httpClient.Do(req)
	if err != nil {
		return 0, err
	}
	defer resp.Body.Close()
	_, _ = io.Copy(io.Discard, resp.Body)
	return resp.StatusCode, nil
}

func randomID(t testing.TB) string {
	var b [12]byte
	if _, err := rand.Read(b[:]); err != nil {
		t.Fatal(err)
	}
	return hex.EncodeToString(b[:])
}

// pgSchemaDSN creates schema kw_rep_<random> with psql and returns a DSN
// whose search_path is that schema; the schema is dropped when the test
// ends. psql is used so that only internal/store imports a database
// driver. An unreachable server (or no psql) skips the test, or fails it
// when CI=true.
func pgSchemaDSN(t *testing.T) string {
	t.Helper()
	base := pgTestBase
	if v := os.Getenv("KINWORD_TEST_PG"); v != "" {
		base = v
	}
	if _, err := psql(base, "SELECT 1"); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("postgres unreachable and CI=true: %v", err)
		}
		t.Skipf("postgres unreachable (%v); start it or set KINWORD_TEST_PG; CI=true makes this a failure", err)
	}
	schema := "kw_rep_" + randomID(t)[:12]
	if out, err := psql(base, "CREATE SCHEMA "+schema); err != nil {
		t.Fatalf("postgres: create schema: %v\n%s", err, out)
	}
	t.Cleanup(func() {
		if out, err := psql(base, "DROP SCHEMA "+schema+" CASCADE"); err != nil {
			t.Errorf("postgres: drop schema %s: %v\n%s", schema, err, out)
		}
	})
	u, err := url.Parse(base)
	if err != nil {
		t.Fatal(err)
	}
	q := u.Query()
	q.Set("search_path", schema)
	u.RawQuery = q.Encode()
	return u.String()
}

// psql runs one statement against dsn (libpq URI) with a 5 s connect
// timeout.
func psql(dsn, stmt string) (string, error) {
	ctx, cancel := context.WithTimeout(context.Background(), 15*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, "psql", "-X", "-q", "-v", "ON_ERROR_STOP=1", "-c", stmt, dsn)
	cmd.Env = append(os.Environ(), "PGCONNECT_TIMEOUT=5")
	out, err := cmd.CombinedOutput()
	return string(out), err
}

// termsOf lists the suggestion keys in order.
func termsOf(s []suggestionOut) []string {
	out := make([]string, len(s))
	for i, x := range s {
		out[i] = x.Term
	}
	return out
}

func sameSet(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	m := map[string]int{}
	for _, x := range a {
		m[x]++
	}
	for _, x := range b {
		m[x]--
	}
	for _, n := range m {
		if n != 0 {
			return false
		}
	}
	return true
}

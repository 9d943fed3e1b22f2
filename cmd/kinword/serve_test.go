package main

import (
	"context"
	"encoding/json"
	"io"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"
)

// servingWriter collects output and reports the serving line's base URL.
type servingWriter struct {
	mu   sync.Mutex
	b    strings.Builder
	base chan string
}

func (w *servingWriter) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	w.b.Write(p)
	if m := servingLine.FindStringSubmatch(w.b.String()); m != nil {
		select {
		case w.base <- m[1]:
		default:
		}
	}
	return len(p), nil
}

func (w *servingWriter) String() string {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.b.String()
}

// request sends one request to the test server.
func request(t *testing.T, method, url, token, body string) (int, string) {
	t.Helper()
	var rd io.Reader
	if body != "" {
		rd = strings.NewReader(body)
	}
	req, err := http.NewRequest(method, url, rd)
	if err != nil {
		t.Fatal(err)
	}
	if body != "" {
		req.Header.Set("Content-Type", "application/json")
	}
	if token != "" {
		req.Header.Set("Authorization", "Bearer "+token)
	}
	resp, err := httpClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp.StatusCode, string(b)
}

// TestServeTokensPushAndSIGHUP runs `kinword serve` in this process with
// an admin token from KINWORD_TOKENS_FILE (made by `kinword token`): the
// admin routes refuse callers without it and work with it, a pushed
// document is searchable, SIGHUP reloads (kinword_reload_total counts it),
// and the server's log names the token but never holds its text.
func TestServeTokensPushAndSIGHUP(t *testing.T) {
	src, data := t.TempDir(), filepath.Join(t.TempDir(), "data")
	writeCorpus(t, src, fiveDocs)
	if code, _, errs := runCLI(t, "ingest", "--data", data, src); code != 0 {
		t.Fatalf("ingest: %s", errs)
	}
	code, out, errs := runCLI(t, "token", "--role", "admin", "--name", "ops-pipeline", "--json")
	if code != 0 {
		t.Fatalf("token: %s", errs)
	}
	var tok tokenOut
	if err := json.Unmarshal([]byte(out), &tok); err != nil {
		t.Fatal(err)
	}
	tokens := filepath.Join(t.TempDir(), "tokens.toml")
	if err := os.WriteFile(tokens, []byte(tok.TOML), 0o600); err != nil {
		t.Fatal(err)
	}
	t.Setenv("KINWORD_TOKENS_FILE", tokens)
	t.Setenv("KINWORD_STORE_DSN", "")

	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	stdout, stderr := &servingWriter{base: make(chan string, 1)}, &servingWriter{base: make(chan string, 1)}
	done := make(chan int, 1)
	go func() { done <- run(ctx, []string{"serve", "--data", data, "--addr", "127.0.0.1:0"}, stdout, stderr) }()
	var base string
	select {
	case base = <-stdout.base:
	case c := <-done:
		t.Fatalf("serve exited %d: %s", c, stderr)
	case <-time.After(60 * time.Second):
		t.Fatalf("serve printed no serving line: %s", stderr)
	}
	steps := []struct {
		name, method, path, token, body string
		status                          int
		contains                        string
	}{
		{"reload without a token", "POST", "/api/v1/reload", "", "", 401, "unauthorized"},
		{"reload with a wrong token", "POST", "/api/v1/reload", tok.Token + "x", "", 401, "invalid_token"},
		{"reload with the token", "POST", "/api/v1/reload", tok.Token, "", 200, "reloaded"},
		{"push", "POST", "/api/v1/documents", tok.Token, `{"documents":[{"id":"pushed/weir","title":"Weir gauge","body":"The weir gauge at Stonebeck reads the river level."}]}`, 200, `"added":1`},
		{"pushed document found", "GET", "/api/v1/lookup?q=stonebeck", "", "", 200, `"id":"pushed/weir"`},
		{"delete", "DELETE", "/api/v1/documents/pushed/weir", tok.Token, "", 200, `"deleted":1`},
		{"deleted document gone", "GET", "/api/v1/lookup?q=stonebeck", "", "", 200, `"total":0`},
	}
	for _, st := range steps {
		t.Run(st.name, func(t *testing.T) {
			code, body := request(t, st.method, base+st.path, st.token, st.body)
			if code != st.status || !strings.Contains(body, st.contains) {
				t.Fatalf("%d %s, want %d with %s", code, body, st.status, st.contains)
			}
		})
	}
	if err := syscall.Kill(os.Getpid(), syscall.SIGHUP); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(10 * time.Second)
	for {
		_, m := request(t, "GET", base+"/metrics", "", "")
		if strings.Contains(m, `kinword_reload_total{result="ok"} 2`) {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("SIGHUP was not counted as a reload:\n%s", grepLines(m, "kinword_reload_total"))
		}
		time.Sleep(50 * time.Millisecond)
	}
	cancel()
	if c := <-done; c != 0 {
		t.Fatalf("serve exited %d: %s", c, stderr)
	}
	logs := stderr.String()
	if !strings.Contains(logs, "ops-pipeline") || !strings.Contains(logs, "SIGHUP") {
		t.Errorf("the log does not name the token and the signal:\n%s", logs)
	}
	if strings.Contains(logs, tok.Token[3:15]) || strings.Contains(stdout.String(), tok.Token[3:15]) {
		t.Errorf("the token's text reached the output:\n%s", logs)
	}
}

// TestServeRefusesBadTokens: a tokens file with a token in clear, or names
// that clash with the configuration's, stops serve before it opens anything.
func TestServeRefusesBadTokens(t *testing.T) {
	sum := strings.Repeat("a", 64)
	cases := []struct {
		name, config, file, want string
	}{
		{"token in clear", "", "[[server.tokens]]\nname = \"ops\"\nrole = \"admin\"\nsha256 = \"kw_" + strings.Repeat("z", 43) + "\"\n", "token in clear"},
		{"name in both", "[[server.tokens]]\nname = \"ops\"\nrole = \"admin\"\nsha256 = \"" + sum + "\"\n",
			"[[server.tokens]]\nname = \"ops\"\nrole = \"librarian\"\nsha256 = \"" + strings.Repeat("b", 64) + "\"\n", "name used twice"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			cfg, file := filepath.Join(dir, "kinword.toml"), filepath.Join(dir, "tokens.toml")
			os.WriteFile(cfg, []byte(c.config), 0o644)
			os.WriteFile(file, []byte(c.file), 0o600)
			t.Setenv("KINWORD_TOKENS_FILE", file)
			code, _, errs := runCLI(t, "serve", "--config", cfg, "--data", filepath.Join(dir, "data"), "--addr", "127.0.0.1:0")
			if code != 1 || !strings.Contains(errs, c.want) {
				t.Fatalf("exit %d, stderr %q, want 1 with %q", code, errs, c.want)
			}
			if _, err := os.Stat(filepath.Join(dir, "data")); err == nil {
				t.Errorf("serve created the data folder before refusing")
			}
		})
	}
}

func grepLines(s, sub string) string {
	var out []string
	for _, l := range strings.Split(s, "\n") {
		if strings.Contains(l, sub) {
			out = append(out, l)
		}
	}
	return strings.Join(out, "\n")
}

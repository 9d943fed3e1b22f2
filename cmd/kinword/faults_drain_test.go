package main

// Graceful shutdown: SIGTERM drains in-flight requests (see
// faults_test.go for the other fault tests).

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestDrainOnSIGTERM starts two requests that are still in flight when
// SIGTERM arrives, each with its body half sent so that its handler is
// running (reading the body): a signals post and an admin document push.
// Then it checks that new connections are refused, completes both bodies,
// and expects 202 and 200, exit status 0, the event in the store and the
// pushed document searchable after a restart. net/http's Server.Shutdown
// closes the listeners first and then waits for active connections (Go
// documentation, net/http "Server.Shutdown"); a request whose header has
// not fully arrived is not in flight and is dropped (net/http, conn.serve).
func TestDrainOnSIGTERM(t *testing.T) {
	bin := kinwordBinary(t)
	src := t.TempDir()
	writeCorpus(t, src, fiveDocs)
	data := ingestCorpus(t, bin, src)
	out, err := exec.Command(bin, "token", "--role", "admin", "--name", "drain-test", "--json").Output()
	if err != nil {
		t.Fatalf("token: %v", err)
	}
	var tok tokenOut
	if err := json.Unmarshal(out, &tok); err != nil {
		t.Fatal(err)
	}
	tokens := filepath.Join(t.TempDir(), "tokens.toml")
	if err := os.WriteFile(tokens, []byte(tok.TOML), 0o600); err != nil {
		t.Fatal(err)
	}
	dsn := "sqlite:" + filepath.Join(t.TempDir(), "events.db")
	env := []string{"KINWORD_STORE_DSN=" + dsn, "KINWORD_TOKENS_FILE=" + tokens}
	srv := startServer(t, bin, data, env)
	host := strings.TrimPrefix(srv.base, "http://")

	// halfSent opens a connection and sends a request's header and the
	// first half of its body; it returns the connection and the rest.
	halfSent := func(path, auth string, body []byte) (net.Conn, []byte) {
		t.Helper()
		c, err := net.Dial("tcp", host)
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { c.Close() })
		half := len(body) / 2
		fmt.Fprintf(c, "POST %s HTTP/1.1\r\nHost: %s\r\nContent-Type: application/json\r\n%sContent-Length: %d\r\n\r\n%s", path, host, auth, len(body), body[:half])
		return c, body[half:]
	}
	batch := ownBatch(t)
	sigBody, _ := json.Marshal(map[string]any{"events": batch})
	post, postRest := halfSent("/api/v1/signals", "", sigBody)
	docBody := []byte(`{"documents":[{"id":"pushed/weir","title":"Weir gauge","body":"The weir gauge at Stonebeck reads the river level."}]}`)
	push, pushRest := halfSent("/api/v1/documents", "Authorization: Bearer "+tok.Token+"\r\n", docBody)
	time.Sleep(200 * time.Millisecond) // the handlers are reading the bodies

	sent := time.Now()
	if err := srv.cmd.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	var refusedAfter time.Duration
	for {
		c, err := net.DialTimeout("tcp", host, time.Second)
		var ne net.Error
		if errors.Is(err, syscall.ECONNRESET) || (errors.As(err, &ne) && ne.Timeout()) {
			// A connection queued in the listen backlog at the moment
			// the listener closed is reset by the kernel, not refused
			// (Linux tcp(7), closing a listening socket); a dial whose
			// one-second deadline passed while this process waited for
			// a core (the race-enabled suite on two cores) proves
			// nothing either way. Dial again, within the 5 s limit below.
			if time.Since(sent) > 5*time.Second {
				t.Fatalf("no refusal 5 s after SIGTERM: %v", err)
			}
			time.Sleep(5 * time.Millisecond)
			continue
		}
		if err != nil {
			if !errors.Is(err, syscall.ECONNREFUSED) {
				t.Fatalf("new connection after SIGTERM: %v, want connection refused", err)
			}
			refusedAfter = time.Since(sent)
			break
		}
		c.Close()
		if time.Since(sent) > 5*time.Second {
			t.Fatalf("new connections still accepted 5 s after SIGTERM")
		}
		time.Sleep(5 * time.Millisecond)
	}
	time.Sleep(300 * time.Millisecond) // the in-flight requests wait meanwhile
	status := func(c net.Conn, rest []byte, what string) int {
		t.Helper()
		if _, err := c.Write(rest); err != nil {
			t.Fatalf("%s: finish the body: %v", what, err)
		}
		_ = c.SetReadDeadline(time.Now().Add(10 * time.Second))
		resp, err := http.ReadResponse(bufio.NewReader(c), nil)
		if err != nil {
			t.Fatalf("%s: read response: %v\n%s", what, err, srv.stderr.String())
		}
		defer resp.Body.Close()
		_, _ = io.Copy(io.Discard, resp.Body)
		return resp.StatusCode
	}
	postStatus, pushStatus := status(post, postRest, "signals"), status(push, pushRest, "push")
	exitErr := srv.stop(t)
	t.Logf("SIGTERM: new connections refused after %s; in-flight signals answered %d, document push %d; exit %v",
		refusedAfter.Round(time.Millisecond), postStatus, pushStatus, exitErr)
	if postStatus != http.StatusAccepted || pushStatus != http.StatusOK {
		t.Errorf("in-flight requests answered %d and %d, want 202 and 200", postStatus, pushStatus)
	}
	if exitErr != nil {
		t.Errorf("exit after SIGTERM: %v, want status 0\n%s", exitErr, srv.stderr.String())
	}
	want := map[string]bool{}
	for _, e := range batch {
		want[e.ID] = true
	}
	if missing, _ := missingIDs(t, dsn, want); len(missing) > 0 {
		t.Errorf("the drained post was answered 202 but %d of its events are missing", len(missing))
	}
	again := startServer(t, bin, data, env)
	resp, err := httpClient.Get(again.base + "/api/v1/lookup?q=stonebeck")
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	if !strings.Contains(string(b), `"id":"pushed/weir"`) {
		t.Errorf("the drained push was answered 200 but after a restart the document is not found: %s", b)
	}
}

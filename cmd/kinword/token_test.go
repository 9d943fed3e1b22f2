package main

import (
	"crypto/sha256"
	"encoding/base64"
	"encoding/hex"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"kinword/internal/config"
)

// TestTokenCommand: `kinword token` prints a token once with an entry to
// paste; the entry holds the token's SHA-256 (computed here with
// crypto/sha256, FIPS 180-4) and not the token, and the configuration it
// goes into loads. Bad flags are usage errors (exit 2).
func TestTokenCommand(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
		err  string
	}{
		{"admin", []string{"token", "--role", "admin", "--name", "ops"}, 0, ""},
		{"librarian", []string{"token", "--role", "librarian", "--name", "cataloguer.1"}, 0, ""},
		{"no role", []string{"token", "--name", "ops"}, 2, "--role must be librarian or admin"},
		{"searcher role", []string{"token", "--role", "searcher", "--name", "ops"}, 2, "--role must be"},
		{"no name", []string{"token", "--role", "admin"}, 2, "--name"},
		{"bad name", []string{"token", "--role", "admin", "--name", "ops team"}, 2, "--name"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCLI(t, append(c.args, "--json")...)
			if code != c.code || !strings.Contains(errs, c.err) {
				t.Fatalf("exit %d (want %d), stderr %q (want %q)", code, c.code, errs, c.err)
			}
			if c.code != 0 {
				return
			}
			var got tokenOut
			if err := json.Unmarshal([]byte(out), &got); err != nil {
				t.Fatalf("%v: %s", err, out)
			}
			raw, err := base64.RawURLEncoding.DecodeString(strings.TrimPrefix(got.Token, "kw_"))
			if !strings.HasPrefix(got.Token, "kw_") || err != nil || len(raw) != 32 {
				t.Fatalf("token %q is not kw_ + 32 bytes of base64url (RFC 4648 section 5)", got.Token)
			}
			sum := sha256.Sum256([]byte(got.Token))
			if got.SHA256 != hex.EncodeToString(sum[:]) {
				t.Errorf("sha256 %s is not the token's SHA-256", got.SHA256)
			}
			if strings.Contains(got.TOML, got.Token) || strings.Contains(got.TOML, got.Token[3:]) {
				t.Fatalf("the entry holds the token in clear:\n%s", got.TOML)
			}
			p := filepath.Join(t.TempDir(), "kinword.toml")
			if err := os.WriteFile(p, []byte("[search]\nresults = 10\n\n"+got.TOML), 0o644); err != nil {
				t.Fatal(err)
			}
			cfg, err := config.Load(p)
			if err != nil {
				t.Fatalf("the printed entry does not load: %v\n%s", err, got.TOML)
			}
			tk := cfg.Server.Tokens
			if len(tk) != 1 || tk[0].SHA256 != got.SHA256 || tk[0].Role != c.args[2] {
				t.Errorf("loaded %+v", tk)
			}
		})
	}
	// The text form shows the token and the same entry.
	code, out, _ := runCLI(t, "token", "--role", "admin", "--name", "ops")
	if code != 0 || !strings.Contains(out, "kw_") || !strings.Contains(out, "[[server.tokens]]\nname = \"ops\"\nrole = \"admin\"\nsha256 = \"") {
		t.Errorf("text output:\n%s", out)
	}
}

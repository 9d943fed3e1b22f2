package config

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// sha256 of "abc": FIPS 180-2 (2002), Appendix B.1 (any 64 lowercase hex
// digits would do; a published value keeps the fixture honest).
const abcSHA256 = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"

// TestTokensInConfig: [[server.tokens]] entries load and validate; a token
// in clear, a bad role or name, duplicates and a `token` key are refused
// with a message naming the entry.
func TestTokensInConfig(t *testing.T) {
	entry := func(name, role, sum string) string {
		return "[[server.tokens]]\nname = \"" + name + "\"\nrole = \"" + role + "\"\nsha256 = \"" + sum + "\"\n"
	}
	other := strings.Repeat("0", 64)
	cases := []struct {
		name string
		file string
		want string // "" = valid
	}{
		{"one admin", entry("ops", "admin", abcSHA256), ""},
		{"librarian and admin", entry("ops", "admin", abcSHA256) + entry("cataloguer", "librarian", other), ""},
		{"token in clear", entry("ops", "admin", "kw_"+strings.Repeat("a", 43)), "token in clear"},
		{"clear token key", "[[server.tokens]]\nname = \"ops\"\nrole = \"admin\"\ntoken = \"kw_abc\"\n", "unknown keys: server.tokens.token"},
		{"searcher role", entry("ops", "searcher", abcSHA256), "neither librarian nor admin"},
		{"upper-case hex", entry("ops", "admin", strings.ToUpper(abcSHA256)), "64 lowercase hex"},
		{"short hash", entry("ops", "admin", abcSHA256[:63]), "64 lowercase hex"},
		{"bad name", entry("ops team", "admin", abcSHA256), "name must be"},
		{"same name", entry("ops", "admin", abcSHA256) + entry("ops", "librarian", other), "name used twice"},
		{"same hash", entry("ops", "admin", abcSHA256) + entry("cat", "librarian", abcSHA256), "same hash"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(t.TempDir(), "k.toml")
			if err := os.WriteFile(p, []byte(c.file), 0o644); err != nil {
				t.Fatal(err)
			}
			cfg, err := Load(p)
			if c.want == "" {
				if err != nil || len(cfg.Server.Tokens) == 0 || cfg.Server.Tokens[0].SHA256 != abcSHA256 {
					t.Fatalf("err %v, tokens %+v", err, cfg.Server.Tokens)
				}
				return
			}
			if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrInvalid) {
				t.Fatalf("err %v, want ErrInvalid mentioning %q", err, c.want)
			}
		})
	}
	if d := Default(); len(d.Server.Tokens) != 0 {
		t.Errorf("the defaults configure tokens: %+v", d.Server.Tokens)
	}
}

// TestTokensFile: KINWORD_TOKENS_FILE's file holds only [[server.tokens]]
// entries; anything else in it is refused.
func TestTokensFile(t *testing.T) {
	cases := []struct {
		name string
		file string
		n    int
		want string
	}{
		{"two entries", "[[server.tokens]]\nname = \"a\"\nrole = \"admin\"\nsha256 = \"" + abcSHA256 + "\"\n[[server.tokens]]\nname = \"b\"\nrole = \"librarian\"\nsha256 = \"" + strings.Repeat("1", 64) + "\"\n", 2, ""},
		{"empty file", "", 0, ""},
		{"other settings", "[server]\naddr = \"0.0.0.0:80\"\n", 0, "only [[server.tokens]]"},
		{"bad entry", "[[server.tokens]]\nname = \"a\"\nrole = \"root\"\nsha256 = \"" + abcSHA256 + "\"\n", 0, "neither librarian nor admin"},
		{"not TOML", "[[server.tokens\n", 0, "tokens file"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(t.TempDir(), "tokens.toml")
			if err := os.WriteFile(p, []byte(c.file), 0o600); err != nil {
				t.Fatal(err)
			}
			got, err := LoadTokensFile(p)
			if c.want == "" {
				if err != nil || len(got) != c.n {
					t.Fatalf("err %v, %d tokens, want %d", err, len(got), c.n)
				}
				return
			}
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("err %v, want one mentioning %q", err, c.want)
			}
		})
	}
	if got, err := LoadTokensFile(""); err != nil || got != nil {
		t.Errorf("no file: %v %v", got, err)
	}
	if _, err := LoadTokensFile(filepath.Join(t.TempDir(), "missing.toml")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}

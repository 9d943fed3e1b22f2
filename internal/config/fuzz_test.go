package config

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"

	defaults "kinword/config"
	"kinword/internal/text"
)

// FuzzParse overlays fuzzed TOML on the defaults, as Load does, and checks:
//   - Parse and Validate never panic; every error carries the "config:"
//     prefix, and unknown keys are reported as ErrInvalid;
//   - a configuration that passes Validate keeps every value inside the
//     range config/kinword.toml documents beside the key (the comment
//     above each key; the bounds of max_query_bytes, max_query_terms and
//     ingest.batch_size are stated only in Validate, so those are checked
//     as finite and positive);
//   - overlaying the same file twice gives what overlaying it once gives;
//   - an accepted configuration, written back as TOML (the reference
//     encoder of github.com/BurntSushi/toml) and parsed onto an empty
//     Config, comes back equal and still validates.
func FuzzParse(f *testing.F) {
	for _, s := range []string{
		string(defaults.Default),
		"colour = \"red\"\n",
		"language = \"klingon\"\n[index]\nbm25_b = 2\nbm25_k1 = 0\n",
		"[index\n",
		"[search]\nresults = 20\n",
		"[search]\nconcurrent = -1\ncache_entries = 10000001\n",
		"[index]\nbm25_k1 = nan\n",
		"[index]\nbm25_b = -nan\nbm25_k1 = inf\n",
		"index.bm25_b = 0.5\nsearch = { results = 3 }\n",
		"[server]\nallowed_origins = [\"https://intra.tarnwick.example\", \"http://x\"]\n",
		"[server]\nallowed_origins = \"https://a\"\n",
		"[store]\ndsn = \"postgres://u@h:5432/db\"\nretention_days = 3650\n",
		"data_dir = \"\"\"\n  multi\nline\"\"\"\n",
		"data_dir = 'C:\\data\\kinword'\n[ingest]\nmax_file_bytes = 9223372036854775807\n",
		"[ingest]\nmax_file_bytes = 1e3\n",
		"[[index]]\nbatch_size = 1\n",
		"[search]\nmax_query_bytes = 0x10\nmax_query_terms = 0o1\n",
		"\ufeffdata_dir = \"x\"\n",
		"data_dir = \"a\\u0000b\"\n",
		"[[server.tokens]]\nname = \"ops\"\nrole = \"admin\"\nsha256 = \"" + strings.Repeat("ab", 32) + "\"\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		c := Default()
		err := Parse(data, &c)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "config: ") {
				t.Fatalf("error %q lacks the package prefix", err)
			}
			if strings.Contains(err.Error(), "unknown keys") && !errors.Is(err, ErrInvalid) {
				t.Fatalf("unknown keys not reported as ErrInvalid: %v", err)
			}
			return
		}
		twice := Default()
		if err := Parse(data, &twice); err != nil {
			t.Fatalf("second parse failed: %v", err)
		}
		if err := Parse(data, &twice); err != nil || !sameConfig(twice, c) {
			t.Fatalf("overlaying twice gives %+v, %v; once %+v", twice, err, c)
		}
		if verr := c.Validate(); verr != nil {
			for _, e := range unjoin(verr) {
				if !errors.Is(e, ErrInvalid) || !strings.HasPrefix(e.Error(), "config: invalid: ") {
					t.Fatalf("validation problem %q is not ErrInvalid", e)
				}
			}
			return
		}
		checkDocumentedRanges(t, c)

		var buf bytes.Buffer
		if err := toml.NewEncoder(&buf).Encode(c); err != nil {
			t.Fatalf("cannot write back an accepted config: %v", err)
		}
		var back Config
		if err := Parse(buf.Bytes(), &back); err != nil || !sameConfig(back, c) {
			t.Fatalf("round trip through\n%s\ngives %+v, %v; want %+v", buf.String(), back, err, c)
		}
		if err := back.Validate(); err != nil {
			t.Fatalf("round-tripped config no longer validates: %v", err)
		}
	})
}

// unjoin lists the problems errors.Join gathered.
func unjoin(err error) []error {
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		return j.Unwrap()
	}
	return []error{err}
}

// sameConfig is reflect.DeepEqual with an empty origin list equal to none
// and NaN equal to NaN.
func sameConfig(a, b Config) bool {
	if len(a.Server.AllowedOrigins) == 0 && len(b.Server.AllowedOrigins) == 0 {
		a.Server.AllowedOrigins, b.Server.AllowedOrigins = nil, nil
	}
	for _, p := range [][2]*float64{{&a.Index.BM25K1, &b.Index.BM25K1}, {&a.Index.BM25B, &b.Index.BM25B}} {
		if math.IsNaN(*p[0]) && math.IsNaN(*p[1]) {
			*p[0], *p[1] = 0, 0
		}
	}
	return reflect.DeepEqual(a, b)
}

// checkDocumentedRanges restates the ranges written beside each key in
// config/kinword.toml. Written as "inside", so NaN fails every check.
func checkDocumentedRanges(t *testing.T, c Config) {
	t.Helper()
	inside := func(v, lo, hi float64, loOpen bool) bool {
		if loOpen {
			return v > lo && v <= hi
		}
		return v >= lo && v <= hi
	}
	checks := []struct {
		key string
		ok  bool
	}{
		{"data_dir", strings.TrimSpace(c.DataDir) != ""},
		{"language", text.ValidLanguage(c.Language)},
		{"index.bm25_k1 (> 0; Validate caps it at 10)", inside(c.Index.BM25K1, 0, 10, true)},
		{"index.bm25_b in [0, 1]", inside(c.Index.BM25B, 0, 1, false)},
		{"index.batch_size 1 .. 100000", inside(float64(c.Index.BatchSize), 1, 100000, false)},
		{"ingest.max_file_bytes positive", c.Ingest.MaxFileBytes > 0},
		{"ingest.batch_size positive", c.Ingest.BatchSize > 0},
		{"search.accepted_weight in (0, 1]", inside(c.Search.AcceptedWeight, 0, 1, true)},
		{"search.results 1 .. 1000", inside(float64(c.Search.Results), 1, 1000, false)},
		{"search.snippet_tokens 5 .. 200", inside(float64(c.Search.SnippetTokens), 5, 200, false)},
		{"search.max_query_bytes positive", c.Search.MaxQueryBytes > 0},
		{"search.max_query_terms positive", c.Search.MaxQueryTerms > 0},
		{"search.concurrent -1 .. 4096", inside(float64(c.Search.Concurrent), -1, 4096, false)},
		{"search.cache_entries -1 .. 10000000", inside(float64(c.Search.CacheEntries), -1, 10_000_000, false)},
		{"server.addr", strings.TrimSpace(c.Server.Addr) != ""},
		{"server.shutdown_grace_seconds 1 .. 300", inside(float64(c.Server.ShutdownGraceSeconds), 1, 300, false)},
		{"server.refresh_seconds 1 .. 3600", inside(float64(c.Server.RefreshSeconds), 1, 3600, false)},
		{"store.dsn sqlite: or PostgreSQL URL", strings.HasPrefix(c.Store.DSN, "sqlite:") ||
			strings.HasPrefix(c.Store.DSN, "postgres://") || strings.HasPrefix(c.Store.DSN, "postgresql://")},
		{"store.retention_days 1 .. 3650", inside(float64(c.Store.RetentionDays), 1, 3650, false)},
		{"finite floats", !math.IsInf(c.Index.BM25K1, 0) && !math.IsInf(c.Index.BM25B, 0)},
	}
	for _, ch := range checks {
		if !ch.ok {
			t.Fatalf("Validate accepted %s outside its documented range: %+v", ch.key, c)
		}
	}
	for _, o := range c.Server.AllowedOrigins {
		if !strings.HasPrefix(o, "http://") && !strings.HasPrefix(o, "https://") {
			t.Fatalf("Validate accepted origin %q", o)
		}
	}
	checkTokens(t, c.Server.Tokens)
}

// checkTokens restates the Token field docs: names of 1 to 64 letters,
// digits, '.', '_' or '-', unique; role librarian or admin; sha256 64
// lowercase hex digits (a SHA-256 digest is 256 bits, FIPS 180-4 (2015),
// section 1), unique.
func checkTokens(t *testing.T, ts []Token) {
	t.Helper()
	names, sums := map[string]bool{}, map[string]bool{}
	for _, tk := range ts {
		okName := len(tk.Name) >= 1 && len(tk.Name) <= 64 && !strings.ContainsFunc(tk.Name, func(r rune) bool {
			return !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '.' || r == '_' || r == '-')
		})
		okSum := len(tk.SHA256) == 64 && !strings.ContainsFunc(tk.SHA256, func(r rune) bool {
			return !(r >= '0' && r <= '9' || r >= 'a' && r <= 'f')
		})
		if !okName || !okSum || (tk.Role != "librarian" && tk.Role != "admin") || names[tk.Name] || sums[tk.SHA256] {
			t.Fatalf("accepted token entry %+v among %+v", tk, ts)
		}
		names[tk.Name], sums[tk.SHA256] = true, true
	}
}

// FuzzLoadTokensFile writes fuzzed bytes as a tokens file and checks:
// LoadTokensFile never panics; its errors say "config:" and name the file;
// accepted entries obey the Token docs (checkTokens); and the entries,
// written back as [[server.tokens]] with the reference encoder, load again
// equal.
func FuzzLoadTokensFile(f *testing.F) {
	const sum = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad" // SHA-256("abc"), FIPS 180-2 (2002), Appendix B.1
	entry := func(name, role, sha string) string {
		return "[[server.tokens]]\nname = \"" + name + "\"\nrole = \"" + role + "\"\nsha256 = \"" + sha + "\"\n"
	}
	for _, s := range []string{
		entry("ops", "admin", sum),
		entry("ops", "admin", sum) + entry("cat", "librarian", strings.Repeat("0", 64)),
		entry("ops", "admin", sum) + entry("ops", "librarian", sum),
		entry("ops team", "searcher", "kw_"+strings.Repeat("a", 43)),
		entry("", "admin", strings.ToUpper(sum)),
		"[[server.tokens]]\nname = \"ops\"\ntoken = \"kw_abc\"\n",
		"[server]\ntokens = [{name = \"a\", role = \"admin\", sha256 = \"" + sum + "\"}]\n",
		"data_dir = \"x\"\n", "[[server.tokens]]\n", "", "[server]\ntokens = 3\n",
	} {
		f.Add([]byte(s))
	}
	path := filepath.Join(f.TempDir(), "tokens.toml")
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := os.WriteFile(path, data, 0o600); err != nil {
			t.Fatal(err)
		}
		ts, err := LoadTokensFile(path)
		if err != nil {
			if !strings.Contains(err.Error(), "config: ") || !strings.Contains(err.Error(), path) {
				t.Fatalf("error %q lacks the package prefix or the file name", err)
			}
			return
		}
		checkTokens(t, ts)
		if len(ts) == 0 {
			return
		}
		var buf bytes.Buffer
		wrap := struct {
			Server struct {
				Tokens []Token `toml:"tokens"`
			} `toml:"server"`
		}{}
		wrap.Server.Tokens = ts
		if err := toml.NewEncoder(&buf).Encode(wrap); err != nil {
			t.Fatalf("cannot write back accepted tokens: %v", err)
		}
		if err := os.WriteFile(path, buf.Bytes(), 0o600); err != nil {
			t.Fatal(err)
		}
		back, err := LoadTokensFile(path)
		if err != nil || !reflect.DeepEqual(back, ts) {
			t.Fatalf("round trip through\n%s\ngives %+v, %v; want %+v", buf.String(), back, err, ts)
		}
	})
}

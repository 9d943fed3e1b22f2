package config

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestDefaultsValidate(t *testing.T) {
	c := Default()
	if err := c.Validate(); err != nil {
		t.Fatal(err)
	}
	// The documented defaults (config/kinword.toml) must match the values
	// the issue fixes: BM25 k1 1.2 and b 0.75 (Robertson & Zaragoza 2009,
	// the conventional values).
	// The accepted-term weight 0.3 is Kinword's own default (suggest's
	// DefaultExpandWeight), not a published value.
	if c.Index.BM25K1 != 1.2 || c.Index.BM25B != 0.75 || c.Search.MaxQueryBytes != 512 || c.Search.MaxQueryTerms != 32 || c.Search.AcceptedWeight != 0.3 {
		t.Errorf("defaults drifted: %+v", c)
	}
}

func TestLoadReportsAllProblems(t *testing.T) {
	cases := []struct {
		name string
		file string
		want []string
	}{
		{"unknown key", "colour = \"red\"\n", []string{"unknown keys: colour"}},
		{"several bad values", "language = \"klingon\"\n[index]\nbm25_b = 2\nbm25_k1 = 0\n", []string{"language", "index.bm25_b", "index.bm25_k1"}},
		{"bad toml", "[index\n", []string{"parse"}},
		{"search bounds out of range", "[search]\nconcurrent = -2\ncache_entries = -5\n", []string{"search.concurrent", "search.cache_entries"}},
		{"accepted weight zero", "[search]\naccepted_weight = 0\n", []string{"search.accepted_weight", "outside (0, 1]"}},
		{"accepted weight above the query's own", "[search]\naccepted_weight = 1.5\n", []string{"search.accepted_weight"}},
		{"accepted weight negative", "[search]\naccepted_weight = -0.3\n", []string{"search.accepted_weight"}},
		{"accepted weight not a number", "[search]\naccepted_weight = nan\n", []string{"search.accepted_weight"}},
		{"override ok", "[search]\nresults = 20\n", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(t.TempDir(), "k.toml")
			os.WriteFile(p, []byte(c.file), 0o644)
			cfg, err := Load(p)
			if c.want == nil {
				if err != nil || cfg.Search.Results != 20 {
					t.Fatalf("err %v, cfg %+v", err, cfg.Search)
				}
				return
			}
			if err == nil {
				t.Fatal("accepted")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q lacks %q", err, w)
				}
			}
			if c.name == "several bad values" && !errors.Is(err, ErrInvalid) {
				t.Errorf("not ErrInvalid: %v", err)
			}
		})
	}
}

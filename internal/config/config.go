// Package config loads and validates Kinword's one typed configuration: the
// embedded defaults, then an optional TOML file, reported with every problem
// at once. It is loaded in main and passed down; it must not import bleve,
// gin or database drivers.
package config

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"regexp"
	"sort"
	"strings"

	"github.com/BurntSushi/toml"

	defaults "kinword/config"
	"kinword/internal/text"
)

// ErrInvalid wraps every validation problem.
var ErrInvalid = errors.New("config: invalid")

// Config is Kinword's configuration. Field comments give units and
// defaults; config/kinword.toml documents each key.
type Config struct {
	// DataDir holds index, tables and store; default "kinword-data".
	DataDir string `toml:"data_dir"`
	// Language is the default Snowball language; default "english".
	Language string `toml:"language"`
	Index    Index  `toml:"index"`
	Ingest   Ingest `toml:"ingest"`
	Search   Search `toml:"search"`
	Server   Server `toml:"server"`
	Store    Store  `toml:"store"`
	Review   Review `toml:"review"`
}

// Review configures the admin's review.
type Review struct {
	// JudgedDir is a judged set the organisation keeps (a folder with
	// topics.tsv and qrels.txt, as kinword eval reads) that the admin's
	// trials of proposed rule changes run against; default "" (trials are
	// off; kinword demo uses the demo's own topics). Checked at start-up.
	JudgedDir string `toml:"judged_dir"`
}

// Store configures the event store.
type Store struct {
	// DSN is "sqlite:PATH" or a PostgreSQL URL; default "sqlite:kinword.db"
	// (relative paths inside the data folder). KINWORD_STORE_DSN overrides.
	DSN string `toml:"dsn"`
	// RetentionDays keeps raw events this long; default 180.
	RetentionDays int `toml:"retention_days"`
}

// Server configures kinword serve.
type Server struct {
	// Addr is the listen address; default 127.0.0.1:7410.
	Addr string `toml:"addr"`
	// DepartmentHeader, GroupsHeader and SecretHeader name the identity
	// headers a trusted proxy sets.
	DepartmentHeader string `toml:"department_header"`
	GroupsHeader     string `toml:"groups_header"`
	SecretHeader     string `toml:"secret_header"`
	// TrustLoopback trusts identity headers from loopback; default false.
	TrustLoopback bool `toml:"trust_loopback"`
	// AllowedOrigins may call the API cross-origin (the widget).
	AllowedOrigins []string `toml:"allowed_origins"`
	// ShutdownGraceSeconds bounds the drain at shutdown; default 10.
	ShutdownGraceSeconds int `toml:"shutdown_grace_seconds"`
	// RefreshSeconds is the suggestion cache lifetime; default 30.
	RefreshSeconds int `toml:"refresh_seconds"`
	// RatePerSecond is each client's request rate (requests per second,
	// a token bucket; 429 beyond it); default 50; 0 turns limiting off.
	RatePerSecond float64 `toml:"rate_per_second"`
	// RateBurst is the token bucket's size (requests); default 100.
	RateBurst int `toml:"rate_burst"`
	// MaxBodyBytes bounds every request body (bytes; 413 beyond it);
	// default and most 1048576 (1 MiB).
	MaxBodyBytes int64 `toml:"max_body_bytes"`
	// Tokens are the API tokens of the librarian and admin roles
	// ([[server.tokens]]); default none. More may come from the file named
	// by KINWORD_TOKENS_FILE (LoadTokensFile).
	Tokens []Token `toml:"tokens"`
}

// Token is one API token entry. The token itself is never stored: only
// its SHA-256, as `kinword token` prints it.
type Token struct {
	// Name identifies the token in logs; unique, letters, digits, '.', '_'
	// or '-'.
	Name string `toml:"name"`
	// Role is "librarian" or "admin".
	Role string `toml:"role"`
	// SHA256 is the lowercase hex SHA-256 of the token (64 digits).
	SHA256 string `toml:"sha256"`
}

// TokensFileEnv names the environment variable that may point at a TOML
// file of [[server.tokens]] entries, added to the configuration's.
const TokensFileEnv = "KINWORD_TOKENS_FILE"

var (
	tokenName = regexp.MustCompile(`^[A-Za-z0-9._-]{1,64}$`)
	hexSHA256 = regexp.MustCompile(`^[0-9a-f]{64}$`)
)

// LoadTokensFile reads a file holding only [[server.tokens]] entries (the
// lines `kinword token` prints) and validates them; "" gives none.
func LoadTokensFile(path string) ([]Token, error) {
	if path == "" {
		return nil, nil
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("config: tokens file: %w", err)
	}
	var f struct {
		Server struct {
			Tokens []Token `toml:"tokens"`
		} `toml:"server"`
	}
	md, err := toml.NewDecoder(bytes.NewReader(b)).Decode(&f)
	if err != nil {
		return nil, fmt.Errorf("config: tokens file %s: %w", path, err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		return nil, fmt.Errorf("%w: tokens file %s: only [[server.tokens]] entries belong there, not %s", ErrInvalid, path, und[0])
	}
	if err := ValidateTokens(f.Server.Tokens); err != nil {
		return nil, fmt.Errorf("tokens file %s: %w", path, err)
	}
	return f.Server.Tokens, nil
}

// ValidateTokens reports every invalid token entry at once: names and
// hashes must be unique, and a value that looks like a token in clear is
// refused.
func ValidateTokens(ts []Token) error {
	var errs []error
	names, sums := map[string]bool{}, map[string]bool{}
	for i, t := range ts {
		bad := func(format string, args ...any) {
			errs = append(errs, fmt.Errorf("%w: server.tokens[%d] (%q): %s", ErrInvalid, i, t.Name, fmt.Sprintf(format, args...)))
		}
		if !tokenName.MatchString(t.Name) {
			bad("name must be 1 to 64 letters, digits, '.', '_' or '-'")
		}
		if t.Role != "librarian" && t.Role != "admin" {
			bad("role %q is neither librarian nor admin", t.Role)
		}
		switch {
		case strings.HasPrefix(t.SHA256, "kw_"):
			bad("sha256 holds a token in clear; store only its SHA-256 (kinword token prints it) and make a new token, this one is exposed")
		case !hexSHA256.MatchString(t.SHA256):
			bad("sha256 must be 64 lowercase hex digits")
		}
		if names[t.Name] {
			bad("name used twice")
		}
		if sums[t.SHA256] {
			bad("same hash as another token")
		}
		names[t.Name], sums[t.SHA256] = true, true
	}
	return errors.Join(errs...)
}

// Index configures ranking and bleve writes.
type Index struct {
	// BM25K1 is k1; default 1.2.
	BM25K1 float64 `toml:"bm25_k1"`
	// BM25B is b; default 0.75.
	BM25B float64 `toml:"bm25_b"`
	// BatchSize is documents per bleve batch; default 1000.
	BatchSize int `toml:"batch_size"`
}

// Ingest configures ingestion.
type Ingest struct {
	// MaxFileBytes skips larger files (bytes); default 20 MiB.
	MaxFileBytes int64 `toml:"max_file_bytes"`
	// BatchSize is documents per index batch; default 500.
	BatchSize int `toml:"batch_size"`
	// PDFToText is the pdftotext path; default "" (look up on PATH).
	PDFToText string `toml:"pdftotext"`
}

// Search configures query handling.
type Search struct {
	// Results per page; default 10.
	Results int `toml:"results"`
	// SnippetTokens per snippet; default 30.
	SnippetTokens int `toml:"snippet_tokens"`
	// MaxQueryBytes is the longest query; default 512.
	MaxQueryBytes int `toml:"max_query_bytes"`
	// MaxQueryTerms is the most distinct terms; default 32.
	MaxQueryTerms int `toml:"max_query_terms"`
	// AcceptedWeight is the weight a term the searcher accepts gets in
	// the expanded query, relative to the query's strongest term, in
	// (0, 1]; default 0.3. Evaluation scores suggestions at it too.
	AcceptedWeight float64 `toml:"accepted_weight"`
	// AutoExpand expands every search without clicks (the automatic
	// mode, from the searcher's own top results); default false.
	AutoExpand bool `toml:"auto_expand"`
	// Concurrent bounds the searches computed at once (the rest wait in
	// arrival order); default 0 means twice the cores, -1 no bound.
	Concurrent int `toml:"concurrent"`
	// CacheEntries bounds the suggestion lists kept for reuse (each for
	// one refresh interval); default 0 means 10,000, -1 no bound.
	CacheEntries int `toml:"cache_entries"`
}

// Default returns the embedded defaults.
func Default() Config {
	var c Config
	if _, err := toml.Decode(string(defaults.Default), &c); err != nil {
		panic("config: embedded defaults do not parse: " + err.Error())
	}
	return c
}

// Load returns the defaults overlaid with the file at path ("" = defaults
// only), validated. Unknown keys and every invalid value are reported
// together.
func Load(path string) (Config, error) {
	c := Default()
	if path != "" {
		b, err := os.ReadFile(path)
		if err != nil {
			return Config{}, fmt.Errorf("config: %w", err)
		}
		if err := Parse(b, &c); err != nil {
			return Config{}, fmt.Errorf("%s: %w", path, err)
		}
	}
	if err := c.Validate(); err != nil {
		return Config{}, err
	}
	return c, nil
}

// Parse overlays TOML b onto c, rejecting unknown keys.
func Parse(b []byte, c *Config) error {
	md, err := toml.NewDecoder(bytes.NewReader(b)).Decode(c)
	if err != nil {
		return fmt.Errorf("config: parse: %w", err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		keys := make([]string, len(und))
		for i, k := range und {
			keys[i] = k.String()
		}
		sort.Strings(keys)
		return fmt.Errorf("%w: unknown keys: %s", ErrInvalid, strings.Join(keys, ", "))
	}
	return nil
}

// originShape is the serialised form of a web origin (RFC 6454 section
// 6.1) as a browser sends it in Origin: lower-case scheme and host, an
// optional port, no path.
var originShape = regexp.MustCompile(`^https?://[a-z0-9.\-]+(:[0-9]{1,5})?$|^https?://\[[0-9a-f:.]+\](:[0-9]{1,5})?$`)

// Validate reports every invalid value at once.
func (c Config) Validate() error {
	var errs []error
	bad := func(key, format string, args ...any) {
		errs = append(errs, fmt.Errorf("%w: %s: %s", ErrInvalid, key, fmt.Sprintf(format, args...)))
	}
	if strings.TrimSpace(c.DataDir) == "" {
		bad("data_dir", "must not be empty")
	}
	if !text.ValidLanguage(c.Language) {
		bad("language", "%q is not one of %v", c.Language, text.Languages)
	}
	if !(c.Index.BM25K1 > 0 && c.Index.BM25K1 <= 10) { // written so that NaN fails
		bad("index.bm25_k1", "%v is outside (0, 10]", c.Index.BM25K1)
	}
	if !(c.Index.BM25B >= 0 && c.Index.BM25B <= 1) {
		bad("index.bm25_b", "%v is outside [0, 1]", c.Index.BM25B)
	}
	if c.Index.BatchSize < 1 || c.Index.BatchSize > 100000 {
		bad("index.batch_size", "%d is outside 1..100000", c.Index.BatchSize)
	}
	if c.Ingest.MaxFileBytes < 1 {
		bad("ingest.max_file_bytes", "%d must be positive", c.Ingest.MaxFileBytes)
	}
	if c.Ingest.BatchSize < 1 || c.Ingest.BatchSize > 100000 {
		bad("ingest.batch_size", "%d is outside 1..100000", c.Ingest.BatchSize)
	}
	if c.Search.Concurrent < -1 || c.Search.Concurrent > 4096 {
		bad("search.concurrent", "%d is outside -1..4096 (0: twice the cores, -1: no bound)", c.Search.Concurrent)
	}
	if c.Search.CacheEntries < -1 || c.Search.CacheEntries > 10_000_000 {
		bad("search.cache_entries", "%d is outside -1..10000000 (0: 10,000, -1: no bound)", c.Search.CacheEntries)
	}
	if !(c.Search.AcceptedWeight > 0 && c.Search.AcceptedWeight <= 1) {
		bad("search.accepted_weight", "%g is outside (0, 1]", c.Search.AcceptedWeight)
	}
	if c.Search.Results < 1 || c.Search.Results > 1000 {
		bad("search.results", "%d is outside 1..1000", c.Search.Results)
	}
	if c.Search.SnippetTokens < 5 || c.Search.SnippetTokens > 200 {
		bad("search.snippet_tokens", "%d is outside 5..200", c.Search.SnippetTokens)
	}
	if c.Search.MaxQueryBytes < 16 || c.Search.MaxQueryBytes > 65536 {
		bad("search.max_query_bytes", "%d is outside 16..65536", c.Search.MaxQueryBytes)
	}
	if c.Search.MaxQueryTerms < 1 || c.Search.MaxQueryTerms > 1024 {
		bad("search.max_query_terms", "%d is outside 1..1024", c.Search.MaxQueryTerms)
	}
	if !strings.HasPrefix(c.Store.DSN, "sqlite:") && !strings.HasPrefix(c.Store.DSN, "postgres://") && !strings.HasPrefix(c.Store.DSN, "postgresql://") {
		bad("store.dsn", "%q is neither sqlite:PATH nor a postgres:// URL", c.Store.DSN)
	}
	if c.Store.RetentionDays < 1 || c.Store.RetentionDays > 3650 {
		bad("store.retention_days", "%d is outside 1..3650", c.Store.RetentionDays)
	}
	if strings.TrimSpace(c.Server.Addr) == "" {
		bad("server.addr", "must not be empty")
	}
	for _, o := range c.Server.AllowedOrigins {
		if !strings.HasPrefix(o, "http://") && !strings.HasPrefix(o, "https://") {
			bad("server.allowed_origins", "%q must start with http:// or https://", o)
		} else if !originShape.MatchString(o) {
			bad("server.allowed_origins", "%q is not scheme://host[:port] in lower case (no path, not even /)", o)
		}
	}
	if !(c.Server.RatePerSecond >= 0 && c.Server.RatePerSecond <= 100000) {
		bad("server.rate_per_second", "%v is outside 0..100000", c.Server.RatePerSecond)
	}
	if c.Server.RateBurst < 1 || c.Server.RateBurst > 1000000 {
		bad("server.rate_burst", "%d is outside 1..1000000", c.Server.RateBurst)
	}
	if c.Server.MaxBodyBytes < 1024 || c.Server.MaxBodyBytes > 1<<20 {
		bad("server.max_body_bytes", "%d is outside 1024..1048576", c.Server.MaxBodyBytes)
	}
	if c.Server.ShutdownGraceSeconds < 1 || c.Server.ShutdownGraceSeconds > 300 {
		bad("server.shutdown_grace_seconds", "%d is outside 1..300", c.Server.ShutdownGraceSeconds)
	}
	if c.Server.RefreshSeconds < 1 || c.Server.RefreshSeconds > 3600 {
		bad("server.refresh_seconds", "%d is outside 1..3600", c.Server.RefreshSeconds)
	}
	if err := ValidateTokens(c.Server.Tokens); err != nil {
		errs = append(errs, err)
	}
	return errors.Join(errs...)
}

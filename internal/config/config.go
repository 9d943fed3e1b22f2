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
	if c.Index.BM25K1 <= 0 || c.Index.BM25K1 > 10 {
		bad("index.bm25_k1", "%v is outside (0, 10]", c.Index.BM25K1)
	}
	if c.Index.BM25B < 0 || c.Index.BM25B > 1 {
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
		}
	}
	if c.Server.ShutdownGraceSeconds < 1 || c.Server.ShutdownGraceSeconds > 300 {
		bad("server.shutdown_grace_seconds", "%d is outside 1..300", c.Server.ShutdownGraceSeconds)
	}
	if c.Server.RefreshSeconds < 1 || c.Server.RefreshSeconds > 3600 {
		bad("server.refresh_seconds", "%d is outside 1..3600", c.Server.RefreshSeconds)
	}
	return errors.Join(errs...)
}

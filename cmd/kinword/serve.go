package main

import (
	"context"
	"fmt"
	"os"
	"os/signal"
	"path/filepath"
	"strings"
	"syscall"
	"time"

	"kinword/internal/config"
	"kinword/internal/finder"
	"kinword/internal/store"
	"kinword/internal/text"
	"kinword/internal/web"
)

func init() {
	register(&command{name: "serve", summary: "serve the search page and the JSON API (search with suggestions, suggestions alone) over the data folder",
		usage: "[--addr HOST:PORT] [--data DIR] [--snapshots SHARED]", run: runServe})
}

// demoPersonas are the departments a demo visitor may search as.
var demoPersonas = []web.Persona{
	{Department: "field-operations", Label: "Field Operations"},
	{Department: "asset-engineering", Label: "Asset Engineering"},
	{Department: "people-culture", Label: "People & Culture"},
	{Department: "people-culture", Label: "People & Culture, confidential casework", Groups: []string{"people-confidential"}},
	{Department: "finance-procurement", Label: "Finance & Procurement"},
	{Department: "it-service-desk", Label: "IT Service Desk"},
	{Department: "legal-compliance", Label: "Legal & Compliance"},
	{Department: "health-safety-environment", Label: "Health, Safety & Environment"},
	{Department: "customer-care", Label: "Customer Care"},
}

func runServe(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("serve", e.stderr)
	addr := fs.String("addr", "", "listen address (default server.addr from the config, 127.0.0.1:7410)")
	snaps := fs.String("snapshots", os.Getenv("KINWORD_SNAPSHOTS"), "shared folder written by kinword publish: serve its current version and swap in newer ones every server.refresh_seconds (default $KINWORD_SNAPSHOTS)")
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	return e.serveWith(ctx, *addr, false, *snaps)
}

// serve opens the finder on the data folder and serves until ctx ends.
// SIGHUP reloads the index snapshot and the association table (as POST
// /api/v1/reload does).
func (e *env) serve(ctx context.Context, addr string, demo bool) error {
	return e.serveWith(ctx, addr, demo, "")
}

// serveWith is serve; with shared set it serves the snapshots published
// there (snapshots.go) instead of the data folder's own index.
func (e *env) serveWith(ctx context.Context, addr string, demo bool, shared string) error {
	if addr == "" {
		addr = e.cfg.Server.Addr
	}
	tokens, err := e.apiTokens()
	if err != nil {
		return err
	}
	p, err := text.NewPipeline(e.cfg.Language)
	if err != nil {
		return err
	}
	start := time.Now()
	dir, version, rep := e.dataDir, "", (*replica)(nil)
	if shared != "" {
		rep = newReplica(shared, e.dataDir, e.log)
		dir, version = rep.start(ctx, e.dataDir)
	}
	f, err := finder.Open(ctx, dir, p, finder.Options{
		BM25: e.bm25(), Results: e.cfg.Search.Results, SnippetTokens: e.cfg.Search.SnippetTokens,
		Limits: e.queryLimits(), CacheTTL: time.Duration(e.cfg.Server.RefreshSeconds) * time.Second, Version: version,
		AcceptWeight: e.cfg.Search.AcceptedWeight, AutoExpand: e.cfg.Search.AutoExpand, Concurrent: e.cfg.Search.Concurrent, CacheEntries: e.cfg.Search.CacheEntries,
	})
	if err != nil {
		return err
	}
	defer f.Close()
	st, err := e.openStore(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	judged, err := loadJudged(e.cfg.Review.JudgedDir)
	if err != nil {
		return err
	}
	refresh := time.Duration(e.cfg.Server.RefreshSeconds) * time.Second
	retention := time.Duration(e.cfg.Store.RetentionDays) * 24 * time.Hour
	go learnLoop(ctx, e.log, st, f, &rulesRefresher{st: st, f: f, p: p}, refresh, retention)
	go pruneLoop(ctx, e.log, st, retention)
	opts := web.Options{Events: st, Addr: addr, Demo: demo, AllowedOrigins: e.cfg.Server.AllowedOrigins, Log: e.log, Tokens: tokens,
		ShutdownGrace: time.Duration(e.cfg.Server.ShutdownGraceSeconds) * time.Second,
		Rules:         curation{st: st}, Reviewer: curation{st: st}, Trials: &trialKeeper{st: st, s: f, p: p, col: judged}, Readers: f, Pipeline: p, RulesChanged: rulesNow(ctx, e.log, st, f, p),
		Identity: web.Identity{DepartmentHeader: e.cfg.Server.DepartmentHeader, GroupsHeader: e.cfg.Server.GroupsHeader,
			SecretHeader: e.cfg.Server.SecretHeader, Secret: os.Getenv("KINWORD_PROXY_SECRET"), TrustLoopback: e.cfg.Server.TrustLoopback},
		RateLimit: web.RateLimit{PerSecond: e.cfg.Server.RatePerSecond, Burst: e.cfg.Server.RateBurst}, MaxBodyBytes: e.cfg.Server.MaxBodyBytes, MaxQueryBytes: e.cfg.Search.MaxQueryBytes,
	}
	if demo {
		opts.Personas = demoPersonas
	}
	srv, err := web.New(f, opts)
	if err != nil {
		return err
	}
	if rep != nil {
		rep.count = srv.CountReload
		go rep.loop(ctx, f, refresh)
	}
	hup := make(chan os.Signal, 1)
	signal.Notify(hup, syscall.SIGHUP)
	defer signal.Stop(hup)
	go func() {
		for range hup {
			_ = srv.Reload(ctx, "SIGHUP") // logs and counts the outcome itself
		}
	}()
	return srv.Run(ctx, func(a string) {
		st := f.Status()
		fmt.Fprintf(e.stdout, "serving %d documents on http://%s/ (ready in %s; association table: %v)\n", st.Documents, a, time.Since(start).Round(time.Millisecond), st.Table)
		if demo {
			fmt.Fprintln(e.stdout, "demo mode: visitors may pick a department persona; invented data only. Ctrl-C stops.")
			fmt.Fprintln(e.stdout, "demo mode: callers on this machine (loopback) act as admin without a token; never use demo mode for real data.")
		}
	})
}

// openStore opens the event store named by the configuration (relative
// SQLite paths live in the data folder); KINWORD_STORE_DSN overrides.
func (e *env) openStore(ctx context.Context) (*store.Store, error) {
	dsn := e.cfg.Store.DSN
	if v := os.Getenv("KINWORD_STORE_DSN"); v != "" {
		dsn = v
	}
	if p, ok := strings.CutPrefix(dsn, "sqlite:"); ok && !filepath.IsAbs(p) {
		dsn = "sqlite:" + filepath.Join(e.dataDir, p)
	}
	return store.Open(ctx, dsn)
}

// apiTokens returns the configured API tokens ([[server.tokens]] in the
// configuration, plus the file named by KINWORD_TOKENS_FILE), checked
// together so that names stay unique across both.
func (e *env) apiTokens() ([]web.Token, error) {
	more, err := config.LoadTokensFile(os.Getenv(config.TokensFileEnv))
	if err != nil {
		return nil, err
	}
	all := append(append([]config.Token(nil), e.cfg.Server.Tokens...), more...)
	if err := config.ValidateTokens(all); err != nil {
		return nil, err
	}
	out := make([]web.Token, len(all))
	for i, t := range all {
		out[i] = web.Token{Name: t.Name, Role: web.Role(t.Role), SHA256: t.SHA256}
	}
	return out, nil
}

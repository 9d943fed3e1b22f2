package store

import (
	"context"
	"database/sql"
	"embed"
	"fmt"
	"io/fs"
	"sort"
	"strconv"
	"strings"
	"time"
)

// Migrations are append-only: a released file is never edited, a change
// is a new file with the next number. Files are named NNNN_name.sql; the
// token {{SEQ}} becomes the dialect's sequence column type.
//
//go:embed migrations/*.sql
var migrationFS embed.FS

type migration struct {
	version int
	name    string
	body    string
}

func loadMigrations() ([]migration, error) {
	names, err := fs.Glob(migrationFS, "migrations/*.sql")
	if err != nil {
		return nil, fmt.Errorf("store: migrations: %w", err)
	}
	var ms []migration
	for _, n := range names {
		base := strings.TrimSuffix(strings.TrimPrefix(n, "migrations/"), ".sql")
		num, _, ok := strings.Cut(base, "_")
		v, err := strconv.Atoi(num)
		if !ok || err != nil || v <= 0 {
			return nil, fmt.Errorf("store: migrations: bad file name %q (want NNNN_name.sql)", n)
		}
		body, err := migrationFS.ReadFile(n)
		if err != nil {
			return nil, fmt.Errorf("store: migrations: %w", err)
		}
		ms = append(ms, migration{version: v, name: base, body: string(body)})
	}
	sort.Slice(ms, func(i, j int) bool { return ms[i].version < ms[j].version })
	for i, m := range ms {
		if m.version != i+1 {
			return nil, fmt.Errorf("store: migrations: version %d missing or repeated", i+1)
		}
	}
	return ms, nil
}

// statements splits a migration into statements: it drops "--" comment
// lines and splits on ';' at the end of a line.
func statements(body string, d dialect) []string {
	body = strings.ReplaceAll(body, "{{SEQ}}", d.seqType)
	var out []string
	var cur strings.Builder
	for _, line := range strings.Split(body, "\n") {
		t := strings.TrimSpace(line)
		if t == "" || strings.HasPrefix(t, "--") {
			continue
		}
		cur.WriteString(line)
		cur.WriteByte('\n')
		if strings.HasSuffix(t, ";") {
			out = append(out, strings.TrimSuffix(strings.TrimSpace(cur.String()), ";"))
			cur.Reset()
		}
	}
	if s := strings.TrimSpace(cur.String()); s != "" {
		out = append(out, s)
	}
	return out
}

// migrate applies, each in its own transaction, the migrations not yet
// recorded in schema_migrations.
func migrate(ctx context.Context, db *sql.DB, d dialect) error {
	ms, err := loadMigrations()
	if err != nil {
		return err
	}
	if _, err := db.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (
    version       INTEGER PRIMARY KEY,
    name          TEXT NOT NULL,
    applied_at_ns BIGINT NOT NULL)`); err != nil {
		return fmt.Errorf("store: migrate: %w: %w", ErrUnavailable, err)
	}
	applied := map[int]bool{}
	rows, err := db.QueryContext(ctx, "SELECT version FROM schema_migrations")
	if err != nil {
		return fmt.Errorf("store: migrate: %w: %w", ErrUnavailable, err)
	}
	for rows.Next() {
		var v int
		if err := rows.Scan(&v); err != nil {
			rows.Close()
			return fmt.Errorf("store: migrate: %w", err)
		}
		applied[v] = true
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return fmt.Errorf("store: migrate: %w: %w", ErrUnavailable, err)
	}
	for _, m := range ms {
		if applied[m.version] {
			continue
		}
		if err := applyMigration(ctx, db, d, m); err != nil {
			return err
		}
	}
	if len(applied) > len(ms) {
		return fmt.Errorf("store: migrate: database has %d migrations, this build knows %d: newer schema", len(applied), len(ms))
	}
	return nil
}

func applyMigration(ctx context.Context, db *sql.DB, d dialect, m migration) error {
	tx, err := db.BeginTx(ctx, nil)
	if err != nil {
		return fmt.Errorf("store: migrate %s: %w: %w", m.name, ErrUnavailable, err)
	}
	defer tx.Rollback() //nolint:errcheck // no-op after Commit
	for _, st := range statements(m.body, d) {
		if _, err := tx.ExecContext(ctx, st); err != nil {
			return fmt.Errorf("store: migrate %s: %w", m.name, err)
		}
	}
	if _, err := tx.ExecContext(ctx, d.q("INSERT INTO schema_migrations (version, name, applied_at_ns) VALUES (?, ?, ?)"),
		m.version, m.name, time.Now().UnixNano()); err != nil {
		return fmt.Errorf("store: migrate %s: %w", m.name, err)
	}
	if err := tx.Commit(); err != nil {
		return fmt.Errorf("store: migrate %s: %w: %w", m.name, ErrUnavailable, err)
	}
	return nil
}

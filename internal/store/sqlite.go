package store

import (
	"context"
	"database/sql"
	"fmt"
	"net/url"
	"strconv"
	"strings"

	_ "modernc.org/sqlite" // registers driver "sqlite" (pure Go)
)

// dialect holds the few differences between the two databases; the schema
// and every query are otherwise shared.
type dialect struct {
	name    string // "sqlite" or "postgres"
	dollar  bool   // placeholders are $1, $2, ... instead of ?
	seqType string // column type of the commit-order sequence
}

// q rewrites the ? placeholders of a shared query for the dialect. Queries
// in this package never contain a literal '?'.
func (d dialect) q(query string) string {
	if !d.dollar {
		return query
	}
	var b strings.Builder
	n := 0
	for _, r := range query {
		if r == '?' {
			n++
			b.WriteByte('$')
			b.WriteString(strconv.Itoa(n))
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

var sqliteDialect = dialect{
	name: "sqlite",
	// AUTOINCREMENT keeps seq strictly increasing even after Prune empties
	// the table (a plain rowid may reuse the largest value).
	seqType: "INTEGER PRIMARY KEY AUTOINCREMENT",
}

// sqlitePragmas are applied by the driver to every new connection, in
// order. WAL lets readers run beside the writer; synchronous=FULL makes
// every WAL commit fsync before it returns, so an acknowledged commit
// survives a killed process and a power loss (SQLite documentation, "PRAGMA
// synchronous" and "Write-Ahead Logging"); busy_timeout makes a second
// writer (Prune, another process) wait instead of failing at once.
var sqlitePragmas = []string{
	"busy_timeout(10000)",
	"journal_mode(WAL)",
	"synchronous(FULL)",
	"foreign_keys(1)",
}

func openSQLite(ctx context.Context, path string, maxPages int) (*sql.DB, dialect, error) {
	if path == "" {
		return nil, dialect{}, fmt.Errorf("store: open sqlite: %w: empty path", ErrInvalid)
	}
	v := url.Values{}
	for _, p := range sqlitePragmas {
		v.Add("_pragma", p)
	}
	if maxPages > 0 {
		v.Add("_pragma", "max_page_count("+strconv.Itoa(maxPages)+")")
	}
	// BEGIN IMMEDIATE: a write transaction takes the write lock up front,
	// so busy_timeout applies instead of a lock-upgrade deadlock.
	v.Set("_txlock", "immediate")
	db, err := sql.Open("sqlite", path+"?"+v.Encode())
	if err != nil {
		return nil, dialect{}, fmt.Errorf("store: open sqlite: %w", err)
	}
	db.SetMaxOpenConns(4) // one writer plus readers
	if err := checkSQLite(ctx, db); err != nil {
		db.Close()
		return nil, dialect{}, err
	}
	return db, sqliteDialect, nil
}

// checkSQLite confirms the connection really runs with the durability
// settings: journal_mode reads back "wal", synchronous reads back 2 (FULL).
// The codes are from the SQLite documentation, "PRAGMA synchronous"
// (0 OFF, 1 NORMAL, 2 FULL, 3 EXTRA).
func checkSQLite(ctx context.Context, db *sql.DB) error {
	var mode string
	if err := db.QueryRowContext(ctx, "PRAGMA journal_mode").Scan(&mode); err != nil {
		return fmt.Errorf("store: open sqlite: %w: %w", ErrUnavailable, err)
	}
	var syncLevel int
	if err := db.QueryRowContext(ctx, "PRAGMA synchronous").Scan(&syncLevel); err != nil {
		return fmt.Errorf("store: open sqlite: %w: %w", ErrUnavailable, err)
	}
	if !strings.EqualFold(mode, "wal") || syncLevel != 2 {
		return fmt.Errorf("store: open sqlite: journal_mode=%s synchronous=%d, want wal and 2 (FULL)", mode, syncLevel)
	}
	return nil
}

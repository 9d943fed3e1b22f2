package store

import (
	"context"
	"strings"
	"testing"
	"time"
	"unicode/utf8"
)

func TestDialectPlaceholders(t *testing.T) {
	cases := []struct {
		name string
		d    dialect
		in   string
		want string
	}{
		{"sqlite keeps ?", sqliteDialect, "SELECT 1 WHERE a = ? AND b = ?", "SELECT 1 WHERE a = ? AND b = ?"},
		// PostgreSQL numbers parameters $1, $2, ... (PostgreSQL documentation, "Positional Parameters").
		{"postgres numbers", postgresDialect, "SELECT 1 WHERE a = ? AND b = ?", "SELECT 1 WHERE a = $1 AND b = $2"},
		{"postgres no params", postgresDialect, "SELECT 1", "SELECT 1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.d.q(c.in); got != c.want {
				t.Errorf("q(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

func TestStatements(t *testing.T) {
	body := "-- comment\nCREATE TABLE a (\n  seq {{SEQ}},\n  x TEXT\n);\n\nCREATE INDEX a_x ON a (x);\n"
	got := statements(body, postgresDialect)
	if len(got) != 2 || !strings.Contains(got[0], postgresDialect.seqType) || strings.Contains(got[0], "comment") ||
		strings.TrimSpace(got[1]) != "CREATE INDEX a_x ON a (x)" {
		t.Errorf("statements = %q", got)
	}
	ms, err := loadMigrations()
	if err != nil || len(ms) == 0 || ms[0].name != "0001_events" {
		t.Fatalf("loadMigrations = %v, %v", ms, err)
	}
}

// TestSQLiteDurabilitySettings reads the pragmas back from the driver.
// Expected values: journal_mode "wal"; synchronous 2 = FULL (SQLite
// documentation, "PRAGMA synchronous": 0 OFF, 1 NORMAL, 2 FULL, 3 EXTRA);
// busy_timeout in milliseconds ("PRAGMA busy_timeout").
func TestSQLiteDurabilitySettings(t *testing.T) {
	s := openTest(t, backend{name: "sqlite", dsn: sqliteDSN})
	ctx := context.Background()
	conn, err := s.db.Conn(ctx) // pragmas are per connection: check a pooled one
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	var mode string
	var syncLevel, busy int
	if err := conn.QueryRowContext(ctx, "PRAGMA journal_mode").Scan(&mode); err != nil {
		t.Fatal(err)
	}
	if err := conn.QueryRowContext(ctx, "PRAGMA synchronous").Scan(&syncLevel); err != nil {
		t.Fatal(err)
	}
	if err := conn.QueryRowContext(ctx, "PRAGMA busy_timeout").Scan(&busy); err != nil {
		t.Fatal(err)
	}
	if mode != "wal" || syncLevel != 2 || busy != 10000 {
		t.Errorf("journal_mode=%s synchronous=%d busy_timeout=%d, want wal 2 10000", mode, syncLevel, busy)
	}
}

// TestPostgresSynchronousCommit: the session must run with
// synchronous_commit=on (PostgreSQL documentation, "synchronous_commit").
func TestPostgresSynchronousCommit(t *testing.T) {
	s := openTest(t, backend{name: "postgres", dsn: postgresDSN})
	var v string
	if err := s.db.QueryRow("SHOW synchronous_commit").Scan(&v); err != nil {
		t.Fatal(err)
	}
	if v != "on" {
		t.Errorf("synchronous_commit = %q, want on", v)
	}
}

func TestValidateLimits(t *testing.T) {
	exact := strings.Repeat("é", MaxFieldBytes/2) // 512 bytes: the limit itself is allowed
	cases := []struct {
		name string
		e    Event
		ok   bool
	}{
		{"512-byte term accepted", Event{ID: "x", Impression: "i", Kind: KindAccept, Time: t0, Term: exact}, true},
		{"513-byte term rejected", Event{ID: "x", Impression: "i", Kind: KindAccept, Time: t0, Term: exact + "a"}, false},
		{"year 2300 out of int64 ns", Event{ID: "x", Impression: "i", Kind: KindAccept, Time: time.Date(2300, 1, 1, 0, 0, 0, 0, time.UTC), Term: "t"}, false},
		{"terms on accept rejected", Event{ID: "x", Impression: "i", Kind: KindAccept, Time: t0, Term: "t", Terms: []string{"u"}}, false},
		{"empty impression allowed", Event{ID: "x", Impression: "i", Kind: KindImpression, Time: t0}, true},
		{"click without doc rejected", Event{ID: "x", Impression: "i", Kind: KindClick, Time: t0}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := validateEvent(&c.e)
			if (err == nil) != c.ok {
				t.Errorf("validateEvent = %v, want ok=%v", err, c.ok)
			}
		})
	}
}

// FuzzValidateEvent: validation never panics, and whatever it accepts
// obeys the stored-field rules (valid UTF-8, no NUL, at most 512 bytes).
func FuzzValidateEvent(f *testing.F) {
	f.Add("id", "imp", "accept", "term", "doc", "query", 0, 0)
	f.Add("", "imp", "click", "", "d", "", 3, -1)
	f.Add("i\xff", "\x00", "impression", "a", "", strings.Repeat("q", 600), -1, 2)
	f.Fuzz(func(t *testing.T, id, imp, kind, term, doc, query string, pos, rank int) {
		e := Event{ID: id, Impression: imp, Kind: kind, Time: t0, Term: term, Doc: doc, Query: query,
			Position: pos, Rank: rank, Terms: []string{term}}
		if kind != KindImpression && kind != KindClick {
			e.Terms = nil
		}
		if validateEvent(&e) != nil {
			return
		}
		for _, v := range []string{id, imp, kind, term, doc, query} {
			if !utf8.ValidString(v) || len(v) > MaxFieldBytes || strings.IndexByte(v, 0) >= 0 {
				t.Fatalf("accepted bad field %q", v)
			}
		}
		if id == "" || imp == "" || pos < 0 || rank < 0 || !validKinds[kind] {
			t.Fatalf("accepted %+v", e)
		}
	})
}

package store

// Stored trial reports. The store does not read the report: it keeps the
// JSON the caller gives and lists trials by time.

import (
	"context"
	"crypto/rand"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"time"
	"unicode/utf8"
)

// ErrTrialNotFound: no stored trial has the ID asked for.
var ErrTrialNotFound = errors.New("store: trial not found")

// Trial limits.
const (
	// MaxTrialBytes is the largest stored report, in bytes of JSON.
	MaxTrialBytes = 4 << 20
	// MaxTrialList is the most trials one listing returns.
	MaxTrialList = 500
)

// Trial is one stored trial report.
type Trial struct {
	ID      string          // "t" + 12 hex digits; SaveTrial assigns it when empty
	Created time.Time       // when it ran (UTC, nanosecond precision)
	Actor   string          // who ran it
	Title   string          // what was tried
	Report  json.RawMessage // the whole report; Trials leaves it nil
}

// SaveTrial stores t and returns its ID. An empty ID gets a random one;
// an ID in use gives ErrConflict.
func (s *Store) SaveTrial(ctx context.Context, t Trial) (string, error) {
	if t.ID == "" {
		var b [6]byte
		if _, err := rand.Read(b[:]); err != nil {
			return "", fmt.Errorf("store: save trial: %w", err)
		}
		t.ID = "t" + hex.EncodeToString(b[:])
	}
	for _, f := range []struct{ name, v string }{{"id", t.ID}, {"actor", t.Actor}, {"title", t.Title}} {
		if err := checkRuleString(f.name, f.v, false); err != nil {
			return "", fmt.Errorf("store: save trial: %w: %s", ErrInvalid, err)
		}
	}
	if len(t.Report) > MaxTrialBytes || !json.Valid(t.Report) || !utf8.Valid(t.Report) {
		return "", fmt.Errorf("store: save trial: %w: the report must be valid JSON of at most %d bytes", ErrInvalid, MaxTrialBytes)
	}
	if t.Created.IsZero() {
		t.Created = time.Now()
	}
	var n int
	if err := s.db.QueryRowContext(ctx, s.d.q("SELECT COUNT(*) FROM trials WHERE id = ?"), t.ID).Scan(&n); err != nil {
		return "", fmt.Errorf("store: save trial: %w", unavailable(err))
	}
	if n > 0 {
		return "", fmt.Errorf("store: save trial %s: %w: ID in use", t.ID, ErrConflict)
	}
	_, err := s.db.ExecContext(ctx, s.d.q("INSERT INTO trials (id, created_ns, actor, title, report_json) VALUES (?, ?, ?, ?, ?)"),
		t.ID, t.Created.UnixNano(), t.Actor, t.Title, string(t.Report))
	if err != nil {
		return "", fmt.Errorf("store: save trial: %w", unavailable(err))
	}
	return t.ID, nil
}

// Trials lists the newest limit trials (default and most MaxTrialList),
// newest first, without their reports.
func (s *Store) Trials(ctx context.Context, limit int) ([]Trial, error) {
	if limit <= 0 || limit > MaxTrialList {
		limit = MaxTrialList
	}
	rows, err := s.db.QueryContext(ctx, s.d.q("SELECT id, created_ns, actor, title FROM trials ORDER BY created_ns DESC, id LIMIT ?"), limit)
	if err != nil {
		return nil, fmt.Errorf("store: trials: %w", unavailable(err))
	}
	defer rows.Close()
	out := []Trial{}
	for rows.Next() {
		var t Trial
		var ns int64
		if err := rows.Scan(&t.ID, &ns, &t.Actor, &t.Title); err != nil {
			return nil, fmt.Errorf("store: trials: %w", unavailable(err))
		}
		t.Created = time.Unix(0, ns).UTC()
		out = append(out, t)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("store: trials: %w", unavailable(err))
	}
	return out, nil
}

// Trial returns the stored trial id with its report, or ErrTrialNotFound.
func (s *Store) Trial(ctx context.Context, id string) (Trial, error) {
	t := Trial{ID: id}
	var ns int64
	var rep string
	err := s.db.QueryRowContext(ctx, s.d.q("SELECT created_ns, actor, title, report_json FROM trials WHERE id = ?"), id).
		Scan(&ns, &t.Actor, &t.Title, &rep)
	if errors.Is(err, sql.ErrNoRows) {
		return Trial{}, fmt.Errorf("store: trial %q: %w", id, ErrTrialNotFound)
	}
	if err != nil {
		return Trial{}, fmt.Errorf("store: trial: %w", unavailable(err))
	}
	t.Created, t.Report = time.Unix(0, ns).UTC(), json.RawMessage(rep)
	return t, nil
}

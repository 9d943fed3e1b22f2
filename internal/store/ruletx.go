package store

import (
	"context"
	"crypto/rand"
	"database/sql"
	"encoding/hex"
	"errors"
	"fmt"
	"sort"
	"time"
)

// ruleTx is one rule-changing transaction: every change it makes and the
// audit rows describing them commit together or not at all.
type ruleTx struct {
	s     *Store
	ctx   context.Context
	tx    *sql.Tx
	now   time.Time // one timestamp for every change of the transaction
	actor string
	why   string
}

// errNoRow marks a lookup that found nothing; callers turn it into their
// own sentinel.
var errNoRow = errors.New("no row")

func unavailable(err error) error { return fmt.Errorf("%w: %w", ErrUnavailable, err) }

// inRuleTx checks actor and why, runs fn in a serialised transaction and
// commits. Every error is prefixed "store: op: ".
func (s *Store) inRuleTx(ctx context.Context, op, actor, why string, fn func(*ruleTx) error) error {
	if err := checkRuleString("actor", actor, true); err != nil {
		return fmt.Errorf("store: %s: %w: %s", op, ErrInvalid, err)
	}
	if err := checkRuleString("reason for the change", why, false); err != nil {
		return fmt.Errorf("store: %s: %w: %s", op, ErrInvalid, err)
	}
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return fmt.Errorf("store: %s: %w", op, unavailable(err))
	}
	defer tx.Rollback() //nolint:errcheck // no-op after Commit
	if s.d.name == postgresDialect.name {
		// Conflicts with itself and with every row write, not with reads:
		// rule writers queue up; seq values then commit in order.
		if _, err := tx.ExecContext(ctx, "LOCK TABLE rules IN SHARE ROW EXCLUSIVE MODE"); err != nil {
			return fmt.Errorf("store: %s: %w", op, unavailable(err))
		}
	}
	rt := &ruleTx{s: s, ctx: ctx, tx: tx, now: time.Unix(0, time.Now().UnixNano()).UTC(), actor: actor, why: why}
	if err := fn(rt); err != nil {
		return fmt.Errorf("store: %s: %w", op, err)
	}
	if err := tx.Commit(); err != nil {
		return fmt.Errorf("store: %s: %w", op, unavailable(err))
	}
	return nil
}

const ruleCols = "id, kind, query_key, term, department, start_ns, expiry_ns, reason, lang, version, updated_ns"

type scanner interface{ Scan(dest ...any) error }

type querier interface {
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
}

func scanRule(sc scanner) (Rule, error) {
	var (
		r             Rule
		start, expiry sql.NullInt64
		updated       int64
	)
	err := sc.Scan(&r.ID, &r.Kind, &r.Query, &r.Term, &r.Department, &start, &expiry, &r.Reason, &r.Lang, &r.Version, &updated)
	if errors.Is(err, sql.ErrNoRows) {
		return Rule{}, errNoRow
	}
	if err != nil {
		return Rule{}, err
	}
	r.Start, r.Expiry = fromNullNs(start), fromNullNs(expiry)
	r.Updated = time.Unix(0, updated).UTC()
	return r, nil
}

func fromNullNs(v sql.NullInt64) time.Time {
	if !v.Valid {
		return time.Time{}
	}
	return time.Unix(0, v.Int64).UTC()
}

func nullNs(t time.Time) sql.NullInt64 {
	if t.IsZero() {
		return sql.NullInt64{}
	}
	return sql.NullInt64{Int64: t.UnixNano(), Valid: true}
}

// readRules reads every rule sorted by ID in byte order.
func readRules(ctx context.Context, q querier, d dialect) ([]Rule, error) {
	rows, err := q.QueryContext(ctx, d.q("SELECT "+ruleCols+" FROM rules"))
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []Rule
	for rows.Next() {
		r, err := scanRule(rows)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	sort.Slice(out, func(i, j int) bool { return out[i].ID < out[j].ID })
	return out, nil
}

// get returns the stored rule id, or nil when there is none.
func (rt *ruleTx) get(id string) (*Rule, error) {
	r, err := scanRule(rt.tx.QueryRowContext(rt.ctx, rt.s.d.q("SELECT "+ruleCols+" FROM rules WHERE id = ?"), id))
	switch {
	case errors.Is(err, errNoRow):
		return nil, nil
	case err != nil:
		return nil, unavailable(err)
	}
	return &r, nil
}

// current returns rule id, which must exist and be at version.
func (rt *ruleTx) current(id string, version int64) (Rule, error) {
	cur, err := rt.get(id)
	switch {
	case err != nil:
		return Rule{}, err
	case cur == nil:
		return Rule{}, fmt.Errorf("%w: %q", ErrRuleNotFound, id)
	case cur.Version != version:
		return Rule{}, fmt.Errorf("%w: rule %q is at version %d, the change was made against version %d", ErrConflict, id, cur.Version, version)
	}
	return *cur, nil
}

// add inserts r as a new rule under action and returns it as stored.
func (rt *ruleTx) add(r Rule, action string) (Rule, error) {
	if r.ID == "" {
		id, err := rt.freshID()
		if err != nil {
			return Rule{}, err
		}
		r.ID = id
	} else if cur, err := rt.get(r.ID); err != nil {
		return Rule{}, err
	} else if cur != nil {
		return Rule{}, fmt.Errorf("%w: rule %q already exists", ErrConflict, r.ID)
	}
	last, err := rt.lastVersion(r.ID)
	if err != nil {
		return Rule{}, err
	}
	r.Version, r.Updated = last+1, rt.now
	if err := rt.insert(r); err != nil {
		return Rule{}, err
	}
	_, err = rt.audit(action, r.ID, nil, &r)
	return r, err
}

// freshID returns an unused random id "r" + 12 hex digits.
func (rt *ruleTx) freshID() (string, error) {
	for range 8 {
		var b [6]byte
		if _, err := rand.Read(b[:]); err != nil {
			return "", fmt.Errorf("random id: %w", err)
		}
		id := "r" + hex.EncodeToString(b[:])
		cur, err := rt.get(id)
		if err != nil {
			return "", err
		}
		last, err := rt.lastVersion(id)
		if err != nil {
			return "", err
		}
		if cur == nil && last == 0 {
			return id, nil
		}
	}
	return "", errors.New("random id: no unused id after 8 tries")
}

func (rt *ruleTx) insert(r Rule) error {
	_, err := rt.tx.ExecContext(rt.ctx, rt.s.d.q("INSERT INTO rules ("+ruleCols+") VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)"),
		r.ID, r.Kind, r.Query, r.Term, r.Department, nullNs(r.Start), nullNs(r.Expiry), r.Reason, r.Lang, r.Version, r.Updated.UnixNano())
	if err != nil {
		return unavailable(err)
	}
	return nil
}

func (rt *ruleTx) update(r Rule) error {
	_, err := rt.tx.ExecContext(rt.ctx, rt.s.d.q(`UPDATE rules SET kind = ?, query_key = ?, term = ?, department = ?,
 start_ns = ?, expiry_ns = ?, reason = ?, lang = ?, version = ?, updated_ns = ? WHERE id = ?`),
		r.Kind, r.Query, r.Term, r.Department, nullNs(r.Start), nullNs(r.Expiry), r.Reason, r.Lang, r.Version, r.Updated.UnixNano(), r.ID)
	if err != nil {
		return unavailable(err)
	}
	return nil
}

func (rt *ruleTx) remove(id string) error {
	if _, err := rt.tx.ExecContext(rt.ctx, rt.s.d.q("DELETE FROM rules WHERE id = ?"), id); err != nil {
		return unavailable(err)
	}
	return nil
}

package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"
)

// Audit actions.
const (
	ActionCreate = "create" // CreateRule
	ActionUpdate = "update" // UpdateRule
	ActionDelete = "delete" // DeleteRule
	ActionRevert = "revert" // Revert
	ActionImport = "import" // ImportRules, ReplaceRules
)

// Audit page sizes.
const (
	DefaultAuditLimit = 100
	MaxAuditLimit     = 1000
)

// AuditFilter selects audit entries. The zero value selects the newest
// DefaultAuditLimit entries of every rule.
type AuditFilter struct {
	RuleID string // only this rule's entries; "" = every rule
	Limit  int    // most entries returned; ≤ 0 = DefaultAuditLimit, capped at MaxAuditLimit
	Before int64  // only entries with Seq < Before (paging: the last Seq seen); ≤ 0 = no bound
}

// AuditEntry is one change of one rule.
type AuditEntry struct {
	Seq    int64     // position in the log, increasing in commit order
	RuleID string    // the rule changed
	Actor  string    // API token name or "demo"
	Action string    // one of the Action constants
	Reason string    // why the change was made, as given
	At     time.Time // when it committed (UTC)
	Before *Rule     // the rule before the change; nil when it did not exist
	After  *Rule     // the rule after the change; nil when it was deleted
}

// ruleRecord is the JSON form of a rule in the audit log; its field names
// are part of the stored format, independent of Go names.
type ruleRecord struct {
	ID         string `json:"id"`
	Kind       string `json:"kind"`
	Query      string `json:"query"`
	Term       string `json:"term"`
	Department string `json:"department"`
	StartNs    *int64 `json:"start_ns,omitempty"`
	ExpiryNs   *int64 `json:"expiry_ns,omitempty"`
	Reason     string `json:"reason"`
	Lang       string `json:"lang"`
	Version    int64  `json:"version"`
	UpdatedNs  int64  `json:"updated_ns"`
}

func encodeRule(r *Rule) string {
	if r == nil {
		return ""
	}
	rec := ruleRecord{ID: r.ID, Kind: r.Kind, Query: r.Query, Term: r.Term, Department: r.Department,
		Reason: r.Reason, Lang: r.Lang, Version: r.Version, UpdatedNs: r.Updated.UnixNano()}
	if v := nullNs(r.Start); v.Valid {
		rec.StartNs = &v.Int64
	}
	if v := nullNs(r.Expiry); v.Valid {
		rec.ExpiryNs = &v.Int64
	}
	b, _ := json.Marshal(rec) // strings are valid UTF-8 (validated): cannot fail
	return string(b)
}

func decodeRule(s string) (*Rule, error) {
	if s == "" {
		return nil, nil
	}
	var rec ruleRecord
	if err := json.Unmarshal([]byte(s), &rec); err != nil {
		return nil, fmt.Errorf("decode audit rule: %w", err)
	}
	r := &Rule{ID: rec.ID, Kind: rec.Kind, Query: rec.Query, Term: rec.Term, Department: rec.Department,
		Reason: rec.Reason, Lang: rec.Lang, Version: rec.Version, Updated: time.Unix(0, rec.UpdatedNs).UTC()}
	if rec.StartNs != nil {
		r.Start = time.Unix(0, *rec.StartNs).UTC()
	}
	if rec.ExpiryNs != nil {
		r.Expiry = time.Unix(0, *rec.ExpiryNs).UTC()
	}
	return r, nil
}

const auditCols = "seq, rule_id, actor, at_ns, action, before_json, after_json, reason"

func scanAudit(sc scanner) (AuditEntry, error) {
	var (
		e             AuditEntry
		ns            int64
		before, after string
	)
	if err := sc.Scan(&e.Seq, &e.RuleID, &e.Actor, &ns, &e.Action, &before, &after, &e.Reason); err != nil {
		return AuditEntry{}, err
	}
	e.At = time.Unix(0, ns).UTC()
	var err error
	if e.Before, err = decodeRule(before); err != nil {
		return AuditEntry{}, err
	}
	if e.After, err = decodeRule(after); err != nil {
		return AuditEntry{}, err
	}
	return e, nil
}

// audit records one change of rule id made in rt.
func (rt *ruleTx) audit(action, id string, before, after *Rule) (AuditEntry, error) {
	e := AuditEntry{RuleID: id, Actor: rt.actor, Action: action, Reason: rt.why, At: rt.now, Before: before, After: after}
	err := rt.tx.QueryRowContext(rt.ctx, rt.s.d.q(`INSERT INTO rule_audit (rule_id, actor, at_ns, action, before_json, after_json, reason)
 VALUES (?, ?, ?, ?, ?, ?, ?) RETURNING seq`),
		id, rt.actor, rt.now.UnixNano(), action, encodeRule(before), encodeRule(after), rt.why).Scan(&e.Seq)
	if err != nil {
		return AuditEntry{}, unavailable(err)
	}
	return e, nil
}

// lastVersion is the version rule id last had (0 if it never existed), so a
// re-created rule continues its numbering and a client holding a version
// of the deleted rule cannot change the new one by accident.
func (rt *ruleTx) lastVersion(id string) (int64, error) {
	var before, after string
	err := rt.tx.QueryRowContext(rt.ctx, rt.s.d.q(
		"SELECT before_json, after_json FROM rule_audit WHERE rule_id = ? ORDER BY seq DESC LIMIT 1"), id).Scan(&before, &after)
	if err != nil {
		if errors.Is(err, sql.ErrNoRows) {
			return 0, nil
		}
		return 0, unavailable(err)
	}
	var last int64
	for _, s := range []string{before, after} {
		r, err := decodeRule(s)
		if err != nil {
			return 0, err
		}
		if r != nil {
			last = max(last, r.Version)
		}
	}
	return last, nil
}

// Audit returns the entries selected by f, newest first.
func (s *Store) Audit(ctx context.Context, f AuditFilter) ([]AuditEntry, error) {
	if err := checkRuleString("rule id", f.RuleID, false); err != nil {
		return nil, fmt.Errorf("store: audit: %w: %s", ErrInvalid, err)
	}
	limit := f.Limit
	if limit <= 0 {
		limit = DefaultAuditLimit
	}
	limit = min(limit, MaxAuditLimit)
	var (
		where []string
		args  []any
	)
	if f.RuleID != "" {
		where, args = append(where, "rule_id = ?"), append(args, f.RuleID)
	}
	if f.Before > 0 {
		where, args = append(where, "seq < ?"), append(args, f.Before)
	}
	q := "SELECT " + auditCols + " FROM rule_audit"
	if len(where) > 0 {
		q += " WHERE " + strings.Join(where, " AND ")
	}
	q += " ORDER BY seq DESC LIMIT ?"
	args = append(args, limit)
	rows, err := s.db.QueryContext(ctx, s.d.q(q), args...)
	if err != nil {
		return nil, fmt.Errorf("store: audit: %w", unavailable(err))
	}
	defer rows.Close()
	var out []AuditEntry
	for rows.Next() {
		e, err := scanAudit(rows)
		if err != nil {
			return nil, fmt.Errorf("store: audit: %w", err)
		}
		out = append(out, e)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("store: audit: %w", unavailable(err))
	}
	return out, nil
}

// RulesVersion is the newest audit sequence number (0 before the first
// change). It changes whenever any rule changes, so replicas can poll it
// cheaply and reload Rules when it moves.
func (s *Store) RulesVersion(ctx context.Context) (int64, error) {
	var v int64
	if err := s.db.QueryRowContext(ctx, "SELECT COALESCE(MAX(seq), 0) FROM rule_audit").Scan(&v); err != nil {
		return 0, fmt.Errorf("store: rules version: %w", unavailable(err))
	}
	return v, nil
}

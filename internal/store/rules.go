package store

// Librarian rules.
//
// A rule pins, blocks or relates a term (what Kind means is the caller's
// business: validation here is only structural). The rules table holds the
// current state; every change commits in the same transaction as one
// rule_audit row (audit.go), so the log and the state never disagree.
//
// Rule writes bypass the event group-commit writer: they are rare, and each
// is one ordinary transaction. They are serialised (SQLite: BEGIN
// IMMEDIATE; PostgreSQL: a table lock taken first), which makes the
// optimistic version checks race-free and makes audit sequence numbers
// commit in increasing order, so RulesVersion never skips a change.

import (
	"context"
	"errors"
	"fmt"
	"sort"
	"strings"
	"time"
	"unicode/utf8"
)

// Sentinel errors of the rule API. Bad input wraps ErrInvalid; database
// failures wrap ErrUnavailable.
var (
	ErrRuleNotFound = errors.New("store: rule not found")
	ErrConflict     = errors.New("store: conflict")
)

// MaxRuleFieldBytes is the longest accepted string field of a rule, actor
// or reason for a change, in bytes.
const MaxRuleFieldBytes = 200

// Rule is one librarian rule as stored. Version and Updated are set by the
// store.
type Rule struct {
	ID         string    // unique; CreateRule assigns "r" + 12 hex digits when empty
	Kind       string    // e.g. "pin", "block", "relate"; required, not interpreted here
	Query      string    // normalised query key the rule applies to; "" = any query
	Term       string    // term key; required
	Department string    // department slug; "" = every department
	Start      time.Time // first instant the rule applies; zero = no start
	Expiry     time.Time // instant the rule stops applying; zero = never
	Reason     string    // the librarian's note on why the rule exists
	Lang       string    // language tag of Term, e.g. "en"; may be empty
	Version    int64     // optimistic-concurrency version: 1 on creation, +1 per change
	Updated    time.Time // when the rule last changed (UTC, nanosecond precision)
}

// CreateRule adds r as a new rule (Version 1, or one past the last version
// an earlier rule with the same ID had) and returns it as stored. An ID
// already in use gives ErrConflict.
func (s *Store) CreateRule(ctx context.Context, r Rule, actor, why string) (Rule, error) {
	if err := validateRule(&r, false); err != nil {
		return Rule{}, fmt.Errorf("store: create rule: %w: %s", ErrInvalid, err)
	}
	err := s.inRuleTx(ctx, "create rule", actor, why, func(rt *ruleTx) error {
		var err error
		r, err = rt.add(r, ActionCreate)
		return err
	})
	if err != nil {
		return Rule{}, err
	}
	return r, nil
}

// UpdateRule replaces the rule r.ID with r. r.Version must equal the stored
// version (else ErrConflict); the stored version is then bumped. An unknown
// ID gives ErrRuleNotFound.
func (s *Store) UpdateRule(ctx context.Context, r Rule, actor, why string) (Rule, error) {
	if err := validateRule(&r, true); err != nil {
		return Rule{}, fmt.Errorf("store: update rule: %w: %s", ErrInvalid, err)
	}
	err := s.inRuleTx(ctx, "update rule", actor, why, func(rt *ruleTx) error {
		cur, err := rt.current(r.ID, r.Version)
		if err != nil {
			return err
		}
		r.Version, r.Updated = cur.Version+1, rt.now
		if err := rt.update(r); err != nil {
			return err
		}
		_, err = rt.audit(ActionUpdate, r.ID, &cur, &r)
		return err
	})
	if err != nil {
		return Rule{}, err
	}
	return r, nil
}

// DeleteRule removes rule id, whose stored version must equal version
// (else ErrConflict). An unknown id gives ErrRuleNotFound.
func (s *Store) DeleteRule(ctx context.Context, id string, version int64, actor, why string) error {
	if err := checkRuleString("id", id, true); err != nil {
		return fmt.Errorf("store: delete rule: %w: %s", ErrInvalid, err)
	}
	return s.inRuleTx(ctx, "delete rule", actor, why, func(rt *ruleTx) error {
		cur, err := rt.current(id, version)
		if err != nil {
			return err
		}
		if err := rt.remove(id); err != nil {
			return err
		}
		_, err = rt.audit(ActionDelete, id, &cur, nil)
		return err
	})
}

// Rule returns rule id, or an error wrapping ErrRuleNotFound.
func (s *Store) Rule(ctx context.Context, id string) (Rule, error) {
	if err := checkRuleString("id", id, true); err != nil {
		return Rule{}, fmt.Errorf("store: rule: %w: %s", ErrInvalid, err)
	}
	row := s.db.QueryRowContext(ctx, s.d.q("SELECT "+ruleCols+" FROM rules WHERE id = ?"), id)
	r, err := scanRule(row)
	switch {
	case errors.Is(err, errNoRow):
		return Rule{}, fmt.Errorf("store: rule: %w: %q", ErrRuleNotFound, id)
	case err != nil:
		return Rule{}, fmt.Errorf("store: rule: %w: %w", ErrUnavailable, err)
	}
	return r, nil
}

// Rules returns every rule, sorted by ID (byte order, whatever the
// database's collation).
func (s *Store) Rules(ctx context.Context) ([]Rule, error) {
	rules, err := readRules(ctx, s.db, s.d)
	if err != nil {
		return nil, fmt.Errorf("store: rules: %w: %w", ErrUnavailable, err)
	}
	return rules, nil
}

// ImportRules adds rules in one transaction, all or nothing: a structural
// problem (ErrInvalid), an ID repeated in rules (ErrInvalid) or already in
// use (ErrConflict) leaves the store unchanged. Empty IDs are assigned.
// Each rule gets one audit entry with action "import".
func (s *Store) ImportRules(ctx context.Context, rules []Rule, actor, why string) error {
	if err := validateRules(rules); err != nil {
		return fmt.Errorf("store: import rules: %w", err)
	}
	return s.inRuleTx(ctx, "import rules", actor, why, func(rt *ruleTx) error {
		for i, r := range rules {
			if _, err := rt.add(r, ActionImport); err != nil {
				return fmt.Errorf("rule %d: %w", i, err)
			}
		}
		return nil
	})
}

// ReplaceRules makes rules the whole rule set in one transaction, all or
// nothing: stored rules absent from rules are deleted, rules whose ID is
// stored replace the stored rule when their content differs (their Version
// is ignored; the stored one is bumped), others are added (empty IDs are
// assigned). Each change gets one audit entry with action "import", in ID
// order; unchanged rules get none.
func (s *Store) ReplaceRules(ctx context.Context, rules []Rule, actor, why string) error {
	if err := validateRules(rules); err != nil {
		return fmt.Errorf("store: replace rules: %w", err)
	}
	return s.inRuleTx(ctx, "replace rules", actor, why, func(rt *ruleTx) error {
		stored, err := readRules(rt.ctx, rt.tx, rt.s.d)
		if err != nil {
			return unavailable(err)
		}
		old := make(map[string]Rule, len(stored))
		for _, r := range stored {
			old[r.ID] = r
		}
		want := make(map[string]Rule, len(rules))
		for _, r := range rules {
			if r.ID == "" {
				if r.ID, err = rt.freshID(); err != nil {
					return err
				}
			}
			want[r.ID] = r
		}
		ids := make([]string, 0, len(old)+len(want))
		for id := range old {
			ids = append(ids, id)
		}
		for id := range want {
			if _, ok := old[id]; !ok {
				ids = append(ids, id)
			}
		}
		sort.Strings(ids)
		for _, id := range ids {
			if err := rt.replaceOne(id, old, want); err != nil {
				return err
			}
		}
		return nil
	})
}

// replaceOne brings rule id from old[id] to want[id] (either may be absent).
func (rt *ruleTx) replaceOne(id string, old, want map[string]Rule) error {
	cur, had := old[id]
	next, keep := want[id]
	switch {
	case had && !keep:
		if err := rt.remove(id); err != nil {
			return err
		}
		_, err := rt.audit(ActionImport, id, &cur, nil)
		return err
	case !had:
		_, err := rt.add(next, ActionImport)
		return err
	case sameContent(cur, next):
		return nil
	}
	next.Version, next.Updated = cur.Version+1, rt.now
	if err := rt.update(next); err != nil {
		return err
	}
	_, err := rt.audit(ActionImport, id, &cur, &next)
	return err
}

// sameContent compares the fields a librarian sets.
func sameContent(a, b Rule) bool {
	return a.Kind == b.Kind && a.Query == b.Query && a.Term == b.Term && a.Department == b.Department &&
		a.Start.Equal(b.Start) && a.Expiry.Equal(b.Expiry) && a.Reason == b.Reason && a.Lang == b.Lang
}

// validateRules checks every rule and that no ID repeats; the error wraps
// ErrInvalid and names the first bad rule's index.
func validateRules(rules []Rule) error {
	seen := make(map[string]int, len(rules))
	for i := range rules {
		if err := validateRule(&rules[i], false); err != nil {
			return fmt.Errorf("%w: rule %d: %s", ErrInvalid, i, err)
		}
		id := rules[i].ID
		if j, ok := seen[id]; ok && id != "" {
			return fmt.Errorf("%w: rule %d: id %q repeats rule %d", ErrInvalid, i, id, j)
		}
		seen[id] = i
	}
	return nil
}

// validateRule returns a plain description of r's first structural
// problem, or nil. needID requires a non-empty ID.
func validateRule(r *Rule, needID bool) error {
	fields := []struct {
		name, v  string
		required bool
	}{
		{"id", r.ID, needID},
		{"kind", r.Kind, true},
		{"query", r.Query, false},
		{"term", r.Term, true},
		{"department", r.Department, false},
		{"reason", r.Reason, false},
		{"lang", r.Lang, false},
	}
	for _, f := range fields {
		if err := checkRuleString(f.name, f.v, f.required); err != nil {
			return err
		}
	}
	for _, t := range []struct {
		name string
		v    time.Time
	}{{"start", r.Start}, {"expiry", r.Expiry}} {
		// Stored as Unix nanoseconds: the time must survive the round trip.
		if !t.v.IsZero() && !time.Unix(0, t.v.UnixNano()).Equal(t.v) {
			return fmt.Errorf("%s %s out of range", t.name, t.v.Format(time.RFC3339))
		}
	}
	return nil
}

// checkRuleString is checkString with the rule limit.
func checkRuleString(name, v string, required bool) error {
	switch {
	case required && strings.TrimSpace(v) == "":
		return fmt.Errorf("missing %s", name)
	case len(v) > MaxRuleFieldBytes:
		return fmt.Errorf("%s is %d bytes, at most %d", name, len(v), MaxRuleFieldBytes)
	case !utf8.ValidString(v):
		return fmt.Errorf("%s is not valid UTF-8", name)
	case strings.IndexByte(v, 0) >= 0:
		return fmt.Errorf("%s contains a NUL byte", name)
	}
	return nil
}

package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
)

// Revert undoes audit entry seq by bringing its rule back to the entry's
// Before state: a created (or imported) rule is deleted, a deleted one is
// re-created, an updated one is restored. The change is recorded as a new
// entry with action "revert", which Revert returns; reverting a revert
// redoes the original change.
//
// The rule must still be exactly as the entry left it (its After state:
// same version and content, or absent), otherwise the revert would silently
// discard a later change and Revert returns an error wrapping ErrConflict
// that says what changed. An unknown seq gives ErrRuleNotFound.
func (s *Store) Revert(ctx context.Context, seq int64, actor, why string) (AuditEntry, error) {
	var out AuditEntry
	err := s.inRuleTx(ctx, "revert", actor, why, func(rt *ruleTx) error {
		e, err := scanAudit(rt.tx.QueryRowContext(rt.ctx, rt.s.d.q("SELECT "+auditCols+" FROM rule_audit WHERE seq = ?"), seq))
		switch {
		case errors.Is(err, sql.ErrNoRows):
			return fmt.Errorf("%w: no audit entry %d", ErrRuleNotFound, seq)
		case err != nil:
			return fmt.Errorf("audit entry %d: %w", seq, unavailable(err))
		}
		cur, err := rt.get(e.RuleID)
		if err != nil {
			return err
		}
		if err := unchangedSince(e, cur); err != nil {
			return err
		}
		switch {
		case e.Before == nil:
			if err := rt.remove(e.RuleID); err != nil {
				return err
			}
			out, err = rt.audit(ActionRevert, e.RuleID, cur, nil)
			return err
		case cur == nil:
			r := *e.Before
			last, err := rt.lastVersion(r.ID)
			if err != nil {
				return err
			}
			r.Version, r.Updated = last+1, rt.now
			if err := rt.insert(r); err != nil {
				return err
			}
			out, err = rt.audit(ActionRevert, r.ID, nil, &r)
			return err
		}
		r := *e.Before
		r.Version, r.Updated = cur.Version+1, rt.now
		if err := rt.update(r); err != nil {
			return err
		}
		out, err = rt.audit(ActionRevert, r.ID, cur, &r)
		return err
	})
	if err != nil {
		return AuditEntry{}, err
	}
	return out, nil
}

// unchangedSince reports, wrapping ErrConflict, how cur (the stored rule,
// nil if absent) differs from the state entry e left it in.
func unchangedSince(e AuditEntry, cur *Rule) error {
	switch {
	case e.After == nil && cur == nil:
		return nil
	case e.After == nil:
		return fmt.Errorf("%w: entry %d deleted rule %q, which exists again (version %d); cannot revert", ErrConflict, e.Seq, e.RuleID, cur.Version)
	case cur == nil:
		return fmt.Errorf("%w: rule %q was deleted after entry %d; cannot revert", ErrConflict, e.RuleID, e.Seq)
	case cur.Version != e.After.Version || !sameContent(*cur, *e.After):
		return fmt.Errorf("%w: rule %q is at version %d, entry %d left it at version %d; cannot revert", ErrConflict, e.RuleID, cur.Version, e.Seq, e.After.Version)
	}
	return nil
}

package store_test

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"kinword/internal/store"
)

// A librarian pins a term, edits it, an admin reverts the edit; a stale
// edit is refused.
func ExampleStore_Revert() {
	dir, _ := os.MkdirTemp("", "kinword-rules-example")
	defer os.RemoveAll(dir)
	ctx := context.Background()
	s, err := store.Open(ctx, "sqlite:"+filepath.Join(dir, "events.db"))
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	r, _ := s.CreateRule(ctx, store.Rule{ID: "r-sluice", Kind: "pin", Query: "reservoir inspection",
		Term: "sluice", Department: "operations"}, "token-librarian", "asked for by the dam team")
	r.Term = "sluice gate"
	edited, _ := s.UpdateRule(ctx, r, "token-librarian", "more precise")
	_, err = s.UpdateRule(ctx, r, "token-librarian", "second edit from an old form")
	fmt.Println("stale edit refused:", errors.Is(err, store.ErrConflict))
	log, _ := s.Audit(ctx, store.AuditFilter{RuleID: "r-sluice"})
	undo, _ := s.Revert(ctx, log[0].Seq, "token-admin", "keep the short form")
	now, _ := s.Rule(ctx, "r-sluice")
	fmt.Println(edited.Term, "->", now.Term, "version", now.Version, "by", undo.Actor)
	log, _ = s.Audit(ctx, store.AuditFilter{})
	for _, e := range log {
		fmt.Println(e.Seq, e.Action, e.Actor, e.Reason)
	}
	// Output:
	// stale edit refused: true
	// sluice gate -> sluice version 3 by token-admin
	// 3 revert token-admin keep the short form
	// 2 update token-librarian more precise
	// 1 create token-librarian asked for by the dam team
}

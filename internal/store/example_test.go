package store_test

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"kinword/internal/store"
)

// Record an impression and an accept of its second term, then read them
// back in commit order.
func Example() {
	dir, _ := os.MkdirTemp("", "kinword-store-example")
	defer os.RemoveAll(dir)
	ctx := context.Background()
	s, err := store.Open(ctx, "sqlite:"+filepath.Join(dir, "events.db"))
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	at := time.Date(2026, 3, 2, 9, 30, 0, 0, time.UTC)
	err = s.Append(ctx, []store.Event{
		{ID: "e1", Impression: "imp-1", Kind: store.KindImpression, Time: at, Session: "s-7f",
			Department: "operations", Query: "reservoir inspection", Terms: []string{"sluice", "spillway"}},
		{ID: "e2", Impression: "imp-1", Kind: store.KindAccept, Time: at.Add(4 * time.Second), Term: "spillway", Position: 1},
	})
	fmt.Println("append:", err)
	err = s.Append(ctx, []store.Event{{ID: "e2", Impression: "imp-1", Kind: store.KindAccept, Time: at, Term: "spillway", Position: 1}})
	fmt.Println("replay rejected:", errors.Is(err, store.ErrReplay))
	_ = s.Events(ctx, time.Time{}, func(e store.Event) error {
		fmt.Println(e.ID, e.Kind, e.Term, e.Terms)
		return nil
	})
	// Output:
	// append: <nil>
	// replay rejected: true
	// e1 impression  [sluice spillway]
	// e2 accept spillway []
}

package finder

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"

	"kinword/internal/access"
	"kinword/internal/assoc"
)

// TestReloadKeepsTheOldSnapshotOnError: a reload that cannot read the
// table, or whose context has ended, returns the error and leaves the
// published snapshot (load time included) serving; a good reload swaps a
// new one in.
func TestReloadKeepsTheOldSnapshotOnError(t *testing.T) {
	f, dir := openTestFinder(t)
	table := filepath.Join(dir, "assoc.kwa")
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	cases := []struct {
		name  string
		setup func()
		ctx   context.Context
		want  error // nil = the reload succeeds and swaps
	}{
		{"corrupt table", func() { os.WriteFile(table, []byte("KWAX not a table"), 0o644) }, context.Background(), assoc.ErrBadMagic},
		{"context ended", func() { os.Remove(table) }, cancelled, context.Canceled},
		{"no table is fine", func() {}, context.Background(), nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			before := f.Status()
			c.setup()
			err := f.Reload(c.ctx)
			after := f.Status()
			if c.want != nil {
				if !errors.Is(err, c.want) {
					t.Fatalf("err %v, want %v", err, c.want)
				}
				if !after.Loaded.Equal(before.Loaded) {
					t.Errorf("a failed reload swapped the snapshot")
				}
			} else if err != nil || after.Loaded.Equal(before.Loaded) {
				t.Fatalf("err %v; swapped %v", err, !after.Loaded.Equal(before.Loaded))
			}
			if _, err := f.Search(context.Background(), Request{Query: "main break", Viewer: access.Anonymous}); err != nil {
				t.Errorf("search after the reload: %v", err)
			}
		})
	}
}

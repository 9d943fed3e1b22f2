package finder

import (
	"context"
	"errors"
	"fmt"
	"os"
	"time"

	"kinword/internal/assoc"
	"kinword/internal/suggest"
)

// Reload refreshes what the finder serves and publishes it as one new
// snapshot, swapped in atomically: the index is re-warmed (the postings of
// its latest committed snapshot are built now, not on the next search) and
// the association table is read again from disk (its absence means
// suggestions from feedback alone). Searches running meanwhile finish on
// the snapshot they started with.
//
// The index itself is not reopened: this process holds bleve's lock on the
// index folder for as long as it serves, so nothing else can change that
// folder underneath it, and every change made through the finder
// (PutDocuments, DeleteDocuments) is already searchable once committed.
//
// On any error the previous snapshot keeps serving and the error is
// returned; nothing is half-swapped.
func (f *Finder) Reload(ctx context.Context) error {
	var tbl *assoc.Table
	if f.table != "" {
		t, err := assoc.Load(f.table)
		switch {
		case errors.Is(err, os.ErrNotExist):
		case err != nil:
			return fmt.Errorf("finder: reload table: %w", err)
		default:
			tbl = t
		}
	}
	eng, err := suggest.New(tbl, suggest.Options{K: f.opts.Suggestions})
	if err != nil {
		return fmt.Errorf("finder: reload: %w", err)
	}
	f.ix.Warm()
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("finder: reload: %w", err)
	}
	f.st.Store(&state{tbl: tbl, eng: eng, loaded: time.Now()})
	f.cache.Flush()
	return nil
}

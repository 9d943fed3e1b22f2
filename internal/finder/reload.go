package finder

import (
	"context"
	"fmt"

	"kinword/internal/index"
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
// To serve another index folder, use Swap.
//
// On any error the previous snapshot keeps serving and the error is
// returned; nothing is half-swapped.
func (f *Finder) Reload(ctx context.Context) error {
	f.smu.Lock()
	defer f.smu.Unlock()
	cur := f.st.Load()
	switch {
	case cur == nil:
		return ErrNotReady
	case f.closed:
		return fmt.Errorf("finder: reload: %w", index.ErrClosed)
	}
	// cur's index cannot close meanwhile: only Swap and Close release the
	// published reference, and both wait for smu.
	ns, err := f.buildState(ctx, cur.h, cur.table, cur.version)
	if err != nil {
		return err
	}
	f.st.Store(ns)
	ns.warm()
	f.cache.Flush()
	return nil
}

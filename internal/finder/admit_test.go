package finder

import (
	"context"
	"errors"
	"sync"
	"testing"

	"kinword/internal/text"
)

// TestConcurrentBound: with one slot, a search waiting for it gives up when
// its context ends (the slot holder is not disturbed), and many concurrent
// searches all finish with the answers of an unbounded finder.
func TestConcurrentBound(t *testing.T) {
	dir := writeDataDir(t, hydrantDocs)
	p, _ := text.NewPipeline("")
	ctx := context.Background()
	f, err := Open(ctx, dir, p, Options{Concurrent: 1, CacheTTL: -1})
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	free, err := Open(ctx, writeDataDir(t, hydrantDocs), p, Options{Concurrent: -1, CacheTTL: -1})
	if err != nil {
		t.Fatal(err)
	}
	defer free.Close()
	if cap(f.slots) != 1 || free.slots != nil {
		t.Fatalf("slots %d / %v, want 1 / none", cap(f.slots), free.slots)
	}
	if d := (Options{}).resolve().Concurrent; d < 2 {
		t.Errorf("default bound %d, want twice GOMAXPROCS (at least 2)", d)
	}

	f.slots <- struct{}{} // a search holds the only slot
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := f.Search(cctx, Request{Query: "hydrant", WithResults: true}); !errors.Is(err, context.Canceled) {
		t.Fatalf("waiting search: %v, want context.Canceled", err)
	}
	<-f.slots

	want, err := free.Search(ctx, Request{Query: "hydrant flushing", WithResults: true})
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	errs := make(chan error, 32)
	for range 32 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			got, err := f.Search(ctx, Request{Query: "hydrant flushing", WithResults: true})
			if err == nil && (len(got.Results) != len(want.Results) || got.Results[0].ID != want.Results[0].ID) {
				err = errors.New("bounded answer differs from the unbounded one")
			}
			if err != nil {
				errs <- err
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Fatal(err)
	}
	if len(f.slots) != 0 {
		t.Errorf("%d slots still held after every search returned", len(f.slots))
	}
}

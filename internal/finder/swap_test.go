package finder

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/assoc"
	"kinword/internal/doc"
	"kinword/internal/index"
	"kinword/internal/text"
)

// writeDataDir indexes docs into a new folder laid out as a data folder
// (dir/index) and returns it.
func writeDataDir(t *testing.T, docs []doc.Document) string {
	t.Helper()
	dir := t.TempDir()
	p, err := text.NewPipeline("")
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	ix, err := index.Open(ctx, filepath.Join(dir, "index"), index.Options{Pipeline: p})
	if err != nil {
		t.Fatal(err)
	}
	if err := ix.Put(ctx, docs); err != nil {
		t.Fatal(err)
	}
	if err := ix.Commit(ctx); err != nil {
		t.Fatal(err)
	}
	if err := ix.Close(); err != nil {
		t.Fatal(err)
	}
	return dir
}

var hydrantDocs = []doc.Document{
	{ID: "h1", Title: "Hydrant flushing", Body: "Flushing a hydrant clears sediment from the network."},
	{ID: "h2", Title: "Hydrant painting", Body: "A hydrant is painted by its flow class."},
	{ID: "h3", Title: "Meter reading", Body: "Meter readers log consumption monthly."},
}

func ids(r Response) []string {
	var out []string
	for _, x := range r.Results {
		out = append(out, x.ID)
	}
	return out
}

// TestSwapServesTheNewFolder: after Swap the finder answers from the new
// index, reports its version and document count, and closes the old
// index once the swap is done (its folder can be opened again).
func TestSwapServesTheNewFolder(t *testing.T) {
	f, oldDir := openTestFinder(t)
	ctx := context.Background()
	newDir := writeDataDir(t, hydrantDocs)
	closed, err := f.Swap(ctx, newDir, "v2")
	if err != nil {
		t.Fatal(err)
	}
	select {
	case <-closed:
	case <-time.After(5 * time.Second):
		t.Fatal("the old index was not closed with no request on it")
	}
	if st := f.Status(); st.Version != "v2" || st.Documents != 3 || f.Version() != "v2" {
		t.Errorf("status %+v, want version v2 and 3 documents", st)
	}
	got, err := f.Search(ctx, Request{Query: "hydrant", Viewer: access.Anonymous, WithResults: true})
	if err != nil || got.Total != 2 {
		t.Fatalf("hydrant on the new index: total %d (%v), err %v; want 2", got.Total, ids(got), err)
	}
	if got, _ := f.Search(ctx, Request{Query: "main break", Viewer: access.Anonymous}); got.Total != 0 {
		t.Errorf("main break still matches %d documents after the swap", got.Total)
	}
	// The old folder's lock is released: it opens again at once.
	p, _ := text.NewPipeline("")
	ix, err := index.Open(ctx, filepath.Join(oldDir, "index"), index.Options{Pipeline: p})
	if err != nil {
		t.Fatalf("reopen the old index: %v", err)
	}
	ix.Close()
}

// TestSwapWaitsForRequestsOnTheOldIndex: a request pinned before a swap
// keeps reading the old index; it is closed only after that request
// releases it.
func TestSwapWaitsForRequestsOnTheOldIndex(t *testing.T) {
	f, _ := openTestFinder(t)
	pinned, err := f.acquire()
	if err != nil {
		t.Fatal(err)
	}
	closed, err := f.Swap(context.Background(), writeDataDir(t, hydrantDocs), "v2")
	if err != nil {
		t.Fatal(err)
	}
	select {
	case <-closed:
		t.Fatal("the old index closed under a request still using it")
	case <-time.After(100 * time.Millisecond):
	}
	if n := pinned.h.ix.Len(); n != 2 {
		t.Errorf("the pinned old index has %d documents, want 2", n)
	}
	pinned.release()
	select {
	case <-closed:
	case <-time.After(5 * time.Second):
		t.Fatal("the old index stayed open after its last request")
	}
}

// TestSwapFailureKeepsServing: a folder whose table is corrupt, or that
// has no index folder at all, is refused; the old snapshot keeps serving
// and the refused folder's index is closed again.
func TestSwapFailureKeepsServing(t *testing.T) {
	f, _ := openTestFinder(t)
	ctx := context.Background()
	corrupt := writeDataDir(t, hydrantDocs)
	if err := os.WriteFile(filepath.Join(corrupt, "assoc.kwa"), []byte("KWAX not a table"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := f.Swap(ctx, corrupt, "bad"); !errors.Is(err, assoc.ErrBadMagic) {
		t.Fatalf("corrupt table: err %v, want assoc.ErrBadMagic", err)
	}
	if v := f.Version(); v != "" {
		t.Errorf("version %q after a failed swap, want the old one", v)
	}
	if got, err := f.Search(ctx, Request{Query: "main break", Viewer: access.Anonymous}); err != nil || got.Total != 2 {
		t.Errorf("old snapshot after a failed swap: total %d, err %v", got.Total, err)
	}
	p, _ := text.NewPipeline("")
	ix, err := index.Open(ctx, filepath.Join(corrupt, "index"), index.Options{Pipeline: p})
	if err != nil {
		t.Fatalf("the refused index was left open: %v", err)
	}
	ix.Close()
}

// TestSwapUnderLoad: searches running on 4 goroutines while the finder
// swaps between 5 folders all succeed, and each answer comes whole from
// one folder (its total is one of the folders' totals, never an error or
// a mix).
func TestSwapUnderLoad(t *testing.T) {
	f, _ := openTestFinder(t)
	ctx := context.Background()
	want := map[int]bool{2: true} // "main break" in the test finder's folder
	var dirs []string
	for i := range 5 {
		var docs []doc.Document
		for j := 0; j <= i; j++ {
			docs = append(docs, doc.Document{ID: fmt.Sprintf("d%d", j), Title: "Main break", Body: "A main break was isolated."})
		}
		dirs = append(dirs, writeDataDir(t, docs))
		want[i+1] = true
	}
	var ok, failed atomic.Int64
	stop := make(chan struct{})
	var wg sync.WaitGroup
	for range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				select {
				case <-stop:
					return
				default:
				}
				got, err := f.Search(ctx, Request{Query: "main break", Viewer: access.Anonymous, WithResults: true})
				if err != nil || !want[got.Total] || len(got.Results) != got.Total {
					failed.Add(1)
					t.Errorf("search during swaps: total %d, %d results, err %v", got.Total, len(got.Results), err)
					continue
				}
				ok.Add(1)
			}
		}()
	}
	var closers []<-chan struct{}
	for i, d := range dirs {
		time.Sleep(20 * time.Millisecond)
		c, err := f.Swap(ctx, d, fmt.Sprintf("v%d", i))
		if err != nil {
			t.Fatal(err)
		}
		closers = append(closers, c)
	}
	time.Sleep(20 * time.Millisecond)
	close(stop)
	wg.Wait()
	for i, c := range closers {
		select {
		case <-c:
		case <-time.After(5 * time.Second):
			t.Fatalf("index before swap %d never closed", i)
		}
	}
	t.Logf("%d searches during 5 swaps, %d failed", ok.Load(), failed.Load())
	if ok.Load() == 0 {
		t.Fatal("no search ran during the swaps")
	}
	if err := f.Close(); err != nil {
		t.Fatalf("close: %v", err)
	}
	if _, err := f.Search(ctx, Request{Query: "main break", Viewer: access.Anonymous}); !errors.Is(err, index.ErrClosed) {
		t.Errorf("search after close: err %v, want index.ErrClosed", err)
	}
}

// BenchmarkAcquire is the cost every request pays to pin the published
// snapshot (a reference count taken and dropped).
func BenchmarkAcquire(b *testing.B) {
	f := &Finder{}
	f.st.Store(&state{h: newHandle(nil)})
	b.RunParallel(func(pb *testing.PB) {
		for pb.Next() {
			s, err := f.acquire()
			if err != nil {
				b.Fatal(err)
			}
			s.release()
		}
	})
}

package ingest

import (
	"context"
	"os"
	"path/filepath"
	"sort"
	"sync"
	"testing"
	"time"

	"kinword/internal/doc"
)

// writeFiles creates files (slash paths relative to dir) with contents.
func writeFiles(t testing.TB, dir string, files map[string]string) {
	t.Helper()
	for name, content := range files {
		p := filepath.Join(dir, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// walkAll collects every Item of a walk.
func walkAll(t testing.TB, roots []string, opts Options) []Item {
	t.Helper()
	var items []Item
	if err := Walk(context.Background(), roots, opts, func(it Item) error {
		items = append(items, it)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	return items
}

// memSink is an in-memory Sink that records its calls.
type memSink struct {
	mu      sync.Mutex
	docs    map[string]doc.Document
	puts    int
	deletes [][]string
	// onPut, when set, runs after each Put (used to cancel mid-run).
	onPut func()
}

func newMemSink() *memSink { return &memSink{docs: map[string]doc.Document{}} }

func (s *memSink) Known(ctx context.Context) (map[string]Known, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	out := map[string]Known{}
	for id, d := range s.docs {
		out[id] = Known{Hash: d.Hash, Source: d.Source}
	}
	return out, nil
}

func (s *memSink) Put(ctx context.Context, docs []doc.Document) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	s.mu.Lock()
	for _, d := range docs {
		s.docs[d.ID] = d
	}
	s.puts++
	s.mu.Unlock()
	if s.onPut != nil {
		s.onPut()
	}
	return nil
}

func (s *memSink) Delete(ctx context.Context, ids []string) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, id := range ids {
		delete(s.docs, id)
	}
	s.deletes = append(s.deletes, append([]string(nil), ids...))
	return nil
}

// ids returns the stored IDs, sorted.
func (s *memSink) ids() []string {
	s.mu.Lock()
	defer s.mu.Unlock()
	var out []string
	for id := range s.docs {
		out = append(out, id)
	}
	sort.Strings(out)
	return out
}

// snapshot copies the stored documents with Modified normalised.
func (s *memSink) snapshot() map[string]doc.Document {
	s.mu.Lock()
	defer s.mu.Unlock()
	out := map[string]doc.Document{}
	for id, d := range s.docs {
		d.Modified = d.Modified.Truncate(time.Second)
		out[id] = d
	}
	return out
}

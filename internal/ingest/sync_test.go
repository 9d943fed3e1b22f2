package ingest

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func syncOK(t *testing.T, roots []string, opts SyncOptions, sink Sink) Summary {
	t.Helper()
	sum, err := Sync(context.Background(), roots, opts, sink)
	if err != nil {
		t.Fatal(err)
	}
	return sum
}

func TestSyncIncremental(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		"a.txt": "Alpha\n\ntext", "b.md": "# Beta\n\ntext", "c.html": "<p>Gamma</p>",
		"d.jsonl": `{"id":"d1","text":"one"}` + "\n" + `{"id":"d2","text":"two"}` + "\n",
	})
	sink := newMemSink()
	opts := SyncOptions{BatchSize: 2}
	type counts struct{ indexed, unchanged, removed int }
	steps := []struct {
		name   string
		change func()
		want   counts
		ids    []string
	}{
		{name: "first run indexes all", change: func() {}, want: counts{5, 0, 0}, ids: []string{"a.txt", "b.md", "c.html", "d1", "d2"}},
		{name: "second run: all unchanged", change: func() {}, want: counts{0, 5, 0}, ids: []string{"a.txt", "b.md", "c.html", "d1", "d2"}},
		{name: "modify one, delete one", change: func() {
			writeFiles(t, dir, map[string]string{"a.txt": "Alpha\n\nnew text"})
			if err := os.Remove(filepath.Join(dir, "c.html")); err != nil {
				t.Fatal(err)
			}
		}, want: counts{1, 3, 1}, ids: []string{"a.txt", "b.md", "d1", "d2"}},
		{name: "one JSON line changed, one dropped", change: func() {
			writeFiles(t, dir, map[string]string{"d.jsonl": `{"id":"d1","text":"one, revised"}` + "\n"})
		}, want: counts{1, 2, 1}, ids: []string{"a.txt", "b.md", "d1"}},
		{name: "folder defaults change re-indexes", change: func() {
			writeFiles(t, dir, map[string]string{FolderFile: "groups = [\"staff\"]\n"})
		}, want: counts{3, 0, 0}, ids: []string{"a.txt", "b.md", "d1"}},
	}
	for _, s := range steps {
		t.Run(s.name, func(t *testing.T) {
			s.change()
			putsBefore := sink.puts
			sum := syncOK(t, []string{dir}, opts, sink)
			if got := (counts{sum.Indexed, sum.Unchanged, sum.Removed}); got != s.want {
				t.Errorf("got %+v, want %+v (%s)", got, s.want, sum.Line())
			}
			if s.want.indexed == 0 && sink.puts != putsBefore {
				t.Errorf("Put called %d times for an unchanged tree", sink.puts-putsBefore)
			}
			if got := sink.ids(); !reflect.DeepEqual(got, s.ids) {
				t.Errorf("stored %v, want %v", got, s.ids)
			}
		})
	}
	if g := sink.snapshot()["a.txt"].Groups; !reflect.DeepEqual(g, []string{"staff"}) {
		t.Errorf("groups after folder change %v, want [staff]", g)
	}
}

// TestHashes checks Document.Hash against crypto/sha256 (FIPS 180-4) over
// the file bytes, and over the line bytes for JSON Lines.
func TestHashes(t *testing.T) {
	dir := t.TempDir()
	line := `{"id":"x","text":"hello"}`
	writeFiles(t, dir, map[string]string{"a.txt": "abc", "l.jsonl": line + "\r\n"})
	sum := func(s string) string { h := sha256.Sum256([]byte(s)); return hex.EncodeToString(h[:]) }
	got := map[string]string{}
	for _, it := range walkAll(t, []string{dir}, Options{}) {
		got[it.Doc.ID] = it.Doc.Hash
	}
	// SHA-256("abc") = ba7816bf... (FIPS 180-4 / FIPS 180-2 appendix B.1).
	want := map[string]string{"a.txt": "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad", "x": sum(line)}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("hashes %v, want %v", got, want)
	}
}

func TestSyncRootsIsolated(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "ab") // "ab" shares a prefix with "a"
	writeFiles(t, dir, map[string]string{"a/x.txt": "x", "a/y.txt": "y", "ab/z.txt": "z"})
	sink := newMemSink()
	syncOK(t, []string{a}, SyncOptions{}, sink)
	if err := os.Remove(filepath.Join(a, "y.txt")); err != nil {
		t.Fatal(err)
	}
	sum := syncOK(t, []string{b}, SyncOptions{}, sink)
	if sum.Removed != 0 || !reflect.DeepEqual(sink.ids(), []string{"x.txt", "y.txt", "z.txt"}) {
		t.Errorf("syncing %s touched %s: removed %d, stored %v", b, a, sum.Removed, sink.ids())
	}
	sum = syncOK(t, []string{a}, SyncOptions{}, sink)
	if sum.Removed != 1 || !reflect.DeepEqual(sink.ids(), []string{"x.txt", "z.txt"}) {
		t.Errorf("resync of %s: removed %d, stored %v", a, sum.Removed, sink.ids())
	}
}

func TestSyncCancelled(t *testing.T) {
	dir := t.TempDir()
	files := map[string]string{}
	for i := range 7 {
		files[fmt.Sprintf("f%d.txt", i)] = fmt.Sprintf("File %d\n\nbody %d", i, i)
	}
	writeFiles(t, dir, files)
	// Reference: an uncancelled run into a fresh sink.
	ref := newMemSink()
	syncOK(t, []string{dir}, SyncOptions{}, ref)

	sink := newMemSink()
	sink.docs["gone"] = ref.docs["f0.txt"] // a stale document under dir
	stale := sink.docs["gone"]
	stale.ID, stale.Source = "gone", filepath.Join(dir, "gone.txt")
	sink.docs["gone"] = stale
	ctx, cancel := context.WithCancel(context.Background())
	sink.onPut = cancel
	sum, err := Sync(ctx, []string{dir}, SyncOptions{BatchSize: 2, Options: Options{Workers: 1}}, sink)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err = %v, want context.Canceled", err)
	}
	if len(sink.deletes) != 0 || sink.docs["gone"].ID != "gone" {
		t.Errorf("deletions ran after cancel: %v", sink.deletes)
	}
	if sum.Indexed%2 != 0 || sum.Indexed == 0 || sum.Indexed == 7 {
		t.Errorf("indexed %d, want whole batches of 2 short of 7", sum.Indexed)
	}
	snap, want := sink.snapshot(), ref.snapshot()
	for id, d := range snap {
		if id != "gone" && !reflect.DeepEqual(d, want[id]) {
			t.Errorf("%s stored inconsistently:\n got %+v\nwant %+v", id, d, want[id])
		}
	}
	sink.onPut = nil
	sum2 := syncOK(t, []string{dir}, SyncOptions{BatchSize: 2}, sink)
	if sum2.Unchanged != sum.Indexed || sum2.Indexed != 7-sum.Indexed || sum2.Removed != 1 {
		t.Errorf("resume: %s after %s", sum2.Line(), sum.Line())
	}
	if !reflect.DeepEqual(sink.snapshot(), want) {
		t.Errorf("after resume the sink differs from an uncancelled run")
	}
}

func TestSyncProgressAndWarnings(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		"a.txt": "a", "b.txt": "b", "old.txt": "old",
		"c.md":              "---\nid: a.txt\n---\nsame id as a.txt",
		"sub/" + FolderFile: "colour = \"red\"\n", "sub/d.txt": "d",
	})
	sink := newMemSink()
	syncOK(t, []string{dir}, SyncOptions{}, sink)
	if err := os.Remove(filepath.Join(dir, "old.txt")); err != nil {
		t.Fatal(err)
	}
	var calls []string
	sum := syncOK(t, []string{dir}, SyncOptions{Progress: func(done, total int, phase string) {
		calls = append(calls, fmt.Sprintf("%s %d/%d", phase, done, total))
	}}, sink)
	want := []string{"index 0/4", "index 1/4", "index 2/4", "index 3/4", "index 4/4", "delete 0/1", "delete 1/1"}
	if !reflect.DeepEqual(calls, want) {
		t.Errorf("progress %v, want %v", calls, want)
	}
	if all := strings.Join(sum.Warnings, "\n"); !strings.Contains(all, `unknown key "colour"`) {
		t.Errorf("warnings %q lack the unknown folder key", sum.Warnings)
	}
	if len(sum.Skipped) != 1 || sum.Skipped[0].Kind() != ErrDuplicateID || filepath.Base(sum.Skipped[0].Path) != "c.md" {
		t.Errorf("skipped %v, want c.md as duplicate id", sum.Skipped)
	}
	if d := sink.snapshot()["a.txt"]; d.Body != "a" || sum.Unchanged != 3 {
		t.Errorf("a.txt body %q, unchanged %d: the first file in walk order must keep the id", d.Body, sum.Unchanged)
	}
}

func TestSummaryLine(t *testing.T) {
	skips := func(kind error, paths ...string) []Skip {
		var out []Skip
		for _, p := range paths {
			out = append(out, Skip{Path: p, Reason: fmt.Errorf("detail: %w", kind)})
		}
		return out
	}
	cases := []struct {
		name string
		sum  Summary
		want string
	}{
		{"nothing skipped", Summary{Indexed: 3}, "indexed 3, unchanged 0, removed 0, skipped 0"},
		{"fixed reason order", Summary{Indexed: 212, Unchanged: 30, Removed: 2,
			Skipped: append(skips(ErrCorrupt, "d.docx", "e.pdf"), append(skips(ErrBinary, "a.bin"), skips(ErrMalformedLine, "f.jsonl#L3")...)...)},
			"indexed 212, unchanged 30, removed 2, skipped 4 (binary: a.bin; corrupt: d.docx, e.pdf; malformed line: f.jsonl#L3)"},
		{"long lists shortened", Summary{Skipped: skips(ErrUnsupported, "1", "2", "3", "4", "5", "6", "7")},
			"indexed 0, unchanged 0, removed 0, skipped 7 (unsupported: 1, 2, 3, 4, 5 +2 more)"},
		{"warnings counted", Summary{Warnings: []string{"w"}}, "indexed 0, unchanged 0, removed 0, skipped 0, warnings 1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.sum.Line(); got != c.want {
				t.Errorf("got  %s\nwant %s", got, c.want)
			}
		})
	}
}

package index

import (
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"kinword/internal/access"
)

// TestForwardFileMatchesIndex: streaming the forward file gives every
// document's tokens, surfaces, breaks, gaps and groups exactly as the open
// index holds them, and a damaged file is refused.
func TestForwardFileMatchesIndex(t *testing.T) {
	ix := openTest(t, smallCorpus)
	ff, err := OpenForward(ix.Dir())
	if err != nil {
		t.Fatal(err)
	}
	defer ff.Close()
	all := ix.View(access.Viewer{Groups: ix.Groups()})
	if ff.NumDocs() != all.NumDocs() || ff.NumTerms() != all.NumTerms() {
		t.Fatalf("file %d docs %d terms, index %d docs %d terms", ff.NumDocs(), ff.NumTerms(), all.NumDocs(), all.NumTerms())
	}
	for i := 0; i < ff.NumDocs(); i++ {
		d, err := ff.Doc(i)
		if err != nil {
			t.Fatal(err)
		}
		toks, br := all.Tokens(uint32(i))
		if d.ID != all.DocID(uint32(i)) || !reflect.DeepEqual(d.Tokens, toks) || !reflect.DeepEqual(append([]int32{}, d.Breaks...), append([]int32{}, br...)) ||
			!reflect.DeepEqual(d.Surf, all.DocSurfaces(uint32(i))) || len(d.Groups) != len(all.DocGroups(uint32(i))) {
			t.Errorf("document %d differs", i)
		}
	}
	if got := ff.OpenDisplay("valv"); got != "valve" {
		t.Errorf("open display %q", got)
	}
	path := filepath.Join(ix.Dir(), "forward.kwf")
	b, _ := os.ReadFile(path)
	bad := filepath.Join(t.TempDir(), "forward.kwf")
	b[len(b)/3] ^= 1
	os.WriteFile(bad, b, 0o644)
	if _, err := OpenForward(filepath.Dir(bad)); err == nil {
		t.Error("damaged forward file accepted")
	}
}

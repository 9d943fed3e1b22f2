package text

import (
	"bufio"
	"kinword/internal/testenv"
	"os"
	"path/filepath"
	"testing"
)

// snowballData locates the Snowball project's English reference vocabulary,
// as shipped by Debian's snowball-data package (voc.txt: input words,
// output.txt: the reference stems, line by line).
func snowballData(t *testing.T) string { return testenv.Snowball(t) }

func readLines(t *testing.T, path string) []string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		out = append(out, sc.Text())
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

// TestSnowballReferenceVocabulary checks the pipeline's stemmer against every
// word of the Snowball project's English reference vocabulary (Porter and
// Boulton, snowballstem.org, English stemmer "voc.txt"/"output.txt", 29,417
// words, via Debian's snowball-data). Stopwords are stemmed too, as in the
// reference.
func TestSnowballReferenceVocabulary(t *testing.T) {
	dir := snowballData(t)
	voc := readLines(t, filepath.Join(dir, "voc.txt"))
	want := readLines(t, filepath.Join(dir, "output.txt"))
	if len(voc) != len(want) {
		t.Fatalf("voc.txt has %d lines, output.txt %d", len(voc), len(want))
	}
	st, err := NewStemmer(English)
	if err != nil {
		t.Fatal(err)
	}
	checked, skipped, mismatches := 0, 0, 0
	for i, w := range voc {
		// The entry of three apostrophes is the vocabulary's one non-word:
		// the reference gives "'" and the library "" (its apostrophe
		// pre-processing strips every one). Skipped, as allowed.
		if w == "'''" {
			skipped++
			continue
		}
		checked++
		if got := st.Stem(w); got != want[i] {
			mismatches++
			if mismatches <= 20 {
				t.Errorf("line %d: Stem(%q) = %q, reference %q", i+1, w, got, want[i])
			}
		}
	}
	t.Logf("snowball reference: %d words checked, %d skipped, %d mismatches", checked, skipped, mismatches)
	if checked+skipped != 29417 {
		t.Errorf("expected 29,417 reference words, read %d", checked+skipped)
	}
}

package main

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestPublishHashFIPSExamples checks the hashing helper against the
// SHA-256 examples of NIST FIPS 180-2 (2002), appendix B.1 ("abc") and
// B.2 (the 448-bit message), and the digest of the empty message (widely
// published). All three values are from memory.
func TestPublishHashFIPSExamples(t *testing.T) {
	cases := []struct{ name, in, want string }{
		{"B.1 abc", "abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"},
		{"B.2 two blocks", "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq", "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"},
		{"empty", "", "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, n, err := hashReader(strings.NewReader(c.in))
			if err != nil || got != c.want || n != int64(len(c.in)) {
				t.Errorf("hashReader(%q) = %s, %d, %v; want %s, %d", c.in, got, n, err, c.want, len(c.in))
			}
			src := filepath.Join(t.TempDir(), "in")
			os.WriteFile(src, []byte(c.in), 0o644)
			if got, _, err := copyFile(src, src+".copy"); err != nil || got != c.want {
				t.Errorf("copyFile digest %s, %v; want %s", got, err, c.want)
			}
		})
	}
}

// builtData ingests docs and mines them into a new data folder, in
// process.
func builtData(t *testing.T, docs map[string]string) string {
	t.Helper()
	src := t.TempDir()
	writeCorpus(t, src, docs)
	data := filepath.Join(t.TempDir(), "data")
	if code, _, errs := runCLI(t, "ingest", "--data", data, src); code != 0 {
		t.Fatalf("ingest: exit %d: %s", code, errs)
	}
	if code, _, errs := runCLI(t, "mine", "--data", data); code != 0 {
		t.Fatalf("mine: exit %d: %s", code, errs)
	}
	return data
}

// TestPublishWritesVerifiableManifest: the manifest lists every file of
// the version folder with its size and a SHA-256 recomputed here with
// crypto/sha256 alone; CURRENT names the version; --keep bounds how many
// versions stay.
func TestPublishWritesVerifiableManifest(t *testing.T) {
	data := builtData(t, fiveDocs)
	shared := filepath.Join(t.TempDir(), "shared")
	code, out, errs := runCLI(t, "publish", "--data", data, "--to", shared, "--json")
	if code != 0 {
		t.Fatalf("publish: exit %d: %s", code, errs)
	}
	var res struct{ Version string }
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("publish --json: %v: %s", err, out)
	}
	cur, err := readCurrent(shared)
	if err != nil || cur != res.Version {
		t.Fatalf("CURRENT names %q (%v), publish said %q", cur, err, res.Version)
	}
	dir := filepath.Join(shared, cur)
	var m manifest
	b, err := os.ReadFile(filepath.Join(dir, manifestFile))
	if err != nil || json.Unmarshal(b, &m) != nil {
		t.Fatalf("manifest: %v: %s", err, b)
	}
	if m.Version != cur || m.Documents != len(fiveDocs) || m.Created.IsZero() {
		t.Errorf("manifest version %q, %d documents, created %v; want %q, %d", m.Version, m.Documents, m.Created, cur, len(fiveDocs))
	}
	listed := map[string]fileEntry{}
	for _, f := range m.Files {
		listed[f.Path] = f
	}
	for _, must := range []string{"assoc.kwa", "index/forward.kwf", "index/bleve/index_meta.json"} {
		if _, ok := listed[must]; !ok {
			t.Errorf("manifest lacks %s", must)
		}
	}
	onDisk := 0
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() || d.Name() == manifestFile {
			return err
		}
		onDisk++
		rel, _ := filepath.Rel(dir, p)
		raw, _ := os.ReadFile(p)
		sum := sha256.Sum256(raw)
		f, ok := listed[filepath.ToSlash(rel)]
		if !ok || f.Size != int64(len(raw)) || f.SHA256 != hex.EncodeToString(sum[:]) {
			t.Errorf("%s: manifest %+v, on disk %d bytes %x", rel, f, len(raw), sum)
		}
		return nil
	})
	if onDisk != len(m.Files) {
		t.Errorf("%d files on disk, %d in the manifest", onDisk, len(m.Files))
	}
	if err := checkManifest(m, cur); err != nil {
		t.Errorf("a fresh manifest fails its own check: %v", err)
	}

	// Three more versions, a second apart, with at most 2 kept.
	base := time.Now()
	var last manifest
	for i := 1; i <= 3; i++ {
		if last, err = publish(context.Background(), data, shared, "", base.Add(time.Duration(i)*time.Second)); err != nil {
			t.Fatal(err)
		}
		if _, err := pruneVersions(shared, 2); err != nil {
			t.Fatal(err)
		}
	}
	vs, _ := listVersions(shared)
	if cur, _ := readCurrent(shared); len(vs) != 2 || vs[1] != last.Version || cur != last.Version {
		t.Errorf("after 4 publishes with --keep 2: versions %v, CURRENT %q; want 2 ending in %q", vs, cur, last.Version)
	}
}

// FuzzCheckManifest: whatever a shared folder's manifest holds, the check
// never panics, and a manifest it accepts only names files inside the
// version folder's index/ or its assoc.kwa.
func FuzzCheckManifest(f *testing.F) {
	good := manifest{Created: time.Date(2026, 12, 2, 2, 0, 0, 0, time.UTC), Documents: 1,
		Files: []fileEntry{{Path: "index/forward.kwf", Size: 3, SHA256: strings.Repeat("ab", 32)}, {Path: "assoc.kwa", Size: 1, SHA256: strings.Repeat("0", 64)}}}
	good.Version = versionOf(good)
	b, _ := json.Marshal(good)
	f.Add(string(b), good.Version)
	f.Add(`{"version":"v1","files":[{"path":"../x","size":1,"sha256":"00"}]}`, "v1")
	f.Add(`{"files":[{"path":"index/./a"},{"path":"index/a"}]}`, "")
	f.Fuzz(func(t *testing.T, raw, v string) {
		var m manifest
		if json.Unmarshal([]byte(raw), &m) != nil {
			return
		}
		if checkManifest(m, v) != nil {
			return
		}
		for _, e := range m.Files {
			local := filepath.Join("/root-of-version", filepath.FromSlash(e.Path))
			if !strings.HasPrefix(local, "/root-of-version/index/") && local != "/root-of-version/assoc.kwa" {
				t.Fatalf("accepted %q, which lands at %s", e.Path, local)
			}
		}
	})
}

package main

// The builder side of several replicas: `kinword publish` copies the data
// folder's index and association table into a shared folder as a
// versioned snapshot with a manifest of SHA-256 checksums (FIPS 180-4),
// then names it in SHARED/CURRENT. Replicas fetch it (snapshots.go).
//
// Layout of the shared folder:
//
//	SHARED/CURRENT                       the version to serve, one line
//	SHARED/v20261202T021500Z-1a2b3c4d/   one published version
//	    manifest.json                    {version, created, documents, files}
//	    index/...                        copy of DATA/index
//	    assoc.kwa                        copy of DATA/assoc.kwa (if mined)
//
// Every step that others may see is a rename: the version folder is
// written under a temporary name and renamed whole, CURRENT is replaced by
// renaming a new file over it, so a replica never reads half a version.

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"time"

	"kinword/internal/index"
	"kinword/internal/text"
)

func init() {
	register(&command{name: "publish", summary: "publish the data folder's index and association table as a versioned snapshot in a shared folder, for replicas (serve --snapshots)",
		usage: "--to SHARED [--keep N] [--data DIR]", run: runPublish})
}

// currentFile names the version replicas serve, in the shared folder.
const currentFile = "CURRENT"

// manifestFile is the manifest's name inside a version folder.
const manifestFile = "manifest.json"

// versionName is the shape of a published version's folder name.
var versionName = regexp.MustCompile(`^v[0-9]{8}T[0-9]{6}Z-[0-9a-f]{8}$`)

// manifest describes one published version.
type manifest struct {
	Version   string      `json:"version"`
	Created   time.Time   `json:"created"`
	Documents int         `json:"documents"`
	Files     []fileEntry `json:"files"`
}

// fileEntry is one file of a version: its slash-separated path relative to
// the version folder, its size in bytes and its SHA-256 in lower-case hex.
type fileEntry struct {
	Path   string `json:"path"`
	Size   int64  `json:"size"`
	SHA256 string `json:"sha256"`
}

func runPublish(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("publish", e.stderr)
	to := fs.String("to", "", "shared folder the replicas read (required)")
	keep := fs.Int("keep", 3, "published versions kept; older ones are removed (never the one CURRENT names)")
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	if *to == "" {
		return usagef("--to SHARED is required")
	}
	if *keep < 1 {
		return usagef("--keep must be at least 1")
	}
	m, err := publish(ctx, e.dataDir, *to, e.cfg.Language, time.Now())
	if err != nil {
		return err
	}
	removed, err := pruneVersions(*to, *keep)
	if err != nil {
		return err
	}
	if e.json {
		return e.printJSON(map[string]any{"version": m.Version, "documents": m.Documents, "files": len(m.Files), "removed": removed})
	}
	fmt.Fprintf(e.stdout, "published %s (%d documents, %d files) to %s; removed %d old versions\n", m.Version, m.Documents, len(m.Files), *to, len(removed))
	return nil
}

// publish copies data/index and data/assoc.kwa into a new version of
// shared and names it in shared/CURRENT. Run it after ingest and mine
// have finished: it copies the files as they are on disk. The copy is
// opened as an index once (which also counts its documents) before its
// checksums are taken.
func publish(ctx context.Context, data, shared, lang string, now time.Time) (manifest, error) {
	if fi, err := os.Stat(filepath.Join(data, "index")); err != nil || !fi.IsDir() {
		return manifest{}, fmt.Errorf("publish: no index in %s (run kinword ingest first)", data)
	}
	if err := os.MkdirAll(shared, 0o755); err != nil {
		return manifest{}, fmt.Errorf("publish: %w", err)
	}
	tmp, err := os.MkdirTemp(shared, ".publish-")
	if err != nil {
		return manifest{}, fmt.Errorf("publish: %w", err)
	}
	done := false
	defer func() {
		if !done {
			os.RemoveAll(tmp)
		}
	}()
	if err := copyDir(ctx, filepath.Join(data, "index"), filepath.Join(tmp, "index")); err != nil {
		return manifest{}, fmt.Errorf("publish: copy index: %w", err)
	}
	if _, err := os.Stat(filepath.Join(data, "assoc.kwa")); err == nil {
		if _, _, err := copyFile(filepath.Join(data, "assoc.kwa"), filepath.Join(tmp, "assoc.kwa")); err != nil {
			return manifest{}, fmt.Errorf("publish: copy table: %w", err)
		}
	}
	docs, err := countDocuments(ctx, filepath.Join(tmp, "index"), lang)
	if err != nil {
		return manifest{}, fmt.Errorf("publish: the copied index does not open: %w", err)
	}
	m := manifest{Created: now.UTC().Truncate(time.Second), Documents: docs}
	if m.Files, err = hashTree(tmp); err != nil {
		return manifest{}, fmt.Errorf("publish: %w", err)
	}
	m.Version = versionOf(m)
	b, _ := json.MarshalIndent(m, "", "  ")
	if err := writeSynced(filepath.Join(tmp, manifestFile), append(b, '\n')); err != nil {
		return manifest{}, fmt.Errorf("publish: %w", err)
	}
	if err := syncDir(tmp); err != nil {
		return manifest{}, fmt.Errorf("publish: %w", err)
	}
	dst := filepath.Join(shared, m.Version)
	if _, err := os.Stat(dst); err == nil {
		// The same files in the same second: that version is this one.
		os.RemoveAll(tmp)
	} else if err := os.Rename(tmp, dst); err != nil {
		return manifest{}, fmt.Errorf("publish: %w", err)
	}
	done = true
	if err := syncDir(shared); err != nil {
		return manifest{}, fmt.Errorf("publish: %w", err)
	}
	if err := replaceFile(shared, currentFile, []byte(m.Version+"\n")); err != nil {
		return manifest{}, fmt.Errorf("publish: name current version: %w", err)
	}
	return m, nil
}

// versionOf names a version by its creation time (so names sort by age)
// and the first 8 hex digits of the SHA-256 of its file list.
func versionOf(m manifest) string {
	h := sha256.New()
	for _, f := range m.Files {
		fmt.Fprintf(h, "%s %d %s\n", f.Path, f.Size, f.SHA256)
	}
	return "v" + m.Created.UTC().Format("20060102T150405Z") + "-" + hex.EncodeToString(h.Sum(nil))[:8]
}

// countDocuments opens the index in dir and returns its document count.
func countDocuments(ctx context.Context, dir, lang string) (int, error) {
	p, err := text.NewPipeline(lang)
	if err != nil {
		return 0, err
	}
	ix, err := index.Open(ctx, dir, index.Options{Pipeline: p})
	if err != nil {
		return 0, err
	}
	n := ix.Len()
	return n, ix.Close()
}

// readCurrent returns the version shared/CURRENT names.
func readCurrent(shared string) (string, error) {
	b, err := os.ReadFile(filepath.Join(shared, currentFile))
	if err != nil {
		return "", fmt.Errorf("snapshots: %w", err)
	}
	v := strings.TrimSpace(string(b))
	if !versionName.MatchString(v) {
		return "", fmt.Errorf("snapshots: %s names %q, not a version", filepath.Join(shared, currentFile), v)
	}
	return v, nil
}

// pruneVersions removes all but the newest keep versions of shared, never
// the one CURRENT names, and returns what it removed (sorted).
func pruneVersions(shared string, keep int) ([]string, error) {
	cur, err := readCurrent(shared)
	if err != nil {
		return nil, fmt.Errorf("publish: prune: %w", err)
	}
	vs, err := listVersions(shared)
	if err != nil {
		return nil, fmt.Errorf("publish: prune: %w", err)
	}
	removed := []string{}
	for i, v := range vs {
		if i >= len(vs)-keep || v == cur {
			continue
		}
		if err := os.RemoveAll(filepath.Join(shared, v)); err != nil {
			return removed, fmt.Errorf("publish: prune %s: %w", v, err)
		}
		removed = append(removed, v)
	}
	return removed, nil
}

// listVersions returns the version folders in dir, oldest first.
func listVersions(dir string) ([]string, error) {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var out []string
	for _, d := range ents {
		if d.IsDir() && versionName.MatchString(d.Name()) {
			out = append(out, d.Name())
		}
	}
	sort.Strings(out)
	return out, nil
}

// errNoFiles: a tree to publish or install holds no files.
var errNoFiles = errors.New("no files")

// hashTree lists every regular file under root but the manifest, with
// sizes and SHA-256 digests, sorted by path.
func hashTree(root string) ([]fileEntry, error) {
	var out []fileEntry
	err := filepath.WalkDir(root, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, err := filepath.Rel(root, p)
		if err != nil || rel == manifestFile {
			return err
		}
		sum, n, err := hashFile(p)
		if err != nil {
			return err
		}
		out = append(out, fileEntry{Path: filepath.ToSlash(rel), Size: n, SHA256: sum})
		return nil
	})
	if err == nil && len(out) == 0 {
		err = errNoFiles
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Path < out[j].Path })
	return out, err
}

// hashFile returns the lower-case hex SHA-256 of a file and its size.
func hashFile(p string) (string, int64, error) {
	f, err := os.Open(p)
	if err != nil {
		return "", 0, err
	}
	defer f.Close()
	return hashReader(f)
}

// hashReader returns the lower-case hex SHA-256 of everything r yields
// and its length.
func hashReader(r io.Reader) (string, int64, error) {
	h := sha256.New()
	n, err := io.Copy(h, r)
	if err != nil {
		return "", n, err
	}
	return hex.EncodeToString(h.Sum(nil)), n, nil
}

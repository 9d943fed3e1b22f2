package main

// The replica side of several replicas: `kinword serve --snapshots SHARED`
// installs the version SHARED/CURRENT names into DATA/snapshots/<version>
// (copied, then every file's size and SHA-256 checked against the
// manifest, then renamed into place, so an installed folder is always a
// verified one), serves it, and every refresh interval swaps in a newer
// one without pausing (finder.Swap). A version that fails its checks is
// rejected, logged and counted, and never retried; the old one keeps
// serving.

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"os"
	"path"
	"path/filepath"
	"strings"
	"sync/atomic"
	"time"

	"kinword/internal/finder"
)

// errRejected: a version's files do not match its manifest.
var errRejected = errors.New("snapshots: version rejected")

// replica fetches published versions from a shared folder.
type replica struct {
	shared string // the publisher's shared folder
	local  string // DATA/snapshots
	log    *slog.Logger
	// rejected counts versions refused for a checksum, size or manifest
	// mismatch; swaps counts versions swapped in after start.
	rejected, swaps atomic.Int64
	refused         map[string]bool // rejected versions, not retried
	// count, when set before loop starts, counts each swap and each
	// rejected or failed version in kinword_reload_total.
	count func(ok bool)
}

func (r *replica) counted(ok bool) {
	if r.count != nil {
		r.count(ok)
	}
}

func newReplica(shared, data string, log *slog.Logger) *replica {
	return &replica{shared: shared, local: filepath.Join(data, "snapshots"), log: log, refused: map[string]bool{}}
}

// start installs the current version if it can and returns the folder
// to open and its version. When the shared folder cannot give a good
// version it falls back to the newest installed one, and without any to
// the data folder itself (version "").
func (r *replica) start(ctx context.Context, data string) (string, string) {
	v, dir, err := r.fetchCurrent(ctx)
	if err == nil {
		r.pruneLocal(v)
		return dir, v
	}
	vs, _ := listVersions(r.local)
	if len(vs) > 0 {
		v = vs[len(vs)-1]
		r.log.Warn("snapshots: serving the newest installed version", "version", v, "err", err)
		r.pruneLocal(v)
		return filepath.Join(r.local, v), v
	}
	r.log.Warn("snapshots: no version installed; serving the data folder", "data", data, "err", err)
	return data, ""
}

// pruneLocal removes, before anything is opened, every installed version
// but keep and every unfinished install (left by a stop mid-copy).
func (r *replica) pruneLocal(keep string) {
	ents, _ := os.ReadDir(r.local)
	for _, d := range ents {
		name := d.Name()
		if name == keep || !d.IsDir() || !(versionName.MatchString(name) || strings.HasPrefix(name, ".install-")) {
			continue
		}
		if err := os.RemoveAll(filepath.Join(r.local, name)); err != nil {
			r.log.Warn("snapshots: remove old version", "version", name, "err", err)
		}
	}
}

// fetchCurrent installs the version CURRENT names unless it is installed
// already, and returns it with its local folder.
func (r *replica) fetchCurrent(ctx context.Context) (string, string, error) {
	v, err := readCurrent(r.shared)
	if err != nil {
		return "", "", err
	}
	if r.refused[v] {
		return v, "", fmt.Errorf("%w: %s was refused before", errRejected, v)
	}
	dir, err := r.install(ctx, v)
	if errors.Is(err, errRejected) {
		r.refused[v] = true
		n := r.rejected.Add(1)
		r.log.Error("snapshots: version rejected; the old one keeps serving", "version", v, "err", err, "rejected_total", n)
		r.counted(false)
	}
	return v, dir, err
}

// install copies version v into r.local (checking sizes and checksums as
// it copies) and returns its folder; an installed version is reused.
func (r *replica) install(ctx context.Context, v string) (string, error) {
	dst := filepath.Join(r.local, v)
	if _, err := os.Stat(filepath.Join(dst, manifestFile)); err == nil {
		return dst, nil
	}
	src := filepath.Join(r.shared, v)
	b, err := os.ReadFile(filepath.Join(src, manifestFile))
	if err != nil {
		return "", fmt.Errorf("snapshots: read manifest of %s: %w", v, err)
	}
	var m manifest
	if err := json.Unmarshal(b, &m); err != nil {
		return "", fmt.Errorf("%w: %s: manifest: %v", errRejected, v, err)
	}
	if err := checkManifest(m, v); err != nil {
		return "", err
	}
	if err := os.MkdirAll(r.local, 0o755); err != nil {
		return "", fmt.Errorf("snapshots: %w", err)
	}
	tmp, err := os.MkdirTemp(r.local, ".install-")
	if err != nil {
		return "", fmt.Errorf("snapshots: %w", err)
	}
	defer os.RemoveAll(tmp) // gone after the rename, or on any failure
	for _, f := range m.Files {
		if err := ctx.Err(); err != nil {
			return "", fmt.Errorf("snapshots: install %s: %w", v, err)
		}
		to := filepath.Join(tmp, filepath.FromSlash(f.Path))
		if err := os.MkdirAll(filepath.Dir(to), 0o755); err != nil {
			return "", fmt.Errorf("snapshots: %w", err)
		}
		sum, n, err := copyFile(filepath.Join(src, filepath.FromSlash(f.Path)), to)
		switch {
		case errors.Is(err, os.ErrNotExist):
			return "", fmt.Errorf("%w: %s: %s is missing", errRejected, v, f.Path)
		case err != nil:
			return "", fmt.Errorf("snapshots: copy %s of %s: %w", f.Path, v, err)
		case n != f.Size:
			return "", fmt.Errorf("%w: %s: %s has %d bytes, the manifest says %d", errRejected, v, f.Path, n, f.Size)
		case sum != f.SHA256:
			return "", fmt.Errorf("%w: %s: %s has SHA-256 %s, the manifest says %s", errRejected, v, f.Path, sum, f.SHA256)
		}
	}
	if err := writeSynced(filepath.Join(tmp, manifestFile), b); err != nil {
		return "", fmt.Errorf("snapshots: %w", err)
	}
	if err := syncDir(tmp); err != nil {
		return "", fmt.Errorf("snapshots: %w", err)
	}
	if err := os.Rename(tmp, dst); err != nil {
		return "", fmt.Errorf("snapshots: %w", err)
	}
	return dst, syncDir(r.local)
}

// checkManifest refuses a manifest that does not name version v, lists no
// index, or has a path outside the version folder or repeated.
func checkManifest(m manifest, v string) error {
	bad := func(format string, args ...any) error {
		return fmt.Errorf("%w: %s: manifest: %s", errRejected, v, fmt.Sprintf(format, args...))
	}
	if m.Version != v {
		return bad("names version %q", m.Version)
	}
	seen := map[string]bool{}
	hasIndex := false
	for _, f := range m.Files {
		clean := path.Clean(f.Path)
		if clean != f.Path || path.IsAbs(f.Path) || clean == ".." || strings.HasPrefix(clean, "../") || strings.Contains(f.Path, "\\") {
			return bad("path %q leaves the version folder", f.Path)
		}
		if f.Path != "assoc.kwa" && !strings.HasPrefix(f.Path, "index/") {
			return bad("path %q is neither index/... nor assoc.kwa", f.Path)
		}
		if seen[f.Path] {
			return bad("path %q is listed twice", f.Path)
		}
		if f.Size < 0 || len(f.SHA256) != 64 {
			return bad("%q has size %d and digest %q", f.Path, f.Size, f.SHA256)
		}
		seen[f.Path] = true
		hasIndex = hasIndex || strings.HasPrefix(f.Path, "index/")
	}
	if !hasIndex {
		return bad("lists no index files")
	}
	if versionOf(m) != v {
		return bad("its file list does not hash to the version's name")
	}
	return nil
}

// loop checks CURRENT every interval and swaps in a newer version; it
// returns when ctx ends. An old version's folder is removed once the
// finder has closed its index.
func (r *replica) loop(ctx context.Context, f *finder.Finder, every time.Duration) {
	t := time.NewTicker(every)
	defer t.Stop()
	for {
		select {
		case <-ctx.Done():
			return
		case <-t.C:
		}
		if v, err := readCurrent(r.shared); err != nil || v == f.Version() || r.refused[v] {
			continue
		}
		r.step(ctx, f)
	}
}

// step installs and swaps in the current version.
func (r *replica) step(ctx context.Context, f *finder.Finder) {
	old := f.Version()
	start := time.Now()
	v, dir, err := r.fetchCurrent(ctx)
	if err != nil {
		if !errors.Is(err, errRejected) {
			r.log.Warn("snapshots: fetch failed; retrying next interval", "version", v, "err", err)
		}
		return
	}
	fetched := time.Since(start)
	closed, err := f.Swap(ctx, dir, v)
	if err != nil {
		r.log.Error("snapshots: swap failed; the old version keeps serving", "version", v, "err", err)
		r.counted(false)
		return
	}
	r.counted(true)
	n := r.swaps.Add(1)
	r.log.Warn("snapshots: swapped", "from", old, "to", v, "fetch_ms", fetched.Milliseconds(),
		"swap_ms", (time.Since(start) - fetched).Milliseconds(), "documents", f.Status().Documents, "swaps_total", n)
	if old == "" {
		return // the data folder itself is never removed
	}
	go func() {
		<-closed
		if err := os.RemoveAll(filepath.Join(r.local, old)); err != nil {
			r.log.Warn("snapshots: remove old version", "version", old, "err", err)
		}
	}()
}

package main

// Replica-side tests of snapshots.go, in process: damaged versions are
// refused and the old one keeps serving; a start without a good version
// falls back.

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/finder"
	"kinword/internal/text"
)

// corruptions damage one published version each; the replica must refuse
// every one.
var corruptions = []struct {
	name   string
	damage func(t *testing.T, dir string)
	want   string
}{
	{"flipped byte", func(t *testing.T, dir string) { flipByte(t, filepath.Join(dir, "index", "forward.kwf")) }, "SHA-256"},
	{"truncated table", func(t *testing.T, dir string) {
		os.Truncate(filepath.Join(dir, "assoc.kwa"), 10)
	}, "bytes, the manifest says"},
	{"missing file", func(t *testing.T, dir string) { os.Remove(filepath.Join(dir, "index", "forward.kwf")) }, "missing"},
	{"path outside", func(t *testing.T, dir string) {
		editManifest(t, dir, func(m *manifest) { m.Files[0].Path = "../../etc/passwd" })
	}, "leaves the version folder"},
	{"file list edited", func(t *testing.T, dir string) {
		editManifest(t, dir, func(m *manifest) { m.Files = m.Files[1:] })
	}, "does not hash to the version"},
}

func flipByte(t *testing.T, p string) {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil || len(b) < 20 {
		t.Fatalf("read %s: %v", p, err)
	}
	b[len(b)/2] ^= 0x01
	if err := os.WriteFile(p, b, 0o644); err != nil {
		t.Fatal(err)
	}
}

func editManifest(t *testing.T, dir string, edit func(*manifest)) {
	t.Helper()
	var m manifest
	b, _ := os.ReadFile(filepath.Join(dir, manifestFile))
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	edit(&m)
	b, _ = json.Marshal(m)
	os.WriteFile(filepath.Join(dir, manifestFile), b, 0o644)
}

// TestSnapshotCorruptVersionIsRejected: a replica serving version A is
// shown a damaged version B; it refuses B with a log line naming the
// mismatch and a counted rejection, keeps serving A, installs nothing of
// B, and later swaps to a good version C.
func TestSnapshotCorruptVersionIsRejected(t *testing.T) {
	ctx := context.Background()
	dataA := builtData(t, fiveDocs)
	dataC := builtData(t, valveCorpus())
	for i, c := range corruptions {
		t.Run(c.name, func(t *testing.T) {
			shared := filepath.Join(t.TempDir(), "shared")
			at := time.Now().Add(time.Duration(i) * time.Hour)
			a, err := publish(ctx, dataA, shared, "", at)
			if err != nil {
				t.Fatal(err)
			}
			var logs bytes.Buffer
			replicaData := t.TempDir()
			r := newReplica(shared, replicaData, slog.New(slog.NewTextHandler(&logs, nil)))
			var okN, failedN int // what kinword_reload_total would count
			r.count = func(ok bool) {
				if ok {
					okN++
				} else {
					failedN++
				}
			}
			dir, v := r.start(ctx, replicaData)
			if v != a.Version {
				t.Fatalf("start serves %q, want %q:\n%s", v, a.Version, &logs)
			}
			p, _ := text.NewPipeline("")
			f, err := finder.Open(ctx, dir, p, finder.Options{Version: v})
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			b, err := publish(ctx, dataC, shared, "", at.Add(time.Minute))
			if err != nil {
				t.Fatal(err)
			}
			c.damage(t, filepath.Join(shared, b.Version))
			r.step(ctx, f)
			r.step(ctx, f) // a refused version is not tried again
			if f.Version() != a.Version || r.rejected.Load() != 1 || r.swaps.Load() != 0 {
				t.Errorf("serving %q, %d rejections, %d swaps; want %q, 1, 0", f.Version(), r.rejected.Load(), r.swaps.Load(), a.Version)
			}
			if !strings.Contains(logs.String(), "version rejected") || !strings.Contains(logs.String(), c.want) {
				t.Errorf("log lacks the rejection (%q):\n%s", c.want, &logs)
			}
			if _, err := os.Stat(filepath.Join(replicaData, "snapshots", b.Version)); !errors.Is(err, os.ErrNotExist) {
				t.Errorf("the refused version was installed: %v", err)
			}
			if got, err := f.Search(ctx, finder.Request{Query: "hydrant", Viewer: access.Anonymous}); err != nil || got.Total != 2 {
				t.Errorf("A after the refusal: hydrant total %d, err %v; want 2", got.Total, err)
			}
			good, err := publish(ctx, dataC, shared, "", at.Add(2*time.Minute))
			if err != nil {
				t.Fatal(err)
			}
			r.step(ctx, f)
			if f.Version() != good.Version || f.Status().Documents != 30 {
				t.Errorf("after a good version: serving %q with %d documents, want %q with 30\n%s", f.Version(), f.Status().Documents, good.Version, &logs)
			}
			if failedN != 1 || okN != 1 {
				t.Errorf("reload metric counts: %d failed, %d ok; want 1 and 1", failedN, okN)
			}
		})
	}
}

// TestSnapshotStartFallsBack: a replica whose shared folder names no good
// version serves the newest version it installed before, and with none
// installed, its own data folder.
func TestSnapshotStartFallsBack(t *testing.T) {
	ctx := context.Background()
	data := builtData(t, fiveDocs)
	cases := []struct {
		name      string
		installed bool   // a version was installed on an earlier start
		current   string // CURRENT's content; "" = no CURRENT file
		want      string // "installed" or "data"
	}{
		{"no CURRENT, nothing installed", false, "", "data"},
		{"CURRENT names garbage, nothing installed", false, "not-a-version\n", "data"},
		{"CURRENT names a missing version, one installed", true, "v20990101T000000Z-00000000\n", "installed"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			shared, replicaData := filepath.Join(t.TempDir(), "shared"), t.TempDir()
			log := slog.New(slog.NewTextHandler(io.Discard, nil))
			var installed string
			if c.installed {
				m, err := publish(ctx, data, shared, "", time.Now())
				if err != nil {
					t.Fatal(err)
				}
				if _, v := newReplica(shared, replicaData, log).start(ctx, replicaData); v != m.Version {
					t.Fatalf("first start serves %q, want %q", v, m.Version)
				}
				installed = m.Version
			}
			os.MkdirAll(shared, 0o755)
			os.Remove(filepath.Join(shared, currentFile))
			if c.current != "" {
				os.WriteFile(filepath.Join(shared, currentFile), []byte(c.current), 0o644)
			}
			stale := filepath.Join(replicaData, "snapshots", ".install-left-by-a-crash")
			os.MkdirAll(stale, 0o755)
			dir, v := newReplica(shared, replicaData, log).start(ctx, replicaData)
			if _, err := os.Stat(stale); c.installed && !errors.Is(err, os.ErrNotExist) {
				t.Errorf("an unfinished install survived the start: %v", err)
			}
			switch c.want {
			case "data":
				if dir != replicaData || v != "" {
					t.Errorf("serves %s (%q), want the data folder", dir, v)
				}
			case "installed":
				if dir != filepath.Join(replicaData, "snapshots", installed) || v != installed {
					t.Errorf("serves %s (%q), want installed %s", dir, v, installed)
				}
			}
		})
	}
}

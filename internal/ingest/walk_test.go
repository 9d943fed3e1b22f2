package ingest

import (
	"context"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"
)

// TestBrokenFilesOneSummary puts one bad file of each kind beside good ones
// and checks that one Sync reports them all, each with its reason.
func TestBrokenFilesOneSummary(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	writeFiles(t, dir, map[string]string{
		"docs/good.md":        "# Good\n\nFine text.",
		"docs/notes.txt":      "Notes\n\nAll fine.",
		"docs/bin.txt":        "\x00\x01\x02binary",
		"docs/latin1.txt":     "caf\xe9 au lait", // ISO 8859-1 é is 0xE9, invalid alone in UTF-8 (RFC 3629)
		"docs/big.txt":        strings.Repeat("water ", 400),
		"docs/broken.docx":    "PK\x03\x04 this is no zip",
		"docs/broken.pdf":     "%PDF-1.4\nnot really",
		"docs/data.jsonl":     "{\"id\":\"j1\",\"text\":\"first\"}\n{\"id\":\"j2\",\"text\":\n\n{\"id\":\"j3\",\"text\":\"third\"}\n",
		"docs/logo.png":       "\x89PNG\r\n\x1a\n",
		"docs/empty.md":       "---\ntitle: Nothing\n---\n",
		"docs/.hidden.txt":    "never seen",
		"docs/.git/x.txt":     "never seen",
		"docs/a.md.meta.toml": "department = \"ops\"\n",
	})
	pdfLabel := "corrupt"
	if _, err := exec.LookPath("pdftotext"); err != nil {
		pdfLabel = "no extractor" // the built-in reader alone cannot read it either
	}
	sink := newMemSink()
	sum, err := Sync(context.Background(), []string{"docs"}, SyncOptions{Options: Options{MaxBytes: 1024}}, sink)
	if err != nil {
		t.Fatal(err)
	}
	want := "indexed 4, unchanged 0, removed 0, skipped 8 (binary: docs/bin.txt; invalid UTF-8: docs/latin1.txt; " +
		"too large: docs/big.txt; corrupt: docs/broken.docx, docs/broken.pdf; malformed line: docs/data.jsonl#L2; " +
		"unsupported: docs/logo.png; empty: docs/empty.md)"
	if pdfLabel != "corrupt" {
		want = strings.Replace(want, "corrupt: docs/broken.docx, docs/broken.pdf", "corrupt: docs/broken.docx", 1)
		want = strings.Replace(want, "empty: docs/empty.md)", "empty: docs/empty.md; no extractor: docs/broken.pdf)", 1)
	}
	if got := sum.Line(); got != want {
		t.Errorf("Line:\n got %s\nwant %s", got, want)
	}
	if got, want := sink.ids(), []string{"good.md", "j1", "j3", "notes.txt"}; !reflect.DeepEqual(got, want) {
		t.Errorf("stored %v, want %v", got, want)
	}
	for _, sk := range sum.Skipped {
		if sk.Kind() == nil {
			t.Errorf("%s: reason %v wraps no sentinel", sk.Path, sk.Reason)
		}
	}
}

func TestWalkOrderDeterministic(t *testing.T) {
	dir := t.TempDir()
	files := map[string]string{}
	for _, n := range []string{"b/2.txt", "a/1.md", "a/z.txt", "c.html", "b/1.txt", "a/b/deep.txt", "10.txt", "9.txt"} {
		files[n] = "Title " + n + "\n\nbody of " + n
	}
	writeFiles(t, dir, files)
	want := []string{"10.txt", "9.txt", "a/1.md", "a/b/deep.txt", "a/z.txt", "b/1.txt", "b/2.txt", "c.html"}
	for _, workers := range []int{1, 2, 7} {
		var got []string
		for _, it := range walkAll(t, []string{dir}, Options{Workers: workers}) {
			got = append(got, it.Doc.ID)
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("workers %d: order %v, want %v", workers, got, want)
		}
	}
}

func TestMetadataPrecedence(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		FolderFile:         "department = \"Ops\"\ngroups = [\"staff\"]\nurl_prefix = \"https://intranet.invalid/docs/\"\nlanguage = \"english\"\n",
		"hr/" + FolderFile: "department = \"hr\"\ngroups = \"HR, payroll\"\n",
		"hr/policy.md":     "---\ntitle: Leave Policy\ngroups: [Managers]\nmodified: 2023-06-01\n---\n# Ignored H1\n\nTake leave.",
		"hr/policy.md" + SidecarSuffix: "title = \"Sidecar Title\"\ndepartment = \"legal\"\ngroups = [\"x\"]\nurl = \"https://x.invalid/p\"\n" +
			"modified = 2020-01-01T00:00:00Z\n",
		"hr/leave form.txt":             "Leave form\n\nFill it in.",
		"open.md":                       "---\ngroups: []\n---\nFor everyone.",
		"ops/pump.html":                 "<title>Pump</title><p>Prime the pump.</p>",
		"ops/pump.html" + SidecarSuffix: "id = \"pump-1\"\nlanguage = \"klingon\"\ncolour = \"blue\"\n",
		"wiki/" + FolderFile:            "url_prefix = \"https://wiki.invalid/w\"\nlanguage = \"fr\"\n",
		"wiki/sub/page.md":              "Texte.",
	})
	mtime := time.Date(2022, 2, 2, 12, 0, 0, 0, time.UTC)
	if err := os.Chtimes(filepath.Join(dir, "hr", "leave form.txt"), mtime, mtime); err != nil {
		t.Fatal(err)
	}
	var warned []string
	items := walkAll(t, []string{dir}, Options{Warn: func(m string) { warned = append(warned, m) }})
	byPath := map[string]Item{}
	for _, it := range items {
		if it.Skip != nil {
			t.Fatalf("unexpected skip %v", it.Skip)
		}
		byPath[it.Doc.ID] = it
	}
	cases := []struct {
		name, id               string
		title, dept, url, lang string
		groups                 []string
		modified               time.Time
		warn                   string
	}{
		{name: "front matter over sidecar over folder", id: "hr/policy.md", title: "Leave Policy", dept: "legal",
			url: "https://x.invalid/p", lang: "english", groups: []string{"managers"}, modified: time.Date(2023, 6, 1, 0, 0, 0, 0, time.UTC)},
		{name: "nearest folder wins per key", id: "hr/leave form.txt", title: "Leave form", dept: "hr",
			url: "https://intranet.invalid/docs/hr/leave%20form.html", lang: "english", groups: []string{"hr", "payroll"}, modified: mtime},
		{name: "explicitly open overrides folder groups", id: "open.md", title: "open", dept: "ops",
			url: "https://intranet.invalid/docs/open.html", lang: "english"},
		{name: "sidecar id, unknown language falls back", id: "pump-1", title: "Pump", dept: "ops",
			url: "https://intranet.invalid/docs/ops/pump.html", lang: "english", groups: []string{"staff"}, warn: `unknown language "klingon"`},
		{name: "url below the folder that set the prefix", id: "wiki/sub/page.md", title: "page", dept: "ops",
			url: "https://wiki.invalid/w/sub/page.html", lang: "french", groups: []string{"staff"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			it, ok := byPath[c.id]
			if !ok {
				t.Fatalf("no document %q among %d", c.id, len(items))
			}
			d := it.Doc
			if d.Title != c.title || d.Department != c.dept || d.URL != c.url || d.Language != c.lang || !reflect.DeepEqual(d.Groups, c.groups) {
				t.Errorf("got title %q dept %q url %q lang %q groups %v", d.Title, d.Department, d.URL, d.Language, d.Groups)
			}
			if !c.modified.IsZero() && !d.Modified.Equal(c.modified) {
				t.Errorf("modified %v, want %v", d.Modified, c.modified)
			}
			if c.warn != "" && !strings.Contains(strings.Join(it.Warnings, "|"), c.warn) {
				t.Errorf("warnings %q lack %q", it.Warnings, c.warn)
			}
		})
	}
	if !strings.Contains(strings.Join(byPath["pump-1"].Warnings, "|"), `unknown key "colour"`) {
		t.Errorf("sidecar unknown key not warned: %q", byPath["pump-1"].Warnings)
	}
	if len(warned) != 0 {
		t.Errorf("walk warnings %q, want none", warned)
	}
}

func TestBadMetadataSkips(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		"locked/" + FolderFile:   "groups = [unquoted\n",
		"locked/secret.txt":      "Restricted\n\nsalaries",
		"locked/deeper/b.txt":    "also restricted",
		"ok.txt":                 "fine",
		"ok.txt" + SidecarSuffix: "groups = 5\n",
		"fine.txt":               "fine too",
	})
	got := map[string]error{}
	for _, it := range walkAll(t, []string{dir}, Options{}) {
		if it.Skip != nil {
			got[filepath.Base(it.Path)] = it.Skip.Kind()
		}
	}
	want := map[string]error{"secret.txt": ErrBadMeta, "b.txt": ErrBadMeta, "ok.txt": ErrBadMeta}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("skips %v, want %v", got, want)
	}
}

func TestWalkRoots(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{"a/one.txt": "One", "b/two.txt": "Two", ".hidden/x.txt": "x"})
	cases := []struct {
		name  string
		roots []string
		ids   []string
	}{
		{"single file root", []string{filepath.Join(dir, "a", "one.txt")}, []string{"one.txt"}},
		{"roots in given order", []string{filepath.Join(dir, "b"), filepath.Join(dir, "a")}, []string{"two.txt", "one.txt"}},
		{"duplicate root once", []string{filepath.Join(dir, "a"), filepath.Join(dir, "a") + "/"}, []string{"one.txt"}},
		{"hidden folder skipped", []string{dir}, []string{"a/one.txt", "b/two.txt"}},
		{"explicit hidden root walked", []string{filepath.Join(dir, ".hidden")}, []string{"x.txt"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var ids []string
			for _, it := range walkAll(t, c.roots, Options{}) {
				ids = append(ids, it.Doc.ID)
			}
			if !reflect.DeepEqual(ids, c.ids) {
				t.Errorf("ids %v, want %v", ids, c.ids)
			}
		})
	}
	t.Run("missing root is an error", func(t *testing.T) {
		err := Walk(context.Background(), []string{filepath.Join(dir, "nope")}, Options{}, func(Item) error { return nil })
		if !errors.Is(err, os.ErrNotExist) {
			t.Errorf("err = %v, want not-exist", err)
		}
	})
	t.Run("bad default language", func(t *testing.T) {
		if err := Walk(context.Background(), []string{dir}, Options{DefaultLanguage: "latin"}, func(Item) error { return nil }); err == nil {
			t.Error("want an error for an unknown default language")
		}
	})
	t.Run("fn error stops the walk", func(t *testing.T) {
		stop := errors.New("stop")
		n := 0
		err := Walk(context.Background(), []string{dir}, Options{}, func(Item) error { n++; return stop })
		if !errors.Is(err, stop) || n != 1 {
			t.Errorf("err %v after %d items, want stop after 1", err, n)
		}
	})
}

package web

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"io/fs"
	"net/http"
	"slices"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"kinword/static"
)

// pageRefs lists the same-origin files a page loads (script src, link
// href) and every inline-code construct it holds: a script without src, a
// style element, a style attribute, an on* event-handler attribute, or a
// javascript: URL.
func pageRefs(t *testing.T, page []byte) (refs, inline []string) {
	t.Helper()
	z := html.NewTokenizer(bytes.NewReader(page))
	for {
		switch z.Next() {
		case html.ErrorToken:
			return refs, inline
		case html.StartTagToken, html.SelfClosingTagToken:
			tok := z.Token()
			attrs := map[string]string{}
			for _, a := range tok.Attr {
				attrs[a.Key] = a.Val
				if a.Key == "style" || strings.HasPrefix(a.Key, "on") || strings.HasPrefix(strings.TrimSpace(a.Val), "javascript:") {
					inline = append(inline, tok.String())
				}
			}
			switch tok.Data {
			case "script":
				if attrs["src"] == "" {
					inline = append(inline, "<script> without src")
				} else {
					refs = append(refs, attrs["src"])
				}
			case "style":
				inline = append(inline, "<style> element")
			case "link":
				refs = append(refs, attrs["href"])
			}
		}
	}
}

// TestPagesDesksServed: /librarian and /admin answer their embedded HTML
// to anyone (the pages hold no data), under the server's content security
// policy; every file they load is served and is in requiredAssets, so a
// missing one stops New at start-up; and they hold no inline code.
//
// Under CSP Level 3, a script-src or style-src without 'unsafe-inline'
// blocks inline script elements, event-handler attributes, style elements
// and style attributes (W3C, "Content Security Policy Level 3", 2023
// working draft, section 6.1.3 and the "unsafe-inline" keyword; from
// memory), so any of those in the pages would silently not run.
func TestPagesDesksServed(t *testing.T) {
	s := newTestServer(t)
	for _, tc := range []struct {
		name, path, title string
		wantRefs          []string
	}{
		{"librarian", "/librarian", "Vocabulary desk", []string{"/static/desk.js", "/static/librarian.js", "/static/librarian-io.js", "/static/desk.css"}},
		{"admin", "/admin", "Suggestion review", []string{"/static/desk.js", "/static/admin.js", "/static/vendor/uplot/uPlot.iife.min.js", "/static/vendor/uplot/uPlot.min.css"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			rec := get(t, s, tc.path, nil) // anonymous: no token, no identity headers
			if rec.Code != http.StatusOK {
				t.Fatalf("GET %s: %d %s", tc.path, rec.Code, rec.Body)
			}
			if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, "text/html") {
				t.Errorf("GET %s: Content-Type %q", tc.path, ct)
			}
			csp := rec.Header().Get("Content-Security-Policy")
			for _, d := range []string{"script-src 'self'", "style-src 'self'"} {
				if !strings.Contains(csp, d) {
					t.Errorf("GET %s: CSP %q lacks %q", tc.path, csp, d)
				}
			}
			if strings.Contains(csp, "unsafe-inline") {
				t.Errorf("GET %s: CSP %q allows inline code", tc.path, csp)
			}
			page := rec.Body.Bytes()
			if !bytes.Contains(page, []byte("<h1>"+tc.title+"</h1>")) {
				t.Errorf("GET %s: no <h1>%s</h1>", tc.path, tc.title)
			}
			refs, inline := pageRefs(t, page)
			if len(inline) > 0 {
				t.Errorf("GET %s holds inline code the CSP blocks: %q", tc.path, inline)
			}
			for _, w := range tc.wantRefs {
				if !slices.Contains(refs, w) {
					t.Errorf("GET %s does not load %s (loads %q)", tc.path, w, refs)
				}
			}
			for _, ref := range refs {
				name, ok := strings.CutPrefix(ref, "/static/")
				if !ok {
					t.Errorf("GET %s loads %q from outside /static/", tc.path, ref)
					continue
				}
				if !slices.Contains(requiredAssets, name) {
					t.Errorf("%s is loaded by %s but not in requiredAssets", name, tc.path)
				}
				a := get(t, s, ref, nil)
				if a.Code != http.StatusOK || a.Body.Len() == 0 {
					t.Errorf("GET %s: %d, %d bytes", ref, a.Code, a.Body.Len())
				}
				want := map[bool]string{true: "text/css", false: "text/javascript"}[strings.HasSuffix(ref, ".css")]
				if ct := a.Header().Get("Content-Type"); !strings.HasPrefix(ct, want) {
					t.Errorf("GET %s: Content-Type %q, want %s (nosniff makes the browser refuse others)", ref, ct, want)
				}
			}
		})
	}
}

// TestPagesVendoredChartUnchanged: the vendored uPlot files are the ones
// the README names, byte for byte (hashes taken from the files of the npm
// package uplot@1.6.32 when they were copied in), and its MIT licence text
// travels with them.
func TestPagesVendoredChartUnchanged(t *testing.T) {
	readme, err := fs.ReadFile(static.FS, "vendor/uplot/README.md")
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{}
	for line := range strings.Lines(string(readme)) {
		if f := strings.Fields(line); len(f) == 3 && f[0] == "sha256" {
			want[f[2]] = f[1]
		}
	}
	for _, name := range []string{"uPlot.iife.min.js", "uPlot.min.css"} {
		b, err := fs.ReadFile(static.FS, "vendor/uplot/"+name)
		if err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(b)
		if got := hex.EncodeToString(sum[:]); got != want[name] {
			t.Errorf("%s: sha256 %s, README says %q", name, got, want[name])
		}
	}
	lic, err := fs.ReadFile(static.FS, "vendor/uplot/LICENSE")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(lic, []byte("The MIT License")) || !bytes.Contains(lic, []byte("Permission is hereby granted, free of charge")) {
		t.Errorf("vendor/uplot/LICENSE is not the MIT licence text")
	}
}

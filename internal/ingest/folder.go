package ingest

import (
	"fmt"
	"net/url"
	"path"
	"strings"
)

// FolderFile is the name of the folder-defaults file. It applies to the
// folder it sits in and every folder below, up to the walk root; the nearest
// file wins per key.
const FolderFile = ".kinword-folder.toml"

// SidecarSuffix is appended to a file name to name its sidecar metadata
// file: "report.pdf" has "report.pdf.meta.toml".
const SidecarSuffix = ".meta.toml"

// folderKeys are the keys a folder-defaults file understands.
var folderKeys = []string{"department", "groups", "url_prefix", "language"}

// folderDefaults is the resolved effect of the folder files above a file.
type folderDefaults struct {
	meta Meta // Department, Groups and Language only
	// urlPrefix is the nearest url_prefix; urlBase is the slash path,
	// relative to the walk root, of the folder that set it ("" for the root).
	urlPrefix, urlBase string
	// fingerprint lists the folder files' contents that apply, so a change
	// in defaults changes the hash of every file below.
	fingerprint string
	// err is set when any folder file on the way down is unreadable.
	err error
}

// ParseFolderDefaults reads a folder-defaults file (keys: department,
// groups, url_prefix, language) and returns them as Meta plus the prefix.
func ParseFolderDefaults(data []byte) (meta Meta, urlPrefix string, err error) {
	m, err := decodeTOML(data)
	if err != nil {
		return Meta{}, "", err
	}
	meta, err = metaFromMap(m, folderKeys, true)
	if err != nil {
		return Meta{}, "", reason(ErrBadMeta, "folder defaults: %v", err)
	}
	if v, ok := m["url_prefix"]; ok {
		s, ok := v.(string)
		if !ok {
			return Meta{}, "", reason(ErrBadMeta, "folder defaults: url_prefix: want a string, got %T", v)
		}
		urlPrefix = strings.TrimSpace(s)
	}
	return meta, urlPrefix, nil
}

// child resolves the defaults of a sub-folder relDir (slash path from the
// walk root) whose own folder file holds data (nil when absent). It returns
// the folder file's own warnings separately, to be reported once.
func (parent folderDefaults) child(relDir string, data []byte, name string) (folderDefaults, []string) {
	if data == nil || parent.err != nil {
		return parent, nil
	}
	meta, prefix, err := ParseFolderDefaults(data)
	if err != nil {
		parent.err = fmt.Errorf("%s: %w", name, err)
		return parent, nil
	}
	var warns []string
	for _, w := range meta.Warnings {
		warns = append(warns, name+": "+w)
	}
	meta.Warnings = nil
	out := parent
	out.meta = meta.over(parent.meta)
	if prefix != "" {
		out.urlPrefix, out.urlBase = prefix, relDir
	}
	out.fingerprint = parent.fingerprint + "\x00" + relDir + "\x00" + string(data)
	return out, warns
}

// deriveURL joins the nearest url_prefix with the file's path below the
// folder that set it, the extension changed to .html; "" without a prefix.
func (f folderDefaults) deriveURL(rel string) string {
	if f.urlPrefix == "" {
		return ""
	}
	below := rel
	if f.urlBase != "" {
		below = strings.TrimPrefix(rel, f.urlBase+"/")
	}
	below = strings.TrimSuffix(below, path.Ext(below)) + ".html"
	segs := strings.Split(below, "/")
	for i, s := range segs {
		segs[i] = url.PathEscape(s)
	}
	return strings.TrimRight(f.urlPrefix, "/") + "/" + strings.Join(segs, "/")
}

// languages are the names the Snowball stemmers in
// github.com/kljensen/snowball v0.10.0 accept (snowball.go, func Stem).
var languages = []string{"english", "french", "hungarian", "norwegian", "russian", "spanish", "swedish"}

// languageCodes maps ISO 639-1 codes to those names (ISO 639-1:2002; "nb"
// and "nn" are the Bokmål and Nynorsk codes, both stemmed as Norwegian).
var languageCodes = map[string]string{
	"en": "english", "fr": "french", "hu": "hungarian", "no": "norwegian",
	"nb": "norwegian", "nn": "norwegian", "ru": "russian", "es": "spanish", "sv": "swedish",
}

// Languages returns the language names Kinword can stem, sorted.
func Languages() []string { return append([]string(nil), languages...) }

// NormalizeLanguage returns the Snowball name for a language name or ISO
// 639-1 code (case-insensitive; a region such as "en-GB" is ignored), and
// whether it is known.
func NormalizeLanguage(s string) (string, bool) {
	s = strings.ToLower(strings.TrimSpace(s))
	for _, l := range languages {
		if s == l {
			return l, true
		}
	}
	code, _, _ := strings.Cut(strings.ReplaceAll(s, "_", "-"), "-")
	if l, ok := languageCodes[code]; ok {
		return l, true
	}
	return "", false
}

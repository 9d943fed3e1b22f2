package ingest

import (
	"encoding/json"
	"fmt"
	"slices"
	"sort"
	"strings"
	"time"

	"github.com/BurntSushi/toml"
)

// Meta is metadata found in or beside a document. Empty fields are unset and
// give way to the next source in precedence (front matter or JSON line,
// then sidecar file, then folder defaults).
type Meta struct {
	// ID replaces the path-derived document ID.
	ID string
	// Title replaces the title the parser derived from the content.
	Title string
	// URL replaces the URL derived from a folder url_prefix.
	URL string
	// Department is the owning department slug, lower-cased.
	Department string
	// Groups are the access groups, lower-cased, sorted and de-duplicated.
	// nil means unset; a non-nil empty slice means explicitly open.
	Groups []string
	// Language is the language as written (validated when the document is
	// built; unknown names fall back to Options.DefaultLanguage).
	Language string
	// Modified is the explicit modification time in UTC.
	Modified time.Time
	// Warnings are non-fatal problems met while reading the metadata.
	Warnings []string
}

// over returns m with every unset field taken from low.
func (m Meta) over(low Meta) Meta {
	pick := func(a, b string) string {
		if a != "" {
			return a
		}
		return b
	}
	out := Meta{
		ID: pick(m.ID, low.ID), Title: pick(m.Title, low.Title), URL: pick(m.URL, low.URL),
		Department: pick(m.Department, low.Department), Language: pick(m.Language, low.Language),
		Groups: m.Groups, Modified: m.Modified,
		Warnings: append(slices.Clip(low.Warnings), m.Warnings...),
	}
	if out.Groups == nil {
		out.Groups = low.Groups
	}
	if out.Modified.IsZero() {
		out.Modified = low.Modified
	}
	return out
}

// metaKeys are the keys front matter, sidecars and JSON lines understand.
var metaKeys = []string{"id", "title", "url", "department", "groups", "language", "modified"}

// metaFromMap reads the keys in allowed from m. Wrong types for id, url,
// department, groups or language are errors (they steer access and
// identity); an unreadable modified time is a warning. Unknown keys are
// warned about when strict is set.
func metaFromMap(m map[string]any, allowed []string, strict bool) (Meta, error) {
	var meta Meta
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		v := m[k]
		lk := strings.ToLower(strings.TrimSpace(k))
		if !slices.Contains(allowed, lk) {
			if strict {
				meta.Warnings = append(meta.Warnings, fmt.Sprintf("unknown key %q ignored", k))
			}
			continue
		}
		switch lk {
		case "groups":
			g, err := groupsValue(v)
			if err != nil {
				return Meta{}, err
			}
			meta.Groups = g
		case "modified":
			t, err := timeValue(v)
			if err != nil {
				meta.Warnings = append(meta.Warnings, err.Error())
			}
			meta.Modified = t
		default:
			s, ok := scalarString(v)
			if !ok {
				return Meta{}, fmt.Errorf("%s: want a string, got %T", lk, v)
			}
			switch lk {
			case "id":
				meta.ID = s
			case "title":
				meta.Title = collapse(s)
			case "url":
				meta.URL = s
			case "department":
				meta.Department = strings.ToLower(s)
			case "language":
				meta.Language = s
			}
		}
	}
	return meta, nil
}

// scalarString renders a string, number or boolean as trimmed text.
func scalarString(v any) (string, bool) {
	switch x := v.(type) {
	case nil:
		return "", true
	case string:
		return strings.TrimSpace(strings.ToValidUTF8(x, "\uFFFD")), true
	case json.Number:
		return x.String(), true
	case int, int64, uint64, float64, bool:
		return fmt.Sprint(x), true
	}
	return "", false
}

// groupsValue accepts a list of scalars or a comma-separated string.
func groupsValue(v any) ([]string, error) {
	var raw []string
	switch x := v.(type) {
	case nil:
	case string:
		raw = strings.Split(x, ",")
	case []any:
		for _, e := range x {
			s, ok := scalarString(e)
			if !ok {
				return nil, fmt.Errorf("groups: want strings, got %T", e)
			}
			raw = append(raw, s)
		}
	case []string:
		raw = x
	default:
		return nil, fmt.Errorf("groups: want a list or a comma-separated string, got %T", v)
	}
	return normGroups(raw), nil
}

// normGroups lower-cases, trims, sorts and de-duplicates group names,
// dropping empty ones; the result is never nil.
func normGroups(in []string) []string {
	out := []string{}
	for _, g := range in {
		if g = strings.ToLower(strings.TrimSpace(strings.ToValidUTF8(g, "\uFFFD"))); g != "" {
			out = append(out, g)
		}
	}
	sort.Strings(out)
	return slices.Compact(out)
}

// timeLayouts are the accepted textual forms of "modified".
var timeLayouts = []string{time.RFC3339Nano, "2006-01-02T15:04:05", "2006-01-02 15:04:05", "2006-01-02 15:04", "2006-01-02"}

// timeValue reads a time (TOML and YAML may already have decoded one) or a
// string in one of timeLayouts; times without a zone are taken as UTC.
func timeValue(v any) (time.Time, error) {
	switch x := v.(type) {
	case nil:
		return time.Time{}, nil
	case time.Time:
		return x.UTC(), nil
	case string:
		s := strings.TrimSpace(x)
		for _, l := range timeLayouts {
			if t, err := time.Parse(l, s); err == nil {
				return t.UTC(), nil
			}
		}
		return time.Time{}, fmt.Errorf("modified %q is not a date (want RFC 3339 or YYYY-MM-DD); using the file time", s)
	}
	return time.Time{}, fmt.Errorf("modified: want a date, got %T; using the file time", v)
}

// ParseSidecar reads a NAME.EXT.meta.toml sidecar (keys: id, title, url,
// department, groups, language, modified).
func ParseSidecar(data []byte) (Meta, error) {
	m, err := decodeTOML(data)
	if err != nil {
		return Meta{}, err
	}
	meta, err := metaFromMap(m, metaKeys, true)
	if err != nil {
		return Meta{}, reason(ErrBadMeta, "sidecar: %v", err)
	}
	return meta, nil
}

func decodeTOML(data []byte) (m map[string]any, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = reason(ErrBadMeta, "toml: %v", r)
		}
	}()
	if _, err := toml.Decode(string(data), &m); err != nil {
		return nil, reason(ErrBadMeta, "toml: %v", err)
	}
	return m, nil
}

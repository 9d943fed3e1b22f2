// Package access decides who may read what. A Viewer is the searcher's
// department and groups; a document is readable when it is open (no groups)
// or shares a group with the viewer. It is pure logic and must not import
// bleve, gin, database drivers or other Kinword packages.
package access

import (
	"errors"
	"fmt"
	"slices"
	"sort"
	"strings"
)

// ErrBadViewer is returned by ParseViewer for malformed viewer specs.
var ErrBadViewer = errors.New("access: bad viewer")

// Viewer is who is searching.
type Viewer struct {
	// Department is the searcher's department slug; empty means unknown.
	Department string `json:"department,omitempty"`
	// Groups are the access groups the searcher belongs to, sorted and
	// de-duplicated by Normalize.
	Groups []string `json:"groups,omitempty"`
}

// Anonymous is the viewer with no department and no groups: it reads open
// documents only.
var Anonymous = Viewer{}

// CanRead reports whether v may read a document restricted to docGroups
// (empty docGroups means open to everyone).
func (v Viewer) CanRead(docGroups []string) bool {
	if len(docGroups) == 0 {
		return true
	}
	for _, g := range docGroups {
		if slices.Contains(v.Groups, g) {
			return true
		}
	}
	return false
}

// Normalize lower-cases, trims, sorts and de-duplicates groups and the
// department, so that equal viewers compare and hash equal.
func (v Viewer) Normalize() Viewer {
	out := Viewer{Department: strings.ToLower(strings.TrimSpace(v.Department))}
	out.Groups = NormalizeGroups(v.Groups)
	return out
}

// NormalizeGroups lower-cases, trims, sorts and de-duplicates group names,
// dropping empty ones.
func NormalizeGroups(groups []string) []string {
	var out []string
	for _, g := range groups {
		g = strings.ToLower(strings.TrimSpace(g))
		if g != "" {
			out = append(out, g)
		}
	}
	sort.Strings(out)
	return slices.Compact(out)
}

// Key is a stable string for caching per viewer scope.
func (v Viewer) Key() string {
	return v.Department + "|" + strings.Join(v.Groups, ",")
}

// String renders the viewer in the form ParseViewer reads.
func (v Viewer) String() string {
	parts := []string{}
	if v.Department != "" {
		parts = append(parts, "dept="+v.Department)
	}
	if len(v.Groups) > 0 {
		parts = append(parts, "groups="+strings.Join(v.Groups, "+"))
	}
	if len(parts) == 0 {
		return "anonymous"
	}
	return strings.Join(parts, ",")
}

// ParseViewer reads a viewer spec such as "dept=ops,groups=staff+it-security".
// Groups may be separated by "+" or "|"; "anonymous" or "" gives Anonymous.
// A bare comma-separated continuation after groups= is also accepted
// ("dept=ops,groups=staff,executive").
func ParseViewer(spec string) (Viewer, error) {
	spec = strings.TrimSpace(spec)
	if spec == "" || spec == "anonymous" {
		return Anonymous, nil
	}
	var v Viewer
	inGroups := false
	for _, part := range strings.Split(spec, ",") {
		part = strings.TrimSpace(part)
		if part == "" {
			continue
		}
		key, val, ok := strings.Cut(part, "=")
		if !ok {
			if inGroups {
				v.Groups = append(v.Groups, part)
				continue
			}
			return Viewer{}, fmt.Errorf("%w: %q is not key=value (keys: dept, groups)", ErrBadViewer, part)
		}
		switch strings.ToLower(strings.TrimSpace(key)) {
		case "dept", "department":
			v.Department = val
			inGroups = false
		case "groups", "group":
			v.Groups = append(v.Groups, strings.FieldsFunc(val, func(r rune) bool { return r == '+' || r == '|' })...)
			inGroups = true
		default:
			return Viewer{}, fmt.Errorf("%w: unknown key %q (keys: dept, groups)", ErrBadViewer, key)
		}
	}
	return v.Normalize(), nil
}

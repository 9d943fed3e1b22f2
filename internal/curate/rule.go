// Package curate holds the librarians' curation rules and their exchange
// formats: pin, block, relate, use (ANSI/NISO Z39.19 equivalence), broader
// and narrower rules; their validation; a compiled, immutable Set that tells
// the finder what the rules do to one query; and CSV, N-Triples and JSON-LD
// (W3C SKOS) import and export.
//
// Matching is on stems from the one text pipeline (kinword/internal/text): a
// rule fires for a query when all of the rule query's stems appear among the
// query's stems, in any order and not necessarily adjacent ("burst pipes"
// fires for "pipe burst near school").
//
// SKOS mapping (W3C SKOS Reference, 2009): a use rule is a skos:Concept with
// skos:prefLabel Term and skos:altLabel Query; relate, broader and narrower
// rules are skos:related, skos:broader and skos:narrower between the
// concepts of Query and Term; labels carry Rule.Lang. Concept IRIs are
// minted from the exact preferred label (Options.Base, tag, "/", the label
// percent-encoded). Pins, blocks, and any rule with a department, dates or a
// reason (which SKOS cannot scope) are kw:Rule nodes in Kinword's own
// vocabulary KinwordNS, so every rule survives an export and import. Rule IDs
// are not exchanged: imports set ContentID.
//
// It is pure logic: it imports only kinword/internal/text, the standard
// library and json-gold. It must not import bleve, gin, database drivers,
// internal/store, internal/web or internal/suggest.
package curate

import (
	"crypto/sha256"
	"encoding/hex"
	"strings"
	"time"
)

// Kind is what a rule does.
type Kind string

// The rule kinds.
const (
	// Pin always offers Term for queries containing Query.
	Pin Kind = "pin"
	// Block never offers Term: for every query when Query is empty, else
	// only for queries containing Query.
	Block Kind = "block"
	// Relate offers Term as a related term for queries containing Query.
	Relate Kind = "relate"
	// Use is the ANSI/NISO Z39.19 equivalence: Query is the non-preferred
	// term, Term the preferred one; a search for Query also matches Term.
	Use Kind = "use"
	// Broader says Term is broader than Query; offered as a refinement.
	Broader Kind = "broader"
	// Narrower says Term is narrower than Query; offered as a refinement.
	Narrower Kind = "narrower"
)

// Kinds lists every kind, in the order exports sort them.
var Kinds = []Kind{Pin, Block, Relate, Use, Broader, Narrower}

// Valid reports whether k is one of Kinds.
func (k Kind) Valid() bool {
	for _, x := range Kinds {
		if x == k {
			return true
		}
	}
	return false
}

// NeedsQuery reports whether rules of kind k must name a query (all but
// Block).
func (k Kind) NeedsQuery() bool { return k != Block }

// Rule is one curation rule. Query and Term are surface text (a word or a
// phrase of at most MaxWords words and MaxTextBytes bytes); they are matched
// on their stems.
type Rule struct {
	// ID identifies the rule in reports and in Effect.Rules. It is not
	// exchanged: imports set it to ContentID.
	ID string `json:"id,omitempty"`
	// Kind is what the rule does.
	Kind Kind `json:"kind"`
	// Query is the text a query must contain (all its stems) for the rule to
	// fire; empty only for a Block that applies to every query.
	Query string `json:"query,omitempty"`
	// Term is the word or phrase offered, blocked or preferred.
	Term string `json:"term"`
	// Department is the department id the rule applies to; "" means the
	// whole organisation.
	Department string `json:"department,omitempty"`
	// Start is when the rule starts to fire (inclusive); zero means always.
	Start time.Time `json:"start,omitzero"`
	// Expiry is when the rule stops firing (exclusive); zero means never.
	Expiry time.Time `json:"expiry,omitzero"`
	// Reason is the librarian's note, at most MaxReasonBytes bytes.
	Reason string `json:"reason,omitempty"`
	// Lang is the BCP 47 language tag of Query and Term in lower case ("en",
	// "fr-be"); "" means the pipeline's default language (labelled "en" in
	// SKOS unless Options.Lang says otherwise).
	Lang string `json:"lang,omitempty"`
}

// Limits on rule fields.
const (
	// MaxTextBytes is the longest Query or Term, in bytes.
	MaxTextBytes = 100
	// MaxWords is the most words (tokens, stopwords included) in a Query
	// or Term.
	MaxWords = 6
	// MaxReasonBytes is the longest Reason, in bytes.
	MaxReasonBytes = 500
	// MaxDepartmentBytes is the longest Department id, in bytes.
	MaxDepartmentBytes = 64
)

// Active reports whether r fires at now: Start <= now < Expiry, a zero
// bound being open.
func (r Rule) Active(now time.Time) bool {
	if !r.Start.IsZero() && now.Before(r.Start) {
		return false
	}
	return r.Expiry.IsZero() || now.Before(r.Expiry)
}

// ContentID returns a stable id derived from every exchanged field of r
// ("r" and 16 hex digits of a SHA-256): the same rule content always gets the
// same id, so re-importing a file is idempotent.
func ContentID(r Rule) string {
	var b strings.Builder
	for _, f := range []string{string(r.Kind), r.Query, r.Term, r.Department,
		formatTime(r.Start), formatTime(r.Expiry), r.Reason, r.Lang} {
		b.WriteString(f)
		b.WriteByte(0)
	}
	sum := sha256.Sum256([]byte(b.String()))
	return "r" + hex.EncodeToString(sum[:8])
}

// formatTime gives the exchange form of t: RFC 3339 in UTC with as many
// fractional digits as needed; "" for the zero time.
func formatTime(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format(time.RFC3339Nano)
}

// Departments tells which department ids exist. Validation accepts any
// department when it is nil.
type Departments interface {
	// Known reports whether id names a department.
	Known(id string) bool
}

// DepartmentSet is a Departments backed by a set of ids. An empty set
// accepts any id.
type DepartmentSet map[string]struct{}

// NewDepartmentSet returns the set of ids.
func NewDepartmentSet(ids ...string) DepartmentSet {
	s := make(DepartmentSet, len(ids))
	for _, id := range ids {
		s[id] = struct{}{}
	}
	return s
}

// Known reports whether id is in the set, or the set is empty.
func (s DepartmentSet) Known(id string) bool {
	if len(s) == 0 {
		return true
	}
	_, ok := s[id]
	return ok
}

// pipelineLang maps a BCP 47 tag to the pipeline's Snowball language name by
// its primary subtag; "" (the pipeline's default) for an empty or unknown
// tag.
func pipelineLang(tag string) string {
	primary, _, _ := strings.Cut(tag, "-")
	switch primary {
	case "en":
		return "english"
	case "fr":
		return "french"
	case "hu":
		return "hungarian"
	case "no", "nb", "nn":
		return "norwegian"
	case "ru":
		return "russian"
	case "es":
		return "spanish"
	case "sv":
		return "swedish"
	}
	return ""
}

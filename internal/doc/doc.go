// Package doc defines the intranet document that flows from ingestion into
// the index. It is pure data: it must not import bleve, gin, database drivers
// or any other Kinword package.
package doc

import (
	"crypto/sha256"
	"encoding/hex"
	"time"
)

// Document is one intranet document with the metadata Kinword keeps for it.
type Document struct {
	// ID is the stable identifier; ingestion derives it from the source path
	// (or takes it from a JSON line) so re-ingesting replaces, not duplicates.
	ID string `json:"id"`
	// Title is the human title; it is indexed together with Body.
	Title string `json:"title"`
	// Body is the plain visible text, paragraphs separated by blank lines.
	Body string `json:"text"`
	// URL is where a searcher opens the document on the intranet.
	URL string `json:"url,omitempty"`
	// Department owns the document (a slug such as "field-operations").
	Department string `json:"department,omitempty"`
	// Groups lists the access groups that may read the document. Empty
	// means open to everyone in the organisation.
	Groups []string `json:"groups,omitempty"`
	// Language is a Snowball language name ("english", "french", ...);
	// empty means the configured default.
	Language string `json:"language,omitempty"`
	// Modified is the last modification time of the source.
	Modified time.Time `json:"modified,omitempty"`
	// Source is the path (or path#line) the document was read from.
	Source string `json:"source,omitempty"`
	// Hash is the hex SHA-256 of the source bytes, used to skip unchanged
	// files on re-ingest.
	Hash string `json:"hash,omitempty"`
}

// Open reports whether the document is readable by everyone.
func (d *Document) Open() bool { return len(d.Groups) == 0 }

// HashBytes returns the hex SHA-256 of b, the form used in Document.Hash.
func HashBytes(b []byte) string {
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:])
}

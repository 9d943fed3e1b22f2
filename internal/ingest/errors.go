// Package ingest turns files and folders into doc.Document values: it walks
// roots in a deterministic order, parses plain text, Markdown, HTML, JSON
// Lines, DOCX and PDF, applies metadata (front matter, sidecar files and
// folder defaults) and keeps an index in step through Sync and the
// consumer-declared Sink interface.
//
// It is ingestion logic only: it must not import bleve, gin, database
// drivers or any Kinword package other than internal/doc.
package ingest

import (
	"errors"
	"fmt"
)

// Sentinel reasons a file (or a JSON line) is skipped. Skip.Reason wraps
// exactly one of them; branch with errors.Is.
var (
	// ErrBinary: a text format holds NUL bytes or many control characters.
	ErrBinary = errors.New("ingest: binary content")
	// ErrInvalidUTF8: a text format is not valid UTF-8.
	ErrInvalidUTF8 = errors.New("ingest: invalid UTF-8")
	// ErrTooLarge: the file (or a JSON line) exceeds Options.MaxBytes.
	ErrTooLarge = errors.New("ingest: too large")
	// ErrCorrupt: a DOCX, PDF or HTML file cannot be decoded.
	ErrCorrupt = errors.New("ingest: corrupt")
	// ErrMalformedLine: a JSON line is not an object with a string id and text.
	ErrMalformedLine = errors.New("ingest: malformed line")
	// ErrUnsupported: the file extension has no parser.
	ErrUnsupported = errors.New("ingest: unsupported file type")
	// ErrEmpty: the file parsed but holds no text.
	ErrEmpty = errors.New("ingest: no text")
	// ErrNoExtractor: a PDF could be read neither by pdftotext (missing) nor
	// by the built-in reader.
	ErrNoExtractor = errors.New("ingest: no PDF extractor")
	// ErrBadMeta: front matter, a sidecar file or folder defaults cannot be
	// parsed. The document is skipped rather than indexed with the wrong
	// access groups.
	ErrBadMeta = errors.New("ingest: bad metadata")
	// ErrUnreadable: the file could not be read (permissions, I/O error).
	ErrUnreadable = errors.New("ingest: unreadable")
	// ErrDuplicateID: an earlier file or line in walk order already
	// produced a document with the same ID; the first one wins.
	ErrDuplicateID = errors.New("ingest: duplicate id")
)

// reasons lists the sentinels in the order Summary.Line reports them, with
// their short labels.
var reasons = []struct {
	err   error
	label string
}{
	{ErrBinary, "binary"},
	{ErrInvalidUTF8, "invalid UTF-8"},
	{ErrTooLarge, "too large"},
	{ErrCorrupt, "corrupt"},
	{ErrMalformedLine, "malformed line"},
	{ErrUnsupported, "unsupported"},
	{ErrEmpty, "empty"},
	{ErrNoExtractor, "no extractor"},
	{ErrBadMeta, "bad metadata"},
	{ErrUnreadable, "unreadable"},
	{ErrDuplicateID, "duplicate id"},
}

// Skip records a file or JSON line that produced no document.
type Skip struct {
	// Path is the file as walked (root joined with the relative path); for
	// a JSON line it is "path#L<n>" with n counted from 1.
	Path string
	// Reason wraps one of the package's sentinel errors plus detail.
	Reason error
}

// Error implements error as "path: reason".
func (s Skip) Error() string { return s.Path + ": " + s.Reason.Error() }

// Unwrap returns Reason, so errors.Is(skip, ErrBinary) works.
func (s Skip) Unwrap() error { return s.Reason }

// Kind returns the sentinel that Reason wraps, or nil for a foreign error.
func (s Skip) Kind() error { return KindOf(s.Reason) }

// KindOf returns the package sentinel wrapped by err, or nil if none is.
func KindOf(err error) error {
	for _, r := range reasons {
		if errors.Is(err, r.err) {
			return r.err
		}
	}
	return nil
}

// Label returns the short label Summary.Line uses for a sentinel
// ("binary", "invalid UTF-8", ...), or "other".
func Label(kind error) string {
	for _, r := range reasons {
		if r.err == kind {
			return r.label
		}
	}
	return "other"
}

// reason builds a Skip reason wrapping kind with a formatted detail.
func reason(kind error, format string, args ...any) error {
	if format == "" {
		return kind
	}
	return fmt.Errorf("%w: %s", kind, fmt.Sprintf(format, args...))
}

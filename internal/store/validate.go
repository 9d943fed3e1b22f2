package store

import (
	"fmt"
	"strings"
	"time"
	"unicode/utf8"
)

// Limits on what one event may carry.
const (
	MaxFieldBytes = 512  // longest accepted string field or term key, in bytes
	MaxTerms      = 256  // most terms in one event's Terms
	MaxBatch      = 1000 // most events in one Append batch
)

var validKinds = map[string]bool{
	KindImpression: true, KindAccept: true, KindDismiss: true, KindClick: true, KindMarkUseful: true,
}

// validateBatch checks what can be checked without the database. The
// error wraps ErrInvalid and names the first bad event's index.
func validateBatch(batch []Event) error {
	if len(batch) > MaxBatch {
		return fmt.Errorf("%w: batch of %d events, at most %d", ErrInvalid, len(batch), MaxBatch)
	}
	for i := range batch {
		if err := validateEvent(&batch[i]); err != nil {
			return fmt.Errorf("%w: event %d: %s", ErrInvalid, i, err)
		}
	}
	return nil
}

// validateEvent returns a plain description of the first problem, or nil.
func validateEvent(e *Event) error {
	fields := []struct {
		name, v  string
		required bool
	}{
		{"id", e.ID, true},
		{"impression", e.Impression, true},
		{"kind", e.Kind, true},
		{"session", e.Session, false},
		{"department", e.Department, false},
		{"groups hash", e.GroupsHash, false},
		{"query", e.Query, false},
		{"term", e.Term, e.Kind == KindAccept || e.Kind == KindDismiss},
		{"doc", e.Doc, e.Kind == KindClick || e.Kind == KindMarkUseful},
	}
	for _, f := range fields {
		if err := checkString(f.name, f.v, f.required); err != nil {
			return err
		}
	}
	if !validKinds[e.Kind] {
		return fmt.Errorf("unknown kind %q", e.Kind)
	}
	if e.Time.IsZero() {
		return fmt.Errorf("missing time")
	}
	// Stored as Unix nanoseconds: the time must survive the round trip
	// (years 1678-2262).
	if !time.Unix(0, e.Time.UnixNano()).Equal(e.Time) {
		return fmt.Errorf("time %s out of range", e.Time.Format(time.RFC3339))
	}
	if e.Position < 0 {
		return fmt.Errorf("negative position %d", e.Position)
	}
	if e.Rank < 0 {
		return fmt.Errorf("negative rank %d", e.Rank)
	}
	if len(e.Terms) > MaxTerms {
		return fmt.Errorf("%d terms, at most %d", len(e.Terms), MaxTerms)
	}
	if e.Kind == KindImpression && e.Term != "" {
		return fmt.Errorf("impression carries a single term; list shown terms in Terms")
	}
	if e.Kind == KindImpression || e.Kind == KindClick {
		for j, t := range e.Terms {
			if err := checkString(fmt.Sprintf("terms[%d]", j), t, true); err != nil {
				return err
			}
		}
	} else if len(e.Terms) > 0 {
		return fmt.Errorf("terms given for kind %q", e.Kind)
	}
	if len(e.Sources) > 0 {
		if e.Kind != KindImpression || len(e.Sources) != len(e.Terms) {
			return fmt.Errorf("sources: %d given, want none or one per shown term of an impression", len(e.Sources))
		}
		for j, s := range e.Sources {
			if err := checkString(fmt.Sprintf("sources[%d]", j), s, false); err != nil {
				return err
			}
		}
	}
	return nil
}

func checkString(name, v string, required bool) error {
	switch {
	case required && v == "":
		return fmt.Errorf("missing %s", name)
	case len(v) > MaxFieldBytes:
		return fmt.Errorf("%s is %d bytes, at most %d", name, len(v), MaxFieldBytes)
	case !utf8.ValidString(v):
		return fmt.Errorf("%s is not valid UTF-8", name)
	case strings.IndexByte(v, 0) >= 0:
		// PostgreSQL text cannot hold NUL; reject it on both backends.
		return fmt.Errorf("%s contains a NUL byte", name)
	}
	return nil
}

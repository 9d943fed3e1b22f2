package curate

import (
	"errors"
	"fmt"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"kinword/internal/text"
)

// Sentinel errors callers branch on (with errors.Is).
var (
	// ErrInvalid marks a rule that is malformed on its own, or a duplicate.
	ErrInvalid = errors.New("invalid rule")
	// ErrContradiction marks rules that cannot hold together: a pin and a
	// block of the same term in the same scope, or a cycle of use rules.
	ErrContradiction = errors.New("contradicting rules")
	// ErrImport marks an import that was rejected as a whole.
	ErrImport = errors.New("import rejected")
)

// Problem is one thing wrong with a rule. It is an error that wraps Err
// (ErrInvalid or ErrContradiction).
type Problem struct {
	// Index is the rule's position in the validated slice; -1 from Validate.
	Index int
	// ID is the rule's ID ("" when it has none).
	ID string
	// Field is the rule field at fault ("kind", "query", "term",
	// "department", "start", "expiry", "reason", "lang"), or "rule" for
	// problems of the rule as a whole.
	Field string
	// Message says what is wrong, in plain words.
	Message string
	// Err is the sentinel: ErrInvalid or ErrContradiction.
	Err error
}

// Error reads "curate: invalid rule: rule r12: term: empty".
func (p Problem) Error() string {
	who := "rule"
	switch {
	case p.ID != "":
		who = "rule " + p.ID
	case p.Index >= 0:
		who = fmt.Sprintf("rule #%d", p.Index)
	}
	return fmt.Sprintf("curate: %v: %s: %s: %s", p.Err, who, p.Field, p.Message)
}

// Unwrap returns the sentinel.
func (p Problem) Unwrap() error { return p.Err }

// Validate checks r on its own, without the text pipeline: kind, required
// and over-long fields, control characters and invalid UTF-8, a query or
// term without words, a term equal to its query (after case folding), the
// department against known (nil accepts any), the language tag and the dates.
// It returns every problem found, joined, or nil. ValidateSet adds the checks
// that need stems (all-stopword terms, query and term with the same stem key)
// and those between rules; call it before storing rules.
func (r Rule) Validate(known Departments) error {
	ps := r.problems(-1, known)
	if len(ps) == 0 {
		return nil
	}
	errs := make([]error, len(ps))
	for i, p := range ps {
		errs[i] = p
	}
	return errors.Join(errs...)
}

// problems lists the field problems of r, the rule at index i.
func (r Rule) problems(i int, known Departments) []Problem {
	var out []Problem
	add := func(field, msg string) {
		out = append(out, Problem{Index: i, ID: r.ID, Field: field, Message: msg, Err: ErrInvalid})
	}
	if !r.Kind.Valid() {
		add("kind", fmt.Sprintf("unknown kind %q (want one of %v)", clip(string(r.Kind)), Kinds))
	}
	if msg := checkText(r.Term); r.Term == "" {
		add("term", "empty")
	} else if msg != "" {
		add("term", msg)
	}
	switch msg := checkText(r.Query); {
	case r.Query == "" && r.Kind.NeedsQuery():
		add("query", fmt.Sprintf("empty, but a %s rule needs one", r.Kind))
	case r.Query != "" && msg != "":
		add("query", msg)
	case r.Query != "" && text.Fold(r.Query) == text.Fold(r.Term):
		add("term", "same as the query")
	}
	if r.Department != "" {
		if msg := checkPlain(r.Department, MaxDepartmentBytes); msg != "" {
			add("department", msg)
		} else if known != nil && !known.Known(r.Department) {
			add("department", fmt.Sprintf("unknown department %q", r.Department))
		}
	}
	if msg := checkPlain(r.Reason, MaxReasonBytes); msg != "" {
		add("reason", msg)
	}
	if r.Lang != "" && !validLangTag(r.Lang) {
		add("lang", fmt.Sprintf("%q is not a lower-case BCP 47 tag such as en or fr-be", clip(r.Lang)))
	}
	for _, f := range []struct {
		name string
		t    time.Time
	}{{"start", r.Start}, {"expiry", r.Expiry}} {
		if y := f.t.UTC().Year(); !f.t.IsZero() && (y < 1 || y > 9999) {
			add(f.name, fmt.Sprintf("year %d outside 0001-9999 (RFC 3339 has four-digit years)", y))
		}
	}
	if !r.Start.IsZero() && !r.Expiry.IsZero() && !r.Expiry.After(r.Start) {
		add("expiry", fmt.Sprintf("%s is not after start %s", formatTime(r.Expiry), formatTime(r.Start)))
	}
	return out
}

// checkText checks a query or term: plain text within MaxTextBytes and
// MaxWords, with at least one word. It returns "" when s is fine.
func checkText(s string) string {
	if msg := checkPlain(s, MaxTextBytes); msg != "" {
		return msg
	}
	switch n := len(text.Words(s)); {
	case n == 0:
		return "has no words"
	case n > MaxWords:
		return fmt.Sprintf("has %d words, more than %d", n, MaxWords)
	}
	return ""
}

// checkPlain checks text common to all fields: valid UTF-8, no control
// characters, no surrounding space, no leading '=', '+', '-' or '@' (which
// spreadsheets run as formulas when the CSV is opened: common practice, the
// OWASP advice on CSV injection), at most max bytes.
func checkPlain(s string, max int) string {
	switch {
	case s == "":
		return ""
	case !utf8.ValidString(s):
		return "not valid UTF-8"
	case len(s) > max:
		return fmt.Sprintf("%d bytes, more than %d", len(s), max)
	case strings.IndexFunc(s, unicode.IsControl) >= 0:
		return "contains a control character"
	case strings.TrimSpace(s) != s:
		return "has leading or trailing space"
	case strings.ContainsRune("=+-@", rune(s[0])):
		return fmt.Sprintf("starts with %q (spreadsheets read it as a formula)", s[0])
	}
	return ""
}

// validLangTag reports whether tag is a lower-case language tag in the
// N-Triples LANGTAG shape: letters, then '-'-separated letters or digits
// (W3C RDF 1.1 N-Triples, 2014, grammar rule 144s), each subtag 1-8 long as
// BCP 47 (RFC 5646, 2009, section 2.1) allows.
func validLangTag(tag string) bool {
	for i, sub := range strings.Split(tag, "-") {
		if len(sub) == 0 || len(sub) > 8 {
			return false
		}
		for j := 0; j < len(sub); j++ {
			c := sub[j]
			if !(c >= 'a' && c <= 'z') && !(i > 0 && c >= '0' && c <= '9') {
				return false
			}
		}
	}
	return true
}

// clip shortens s for an error message.
func clip(s string) string {
	if len(s) <= 40 {
		return s
	}
	i := 40
	for i > 0 && !utf8.RuneStart(s[i]) {
		i--
	}
	return s[:i] + "…"
}

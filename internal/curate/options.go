package curate

import (
	"cmp"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"

	"kinword/internal/text"
)

// Defaults of Options.
const (
	// DefaultBase prefixes minted concept IRIs.
	DefaultBase = "urn:kinword:concept:"
	// DefaultScheme is the IRI of the exported skos:ConceptScheme.
	DefaultScheme = "urn:kinword:scheme"
	// DefaultLang tags labels of rules with no Lang.
	DefaultLang = "en"
	// DefaultMaxBytes is the largest input an import reads.
	DefaultMaxBytes = 8 << 20
)

// Options configure imports and exports. The zero value is ready to use.
type Options struct {
	// Pipeline analyses terms for validation; nil means an English pipeline.
	Pipeline *text.Pipeline
	// Departments are the known department ids that imported and exported
	// rules are checked against; nil accepts any.
	Departments Departments
	// Base is the absolute IRI that prefixes minted concept IRIs (SKOS
	// export only); "" means DefaultBase.
	Base string
	// Scheme is the IRI of the exported concept scheme (SKOS export only);
	// "" means DefaultScheme.
	Scheme string
	// Lang is the language tag given to labels of rules with an empty Lang
	// on SKOS export, and to untagged labels on SKOS import; "" means
	// DefaultLang.
	Lang string
	// MaxBytes is the largest input an import reads, in bytes; 0 means
	// DefaultMaxBytes.
	MaxBytes int64
}

// resolved fills in defaults and checks the options.
func (o Options) resolved() (Options, error) {
	if o.Pipeline == nil {
		o.Pipeline = defaultPipeline()
	}
	o.Base = cmp.Or(o.Base, DefaultBase)
	o.Scheme = cmp.Or(o.Scheme, DefaultScheme)
	o.Lang = cmp.Or(o.Lang, DefaultLang)
	if o.MaxBytes <= 0 {
		o.MaxBytes = DefaultMaxBytes
	}
	for _, iri := range []string{o.Base, o.Scheme} {
		if !absoluteIRI(iri) {
			return o, fmt.Errorf("curate: options: %q is not an absolute IRI", clip(iri))
		}
	}
	if !validLangTag(o.Lang) {
		return o, fmt.Errorf("curate: options: lang %q is not a lower-case BCP 47 tag", clip(o.Lang))
	}
	return o, nil
}

// Report tells what an import did with its input.
type Report struct {
	// Format is "csv", "n-triples" or "json-ld".
	Format string
	// Rules is the number of rules imported; 0 when the import was rejected.
	Rules int
	// Rejected lists every rejected line, triple or node, in input order.
	// Any entry rejects the whole import.
	Rejected []Rejection
	// Ignored counts, per predicate IRI, triples that map to no rule
	// (rdf:type, skos:inScheme, skos:definition ...); nil for CSV.
	Ignored map[string]int
}

// Rejection is one rejected part of an import.
type Rejection struct {
	// Line is the 1-based input line; 0 for JSON-LD, which has none.
	Line int
	// Item is what was rejected: a CSV field name, an N-Triples triple, or
	// a node IRI.
	Item string
	// Reason says why.
	Reason string
}

// reject records a rejection.
func (r *Report) reject(line int, item, reason string) {
	r.Rejected = append(r.Rejected, Rejection{Line: line, Item: item, Reason: reason})
}

// result returns rules, or the import error when anything was rejected.
func (r *Report) result(rules []Rule) ([]Rule, *Report, error) {
	if len(r.Rejected) == 0 {
		r.Rules = len(rules)
		return rules, r, nil
	}
	slices.SortStableFunc(r.Rejected, func(a, b Rejection) int {
		return cmp.Or(cmp.Compare(a.Line, b.Line), strings.Compare(a.Item, b.Item), strings.Compare(a.Reason, b.Reason))
	})
	first := r.Rejected[0]
	where := first.Item
	if first.Line > 0 {
		where = fmt.Sprintf("line %d", first.Line)
	}
	r.Rules = 0
	return nil, r, fmt.Errorf("curate: import %s: %d rejected, first %s: %s: %w",
		r.Format, len(r.Rejected), clip(where), first.Reason, ErrImport)
}

// readLimited reads all of in, up to max bytes; more is an ErrImport.
// startImport resolves opts and reads the whole input for an import of
// format, within opts.MaxBytes: the start every importer shares.
func startImport(in io.Reader, opts Options, format string) (Options, *Report, []byte, error) {
	rep := &Report{Format: format}
	o, err := opts.resolved()
	if err != nil {
		return o, rep, nil, err
	}
	b, err := readLimited(in, o.MaxBytes, rep)
	return o, rep, b, err
}

func readLimited(in io.Reader, max int64, rep *Report) ([]byte, error) {
	b, err := io.ReadAll(io.LimitReader(in, max+1))
	if err != nil {
		return nil, fmt.Errorf("curate: import %s: read: %w", rep.Format, err)
	}
	if int64(len(b)) > max {
		rep.reject(0, "input", fmt.Sprintf("larger than %d bytes", max))
		_, _, err := rep.result(nil)
		return nil, err
	}
	return b, nil
}

// problemsError joins validation problems into one error for an export.
func problemsError(format string, ps []Problem) error {
	errs := make([]error, len(ps))
	for i, p := range ps {
		errs[i] = p
	}
	return fmt.Errorf("curate: export %s: %w", format, errors.Join(errs...))
}

// sortRules orders rules for export: by kind (in Kinds order), department,
// query, term, start, expiry, lang, reason.
func sortRules(rules []Rule) {
	rank := func(k Kind) int { return slices.Index(Kinds, k) }
	slices.SortStableFunc(rules, func(a, b Rule) int {
		return cmp.Or(cmp.Compare(rank(a.Kind), rank(b.Kind)),
			strings.Compare(a.Department, b.Department),
			strings.Compare(a.Query, b.Query),
			strings.Compare(a.Term, b.Term),
			a.Start.Compare(b.Start),
			a.Expiry.Compare(b.Expiry),
			strings.Compare(a.Lang, b.Lang),
			strings.Compare(a.Reason, b.Reason))
	})
}

// finishImport gives imported rules their ContentID, validates them as a
// set (rejecting each problem at the rule's source), sorts them when sorted
// is set, and returns the import's result.
func finishImport(src []sourced, o Options, rep *Report, sorted bool) ([]Rule, *Report, error) {
	rules := make([]Rule, len(src))
	for i := range src {
		src[i].ID = ContentID(src[i].Rule)
		rules[i] = src[i].Rule
	}
	for _, p := range ValidateSet(rules, o.Departments, o.Pipeline) {
		s := src[p.Index]
		if s.item == "" { // CSV: the field is the item
			rep.reject(s.line, p.Field, fmt.Sprintf("%s (%v)", p.Message, p.Err))
		} else {
			rep.reject(s.line, s.item, fmt.Sprintf("%s: %s (%v)", p.Field, p.Message, p.Err))
		}
	}
	if sorted {
		sortRules(rules)
	}
	return rep.result(rules)
}

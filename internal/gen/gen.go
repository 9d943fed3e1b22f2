// Package gen generates a deterministic synthetic intranet corpus for
// performance work: pseudo-word documents with Zipf-distributed vocabulary,
// department topical skew, recurring department phrases, access groups and
// optional canary terms for access-control tests. The same Options always
// give byte-identical output.
//
// It is pure logic plus writing to an io.Writer: it must not import bleve,
// gin, database drivers or any Kinword package other than internal/doc.
package gen

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"slices"
)

// ErrBadOptions is returned (wrapped) by New, Generate and WriteJSONL when
// Options hold a value that cannot be used.
var ErrBadOptions = errors.New("gen: bad options")

// ErrUnknownDepartment is returned (wrapped) by the Generator accessors for
// a department that is not in Options.Departments.
var ErrUnknownDepartment = errors.New("gen: unknown department")

// DefaultDepartments are the department slugs of the demo organisation,
// Tarnwick Water & Power, used when Options.Departments is empty.
var DefaultDepartments = []string{
	"field-operations", "asset-engineering", "people-culture", "finance-procurement",
	"it-service-desk", "legal-compliance", "health-safety-environment", "customer-care",
}

// DefaultGroups are the restricted access groups used when Options.Groups
// is empty.
var DefaultGroups = []string{"people-confidential", "legal-privileged", "executive", "it-security"}

// Limits and defaults of Options.
const (
	DefaultDocs            = 1000
	DefaultSeed            = 1
	DefaultMeanWords       = 200
	DefaultVocabSize       = 50000
	DefaultZipfS           = 1.07
	DefaultRestrictedShare = 0.1
	// MinMeanWords is the smallest accepted MeanWords (the length clamp's
	// lower bound).
	MinMeanWords = 30
	// MinVocabSize is the smallest accepted VocabSize.
	MinVocabSize = 1000
	// CanaryShare is the probability that a restricted document of a group
	// with a canary term carries that term.
	CanaryShare = 0.5
)

// Options configure the corpus. The zero value is the default corpus:
// 1000 documents, seed 1, about 200 words each.
type Options struct {
	// Docs is the number of documents (count). Zero means DefaultDocs (1000).
	Docs int
	// Seed selects the corpus (vocabulary and documents); equal seeds give
	// identical output. Zero means DefaultSeed (1).
	Seed uint64
	// MeanWords is the mean body length in words. Lengths are lognormal
	// around it, clamped to [30, 6*MeanWords]. Zero means 200; values below
	// MinMeanWords (30) are rejected.
	MeanWords int
	// VocabSize is the number of distinct words (count), function words
	// included. Zero means 50000; values below MinVocabSize (1000) are
	// rejected.
	VocabSize int
	// ZipfS is the Zipf exponent s: the word of rank r is drawn with
	// probability proportional to r^-s (dimensionless). Zero means 1.07;
	// it must lie in (0, 4].
	ZipfS float64
	// Departments are the owning department slugs; documents are spread
	// uniformly over them. Empty means DefaultDepartments (eight slugs).
	Departments []string
	// RestrictedShare is the fraction (0..1) of documents restricted to one
	// of Groups; the rest are open. Zero means 0.1; negative means none.
	RestrictedShare float64
	// Groups are the restricted access groups. Empty means DefaultGroups.
	Groups []string
	// CanaryTerms maps a group (which must be in Groups) to a canary term:
	// a single lowercase token of a-z and 0-9 that the vocabulary never
	// produces. Each restricted document of that group carries the term
	// once with probability CanaryShare (0.5); no other document carries
	// it. Nil means no canaries.
	CanaryTerms map[string]string
}

// resolve fills defaults and validates.
func (o Options) resolve() (Options, error) {
	if o.Docs == 0 {
		o.Docs = DefaultDocs
	}
	if o.Seed == 0 {
		o.Seed = DefaultSeed
	}
	if o.MeanWords == 0 {
		o.MeanWords = DefaultMeanWords
	}
	if o.VocabSize == 0 {
		o.VocabSize = DefaultVocabSize
	}
	if o.ZipfS == 0 {
		o.ZipfS = DefaultZipfS
	}
	if len(o.Departments) == 0 {
		o.Departments = DefaultDepartments
	}
	if o.RestrictedShare == 0 {
		o.RestrictedShare = DefaultRestrictedShare
	} else if o.RestrictedShare < 0 {
		o.RestrictedShare = 0
	}
	if len(o.Groups) == 0 {
		o.Groups = DefaultGroups
	}
	o.Departments = slices.Clone(o.Departments)
	o.Groups = slices.Clone(o.Groups)
	o.CanaryTerms = maps.Clone(o.CanaryTerms)
	switch {
	case o.Docs < 0:
		return o, fmt.Errorf("%w: Docs %d is negative", ErrBadOptions, o.Docs)
	case o.MeanWords < MinMeanWords:
		return o, fmt.Errorf("%w: MeanWords %d is below %d", ErrBadOptions, o.MeanWords, MinMeanWords)
	case o.VocabSize < MinVocabSize:
		return o, fmt.Errorf("%w: VocabSize %d is below %d", ErrBadOptions, o.VocabSize, MinVocabSize)
	case !(o.ZipfS > 0 && o.ZipfS <= 4):
		return o, fmt.Errorf("%w: ZipfS %v is outside (0, 4]", ErrBadOptions, o.ZipfS)
	case math.IsNaN(o.RestrictedShare) || o.RestrictedShare > 1:
		return o, fmt.Errorf("%w: RestrictedShare %v is outside [0, 1]", ErrBadOptions, o.RestrictedShare)
	}
	if err := checkNames("department", o.Departments); err != nil {
		return o, err
	}
	if err := checkNames("group", o.Groups); err != nil {
		return o, err
	}
	return o, checkCanaries(o.CanaryTerms, o.Groups)
}

func checkNames(kind string, names []string) error {
	seen := make(map[string]bool, len(names))
	for _, n := range names {
		if n == "" {
			return fmt.Errorf("%w: empty %s name", ErrBadOptions, kind)
		}
		if seen[n] {
			return fmt.Errorf("%w: duplicate %s %q", ErrBadOptions, kind, n)
		}
		seen[n] = true
	}
	return nil
}

func checkCanaries(terms map[string]string, groups []string) error {
	used := make(map[string]string, len(terms))
	for _, g := range sortedKeys(terms) {
		t := terms[g]
		if !slices.Contains(groups, g) {
			return fmt.Errorf("%w: canary group %q is not in Groups", ErrBadOptions, g)
		}
		if !isToken(t) {
			return fmt.Errorf("%w: canary term %q for %q is not a lowercase a-z0-9 token", ErrBadOptions, t, g)
		}
		if isFunctionWord(t) {
			return fmt.Errorf("%w: canary term %q is a function word", ErrBadOptions, t)
		}
		if other, dup := used[t]; dup {
			return fmt.Errorf("%w: canary term %q used by groups %q and %q", ErrBadOptions, t, other, g)
		}
		used[t] = g
	}
	return nil
}

func isToken(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if (c < 'a' || c > 'z') && (c < '0' || c > '9') {
			return false
		}
	}
	return true
}

func sortedKeys(m map[string]string) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

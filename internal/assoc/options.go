package assoc

import (
	"os"
	"runtime"
)

// Defaults used when an Options field is zero.
const (
	DefaultWindow         = 8
	DefaultPassageLen     = 50
	DefaultMinDF          = 3
	DefaultMinPhraseCount = 5
	// DefaultMinPhraseLLR is the chi-square critical value for p = 0.001 with
	// one degree of freedom, the usual cut-off for G2 (common practice).
	DefaultMinPhraseLLR   = 10.83
	DefaultMinSupportDocs = 3
	DefaultTopK           = 50
	DefaultMemoryBudget   = 1 << 30
)

// Options tunes Mine. Every zero value means the documented default.
type Options struct {
	// Window is the half-width of the co-occurrence window in tokens: two
	// tokens at most Window positions apart in the same passage co-occur.
	// Default 8.
	Window int
	// PassageLen is the target passage length in tokens. Paragraphs (split
	// at DocTerms.Breaks) longer than this are cut into ceil(len/PassageLen)
	// spans of near-equal length. Passages are the units of the 2x2 tables.
	// Default 50.
	PassageLen int
	// MinDF is the minimum number of documents a term (or phrase) must occur
	// in, within a scope, to be counted there. Default 3.
	MinDF int
	// MinPhraseCount is the minimum number of adjacent occurrences for a
	// bigram or trigram to be kept as a phrase. Default 5; a negative value
	// disables phrase detection.
	MinPhraseCount int
	// MinPhraseLLR is the minimum signed G2 (Dunning 1993) of a phrase's
	// adjacency table. Default 10.83 (chi-square, p = 0.001, 1 df); a
	// negative value lets every frequent enough bigram through.
	MinPhraseLLR float64
	// MinSupportDocs is the minimum number of distinct documents in which a
	// pair must co-occur (in some passage) to be kept. Default 3.
	MinSupportDocs int
	// TopK is the number of neighbours kept per term and scope, chosen by
	// Measure. Default 50.
	TopK int
	// Measure selects the ranking used to choose the TopK neighbours.
	// Default (zero) MeasureLLR.
	Measure Measure
	// MemoryBudget bounds, in bytes, the pair- and phrase-count tables,
	// including the open documents' runs held for the group scopes; when
	// they outgrow it, sorted runs spill to files under TempDir. While a
	// group scope is counted, the neighbour lists kept so far and the
	// candidate heaps of its ranking (estimated from the open scope) are
	// charged against it too, but the group's counters always keep at
	// least an eighth of it. The corpus's own dictionaries are not
	// included. Default 1 GiB.
	MemoryBudget int64
	// TempDir is the folder for spill files (a private subfolder is made and
	// removed). Default os.TempDir().
	TempDir string
	// Workers is the number of goroutines counting pairs. Default
	// runtime.GOMAXPROCS(0). The result does not depend on it.
	Workers int
	// Progress, if set, is called from Mine's goroutine with the phase name
	// ("scan", "bigrams", "trigrams", "vocab", "pairs", "rank"), the units
	// done and the total for that phase (document visits: the open
	// documents once plus each group's own documents; scopes for "rank").
	// A phase may start with done = 0.
	Progress func(phase string, done, total int)
}

// Params are the build parameters that shape a table; they are stored in
// the artifact. Options that only affect resources (MemoryBudget, TempDir,
// Workers, Progress) are not part of it.
type Params struct {
	Window         int
	PassageLen     int
	MinDF          int
	MinPhraseCount int // negative: phrases disabled
	MinPhraseLLR   float64
	MinSupportDocs int
	TopK           int
	Measure        Measure
}

// resolved returns opts with every zero field replaced by its default.
func (o Options) resolved() Options {
	if o.Window <= 0 {
		o.Window = DefaultWindow
	}
	if o.PassageLen <= 0 {
		o.PassageLen = DefaultPassageLen
	}
	if o.MinDF <= 0 {
		o.MinDF = DefaultMinDF
	}
	if o.MinPhraseCount == 0 {
		o.MinPhraseCount = DefaultMinPhraseCount
	}
	if o.MinPhraseLLR == 0 {
		o.MinPhraseLLR = DefaultMinPhraseLLR
	}
	if o.MinSupportDocs <= 0 {
		o.MinSupportDocs = DefaultMinSupportDocs
	}
	if o.TopK <= 0 {
		o.TopK = DefaultTopK
	}
	if o.Measure >= numMeasures {
		o.Measure = MeasureLLR
	}
	if o.MemoryBudget <= 0 {
		o.MemoryBudget = DefaultMemoryBudget
	}
	if o.TempDir == "" {
		o.TempDir = os.TempDir()
	}
	if o.Workers <= 0 {
		o.Workers = runtime.GOMAXPROCS(0)
	}
	return o
}

func (o Options) params() Params {
	return Params{
		Window: o.Window, PassageLen: o.PassageLen, MinDF: o.MinDF,
		MinPhraseCount: o.MinPhraseCount, MinPhraseLLR: o.MinPhraseLLR,
		MinSupportDocs: o.MinSupportDocs, TopK: o.TopK, Measure: o.Measure,
	}
}

// progress reports at most ~200 times per phase plus the final count.
type progress struct {
	fn    func(string, int, int)
	phase string
	total int
	done  int
	step  int
}

func newProgress(fn func(string, int, int), phase string, total int) *progress {
	p := &progress{fn: fn, phase: phase, total: total, step: max(1, total/200)}
	if fn != nil {
		fn(phase, 0, total)
	}
	return p
}

func (p *progress) add(n int) {
	p.done += n
	if p.fn != nil && (p.done%p.step == 0 || p.done == p.total) {
		p.fn(p.phase, p.done, p.total)
	}
}

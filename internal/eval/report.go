package eval

import (
	"encoding/json"
	"fmt"
	"io"
	"slices"
)

// Report collects the evaluation of several methods on one collection.
// Runs keep the order they were added in; render them with WriteTable,
// WriteMarkdown, WriteTopicTable or WriteJSON.
type Report struct {
	// Collection names the test collection, e.g. "cranfield".
	Collection string `json:"collection"`
	// Runs holds one entry per method, in insertion order.
	Runs []Run `json:"runs"`
}

// Run is one method's result: the mean measures (inlined in JSON) over the
// counted topics, the per-topic measures, and, once CompareAgainst has
// run, its comparison with a baseline.
type Run struct {
	// Method names the retrieval method, e.g. "bm25" or "bm25+rm3".
	Method string `json:"method"`
	// Topics is the number of topics averaged (those with a relevant
	// judgment).
	Topics int `json:"topics"`
	// Measures are the means over the counted topics.
	Measures
	// Comparison is nil until CompareAgainst fills it; its fields then
	// appear inline in JSON. Check for nil before reading them.
	*Comparison
	// PerTopic holds the counted topics' measures in qid order.
	PerTopic []TopicResult `json:"per_topic"`
}

// TopicResult is one topic's measures; its NumRel is the topic's number of
// relevant documents.
type TopicResult struct {
	// QID is the topic id.
	QID string `json:"qid"`
	Measures
}

// Comparison is a run's topic-by-topic comparison with a baseline run on
// average precision.
type Comparison struct {
	// Baseline is the method compared against.
	Baseline string `json:"baseline"`
	// Helped counts topics whose AP rose by more than the threshold.
	Helped int `json:"helped"`
	// Hurt counts topics whose AP fell by more than the threshold.
	Hurt int `json:"hurt"`
	// Robustness is the robustness index (Helped - Hurt) / topics.
	Robustness float64 `json:"robustness"`
	// PValue is the two-sided paired randomization test p-value on MAP.
	PValue float64 `json:"p_value"`
}

// CompareOptions tunes Report.CompareAgainst.
type CompareOptions struct {
	// Threshold is the AP difference a topic must exceed to count as helped
	// or hurt; zero means DefaultThreshold (1e-9).
	Threshold float64
	// Trials is the number of randomization-test trials; zero means
	// DefaultTrials (100000).
	Trials int
	// Seed seeds the randomization test; zero is a valid fixed seed.
	Seed uint64
}

// NewRun builds a Run from per-topic measures (as from EvaluateRun):
// topics with NumRel 0 are dropped, the rest are sorted by qid and
// averaged with Mean.
func NewRun(method string, perTopic map[string]Measures) Run {
	run := Run{Method: method, PerTopic: []TopicResult{}}
	for qid, m := range perTopic {
		if m.NumRel > 0 {
			run.PerTopic = append(run.PerTopic, TopicResult{QID: qid, Measures: m})
		}
	}
	slices.SortFunc(run.PerTopic, func(a, b TopicResult) int { return compareQID(a.QID, b.QID) })
	// Summing in qid order keeps the mean's last bits, and so the JSON,
	// independent of map iteration order.
	ms := make([]Measures, len(run.PerTopic))
	for i, t := range run.PerTopic {
		ms[i] = t.Measures
	}
	run.Topics = len(run.PerTopic)
	run.Measures = Mean(ms)
	return run
}

// Add appends run; a method already in the report is an error matching
// ErrInvalid.
func (r *Report) Add(run Run) error {
	if r.Find(run.Method) != nil {
		return fmt.Errorf("%w: method %q already in report", ErrInvalid, run.Method)
	}
	r.Runs = append(r.Runs, run)
	return nil
}

// Find returns the run of method, or nil.
func (r *Report) Find(method string) *Run {
	for i := range r.Runs {
		if r.Runs[i].Method == method {
			return &r.Runs[i]
		}
	}
	return nil
}

// CompareAgainst fills the Comparison of every run except the baseline,
// pairing per-topic AP by qid over the topics of either run (a topic
// missing from one side scores 0 there). It returns an error matching
// ErrUnknownMethod when baseline is not in the report.
func (r *Report) CompareAgainst(baseline string, opts CompareOptions) error {
	base := r.Find(baseline)
	if base == nil {
		return fmt.Errorf("%w: baseline %q", ErrUnknownMethod, baseline)
	}
	if opts.Threshold == 0 {
		opts.Threshold = DefaultThreshold
	}
	for i := range r.Runs {
		run := &r.Runs[i]
		if run.Method == baseline {
			continue
		}
		a, b := pairAP(base.PerTopic, run.PerTopic)
		c := &Comparison{Baseline: baseline}
		c.Helped, c.Hurt, c.Robustness = CompareThreshold(a, b, opts.Threshold)
		c.PValue = RandomizationTest(a, b, opts.Trials, opts.Seed)
		run.Comparison = c
	}
	return nil
}

// pairAP aligns two per-topic lists by qid, in qid order.
func pairAP(base, run []TopicResult) (a, b []float64) {
	ap := map[string][2]float64{}
	for _, t := range base {
		v := ap[t.QID]
		v[0] = t.MAP
		ap[t.QID] = v
	}
	for _, t := range run {
		v := ap[t.QID]
		v[1] = t.MAP
		ap[t.QID] = v
	}
	qids := make([]string, 0, len(ap))
	for q := range ap {
		qids = append(qids, q)
	}
	slices.SortFunc(qids, compareQID)
	for _, q := range qids {
		a = append(a, ap[q][0])
		b = append(b, ap[q][1])
	}
	return a, b
}

// WriteJSON writes the report as indented JSON followed by a newline. The
// output depends only on the report's contents.
func (r *Report) WriteJSON(w io.Writer) error {
	out := *r
	if out.Runs == nil {
		out.Runs = []Run{}
	}
	out.Runs = slices.Clone(out.Runs)
	for i := range out.Runs {
		if out.Runs[i].PerTopic == nil {
			out.Runs[i].PerTopic = []TopicResult{}
		}
	}
	b, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return fmt.Errorf("eval: encode report: %w", err)
	}
	if _, err := w.Write(append(b, '\n')); err != nil {
		return fmt.Errorf("eval: write report: %w", err)
	}
	return nil
}

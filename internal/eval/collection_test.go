package eval

import (
	"errors"
	"kinword/internal/testenv"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

func writeCollection(t *testing.T, topics, qrels string) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "tarnwick-demo")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	for name, body := range map[string]string{TopicsFile: topics, QrelsFile: qrels} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func TestLoadCollectionWarnings(t *testing.T) {
	dir := writeCollection(t,
		"1\tfield-operations\treservoir level alarms\n2\tmeter reading schedule\n3\tpipe burst response\n",
		"1 0 d1 1\n3 0 d2 0\n4 0 d3 1\n")
	c, err := LoadCollection(dir)
	if err != nil {
		t.Fatal(err)
	}
	if c.Name != "tarnwick-demo" || len(c.Topics) != 3 || len(c.Qrels) != 3 {
		t.Errorf("loaded %q with %d topics, %d judged; want tarnwick-demo 3 3", c.Name, len(c.Topics), len(c.Qrels))
	}
	want := []string{
		"topic 2 has no judgments",
		"judged topic 4 has no topic line",
		"topic 3 has no relevant document",
	}
	if !slices.Equal(c.Warnings, want) {
		t.Errorf("Warnings = %q, want %q", c.Warnings, want)
	}
	if tp, ok := c.Topic("1"); !ok || tp.Department != "field-operations" {
		t.Errorf("Topic(1) = %+v %v", tp, ok)
	}
	if _, ok := c.Topic("9"); ok {
		t.Error("Topic(9) found")
	}
}

func TestLoadCollectionErrors(t *testing.T) {
	if _, err := LoadCollection(filepath.Join(t.TempDir(), "absent")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("absent dir: err = %v, want os.ErrNotExist", err)
	}
	dir := writeCollection(t, "1\tok\n", "1 0 d1\n")
	_, err := LoadCollection(dir)
	var pe *ParseError
	if !errors.Is(err, ErrMalformed) || !errors.As(err, &pe) || pe.Kind != "qrels" || pe.Line != 1 {
		t.Errorf("malformed qrels: err = %v, want ErrMalformed at qrels line 1", err)
	}
}

func collectionsDir(t *testing.T) string { return testenv.Collections(t) }

// Counts from the collections README (shared/collections/README.md), which
// in turn describes the public Cranfield 1400 and CISI collections.
func TestPublicCollections(t *testing.T) {
	root := collectionsDir(t)
	tests := []struct {
		name          string
		topics, pairs int
		minG, maxG    int
	}{
		{"cranfield", 225, 1612, 1, 4},
		{"cisi", 76, 3114, 1, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, err := LoadCollection(filepath.Join(root, tc.name))
			if err != nil {
				t.Fatal(err)
			}
			if len(c.Topics) != tc.topics || len(c.Qrels) != tc.topics {
				t.Errorf("%d topics, %d judged topics; README says %d", len(c.Topics), len(c.Qrels), tc.topics)
			}
			if got := c.Qrels.RelevantPairs(); got != tc.pairs {
				t.Errorf("%d relevant pairs; README says %d", got, tc.pairs)
			}
			if len(c.Warnings) != 0 {
				t.Errorf("warnings: %q", c.Warnings)
			}
			lo, hi := 1<<30, -1<<30
			for _, j := range c.Qrels {
				for _, g := range j {
					lo, hi = min(lo, g), max(hi, g)
				}
			}
			if lo != tc.minG || hi != tc.maxG {
				t.Errorf("grades %d..%d; README says %d..%d", lo, hi, tc.minG, tc.maxG)
			}
			// Sanity on real judgments: ranking each topic's relevant
			// documents by grade is a perfect run (MAP = nDCG@10 = 1).
			perfect := map[string][]Scored{}
			for qid, j := range c.Qrels {
				for doc, g := range j {
					perfect[qid] = append(perfect[qid], Scored{DocID: doc, Score: float64(g)})
				}
			}
			run := NewRun("perfect", EvaluateScored(perfect, c.Qrels))
			if run.Topics != tc.topics || !near4(run.MAP, 1) || !near4(run.NDCG10, 1) || !near4(run.RPrec, 1) {
				t.Errorf("perfect run: %d topics, %+v", run.Topics, run.Measures)
			}
		})
	}
}

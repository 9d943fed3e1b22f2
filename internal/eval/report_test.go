package eval

import (
	"bytes"
	"encoding/json"
	"errors"
	"strings"
	"testing"
)

// sampleReport has two methods on three judged topics, one of which has
// no relevant document and is therefore not counted (trec_eval convention).
func sampleReport(t *testing.T) *Report {
	t.Helper()
	r := &Report{Collection: "tarnwick-demo"}
	bm25 := NewRun("bm25", map[string]Measures{
		"10": {MAP: 0.5, P10: 0.2, NDCG10: 0.5, RPrec: 0.5, Recall100: 1, NumRel: 2},
		"2":  {MAP: 0.25, P10: 0.1, NDCG10: 0.25, RPrec: 0, Recall100: 0.5, NumRel: 2},
		"3":  {},
	})
	rm3 := NewRun("rm3", map[string]Measures{
		"2":  {MAP: 0.75, P10: 0.2, NDCG10: 0.75, RPrec: 0.5, Recall100: 1, NumRel: 2},
		"10": {MAP: 0.5, P10: 0.2, NDCG10: 0.5, RPrec: 0.5, Recall100: 1, NumRel: 2},
	})
	for _, run := range []Run{bm25, rm3} {
		if err := r.Add(run); err != nil {
			t.Fatal(err)
		}
	}
	return r
}

func TestNewRun(t *testing.T) {
	run := sampleReport(t).Runs[0]
	if run.Topics != 2 || len(run.PerTopic) != 2 {
		t.Fatalf("Topics = %d, per-topic %d; want 2 and 2 (topic 3 has no relevant doc)", run.Topics, len(run.PerTopic))
	}
	if run.PerTopic[0].QID != "2" || run.PerTopic[1].QID != "10" {
		t.Errorf("per-topic order %s, %s; want 2, 10", run.PerTopic[0].QID, run.PerTopic[1].QID)
	}
	want := Measures{MAP: 0.375, P10: 0.15, NDCG10: 0.375, RPrec: 0.25, Recall100: 0.75}
	if !nearMeasures(run.Measures, want) {
		t.Errorf("mean = %+v, want %+v", run.Measures, want)
	}
}

func TestReportAddAndCompare(t *testing.T) {
	r := sampleReport(t)
	if err := r.Add(Run{Method: "bm25"}); !errors.Is(err, ErrInvalid) {
		t.Errorf("duplicate Add err = %v, want ErrInvalid", err)
	}
	if err := r.CompareAgainst("nope", CompareOptions{}); !errors.Is(err, ErrUnknownMethod) {
		t.Errorf("CompareAgainst(unknown) err = %v, want ErrUnknownMethod", err)
	}
	if err := r.CompareAgainst("bm25", CompareOptions{Trials: 1000, Seed: 3}); err != nil {
		t.Fatal(err)
	}
	if r.Runs[0].Comparison != nil {
		t.Error("baseline got a comparison")
	}
	c := r.Find("rm3").Comparison
	// Topic 2 rose 0.25 -> 0.75, topic 10 tied: helped 1, hurt 0, RI 1/2.
	// Two topics give 4 sign patterns; |sum| >= 0.5 for all -> p = 1.
	if c == nil || c.Helped != 1 || c.Hurt != 0 || c.Robustness != 0.5 || c.PValue != 1 || c.Baseline != "bm25" {
		t.Errorf("comparison = %+v, want helped 1 hurt 0 RI 0.5 p 1 vs bm25", c)
	}
}

func TestWriteJSON(t *testing.T) {
	r := sampleReport(t)
	var b1, b2 bytes.Buffer
	if err := r.WriteJSON(&b1); err != nil {
		t.Fatal(err)
	}
	if err := r.WriteJSON(&b2); err != nil {
		t.Fatal(err)
	}
	if b1.String() != b2.String() {
		t.Error("WriteJSON is not deterministic")
	}
	var compact bytes.Buffer
	if err := json.Compact(&compact, b1.Bytes()); err != nil {
		t.Fatal(err)
	}
	wantPrefix := `{"collection":"tarnwick-demo","runs":[{"method":"bm25","topics":2,"map":0.375,` +
		`"p_at_10":0.15000000000000002,"ndcg_at_10":0.375,"r_prec":0.25,"recall_at_100":0.75,` +
		`"per_topic":[{"qid":"2","map":0.25,"p_at_10":0.1,"ndcg_at_10":0.25,"r_prec":0,"recall_at_100":0.5,"num_rel":2},`
	if !strings.HasPrefix(compact.String(), wantPrefix) {
		t.Errorf("JSON =\n%s\nwant prefix\n%s", compact.String(), wantPrefix)
	}
	if strings.Contains(compact.String(), "helped") {
		t.Error("comparison fields present before CompareAgainst")
	}
	if err := r.CompareAgainst("bm25", CompareOptions{Trials: 100}); err != nil {
		t.Fatal(err)
	}
	var back Report
	b1.Reset()
	if err := r.WriteJSON(&b1); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b1.Bytes(), &back); err != nil {
		t.Fatal(err)
	}
	if c := back.Runs[1].Comparison; c == nil || c.Helped != 1 || back.Runs[0].Comparison != nil {
		t.Errorf("round trip lost the comparison: %+v", back.Runs)
	}
	var empty bytes.Buffer
	if err := (&Report{}).WriteJSON(&empty); err != nil || !strings.Contains(empty.String(), `"runs": []`) {
		t.Errorf("empty report JSON = %q, %v; want runs []", empty.String(), err)
	}
}

func TestWriteTable(t *testing.T) {
	r := sampleReport(t)
	if err := r.CompareAgainst("bm25", CompareOptions{Trials: 1000}); err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := r.WriteTable(&b); err != nil {
		t.Fatal(err)
	}
	want := `collection: tarnwick-demo
method  topics  MAP     P@10    nDCG@10  R-prec  R@100   vs    helped  hurt  RI      p
bm25    2       0.3750  0.1500  0.3750   0.2500  0.7500  -     -       -     -       -
rm3     2       0.6250  0.2000  0.6250   0.5000  1.0000  bm25  1       0     0.5000  1.0000
`
	if b.String() != want {
		t.Errorf("WriteTable =\n%s\nwant\n%s", b.String(), want)
	}
}

func TestWriteMarkdown(t *testing.T) {
	r := &Report{Collection: "demo"}
	r.Add(NewRun("a|b", map[string]Measures{"1": {MAP: 1, NumRel: 1}}))
	var b bytes.Buffer
	if err := r.WriteMarkdown(&b); err != nil {
		t.Fatal(err)
	}
	want := "Collection: demo\n\n" +
		"| method | topics | MAP | P@10 | nDCG@10 | R-prec | R@100 |\n" +
		"|---|---:|---:|---:|---:|---:|---:|\n" +
		`| a\|b | 1 | 1.0000 | 0.0000 | 0.0000 | 0.0000 | 0.0000 |` + "\n"
	if b.String() != want {
		t.Errorf("WriteMarkdown =\n%s\nwant\n%s", b.String(), want)
	}
}

func TestWriteTopicTable(t *testing.T) {
	r := sampleReport(t)
	if err := r.WriteTopicTable(&bytes.Buffer{}, "nope"); !errors.Is(err, ErrUnknownMethod) {
		t.Errorf("unknown method err = %v", err)
	}
	if err := r.CompareAgainst("bm25", CompareOptions{Trials: 10}); err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := r.WriteTopicTable(&b, "rm3"); err != nil {
		t.Fatal(err)
	}
	want := `qid  rel  AP      P@10    nDCG@10  R-prec  R@100   base AP  diff
2    2    0.7500  0.2000  0.7500   0.5000  1.0000  0.2500   +0.5000
10   2    0.5000  0.2000  0.5000   0.5000  1.0000  0.5000   +0.0000
`
	if b.String() != want {
		t.Errorf("WriteTopicTable =\n%s\nwant\n%s", b.String(), want)
	}
}

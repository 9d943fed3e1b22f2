package eval

import (
	"fmt"
	"math"
	"testing"
)

// near4 reports whether got equals want to 4 decimals.
func near4(got, want float64) bool { return math.Abs(got-want) < 5e-5 }

// binaryRun is ten documents with the relevant ones at ranks 1, 3 and 6;
// the topic has a fourth relevant document (r4) that is not retrieved.
func binaryRun() ([]string, map[string]int) {
	ranking := []string{"r1", "n2", "r3", "n4", "n5", "r6", "n7", "n8", "n9", "n10"}
	judged := map[string]int{"r1": 1, "r3": 1, "r6": 1, "r4": 1, "n2": 0, "n5": 0}
	return ranking, judged
}

// Hand-worked from the textbook definitions of AP, P@k, R-precision and
// recall (Manning, Raghavan & Schuetze 2008, Introduction to Information
// Retrieval, ch. 8; trec_eval divides AP by all relevant judged documents,
// from memory):
//
//	AP    = (1/1 + 2/3 + 3/6) / 4 = 2.1667 / 4 = 0.5417
//	P@5   = 2/5 = 0.4; P@10 = 3/10 = 0.3
//	R-prec (R = 4): 2 relevant in the top 4 -> 0.5
//	R@100 = 3/4; RR = 1/1
//	nDCG@10 (binary gains, log2(rank+1) discount):
//	  DCG  = 1 + 1/log2(4) + 1/log2(7)             = 1.8562
//	  IDCG = 1 + 1/log2(3) + 1/log2(4) + 1/log2(5) = 2.5616 -> 0.7246
func TestBinaryMeasuresHandWorked(t *testing.T) {
	ranking, judged := binaryRun()
	tests := []struct {
		name string
		got  float64
		want float64
	}{
		{"AP", AveragePrecision(ranking, judged), 0.5417},
		{"P@5", PrecisionAt(ranking, judged, 5), 0.4},
		{"P@10", PrecisionAt(ranking, judged, 10), 0.3},
		{"R-precision", RPrecision(ranking, judged), 0.5},
		{"Recall@100", RecallAt(ranking, judged, 100), 0.75},
		{"Recall@3", RecallAt(ranking, judged, 3), 0.5},
		{"RR", ReciprocalRank(ranking, judged), 1},
		{"RR from rank 3", ReciprocalRank(ranking[1:], judged), 0.5},
		{"DCG@10", DCGAt(ranking, judged, 10), 1.8562},
		{"IDCG@10", IdealDCGAt(judged, 10), 2.5616},
		{"nDCG@10", NDCGAt(ranking, judged, 10), 0.7246},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if !near4(tc.got, tc.want) {
				t.Errorf("%s = %.6f, want %.4f", tc.name, tc.got, tc.want)
			}
		})
	}
	m := Evaluate(ranking, judged)
	want := Measures{MAP: 0.5417, P10: 0.3, NDCG10: 0.7246, RPrec: 0.5, Recall100: 0.75, NumRel: 4}
	if !nearMeasures(m, want) || m.NumRel != 4 {
		t.Errorf("Evaluate = %+v, want %+v", m, want)
	}
}

// The graded example that is common practice in DCG tutorials (gains
// 3,2,3,0,1,2 at ranks 1..6; DCG after Jaervelin & Kekaelaeinen 2002 in the
// log2(rank+1) form trec_eval's ndcg_cut uses with linear gains, from
// memory). Values recomputed here to 4 decimals:
//
//	DCG@6  = 3 + 2/log2 3 + 3/2 + 0 + 1/log2 6 + 2/log2 7 = 6.8611
//	IDCG@6 over the same six gains sorted (3,3,2,2,1,0)   = 7.1410
//	nDCG@6 = 6.8611 / 7.1410                              = 0.9608
func TestGradedDCGTextbook(t *testing.T) {
	ranking := []string{"d1", "d2", "d3", "d4", "d5", "d6"}
	judged := map[string]int{"d1": 3, "d2": 2, "d3": 3, "d4": 0, "d5": 1, "d6": 2}
	for _, tc := range []struct {
		name      string
		got, want float64
	}{
		{"DCG@6", DCGAt(ranking, judged, 6), 6.8611},
		{"IDCG@6", IdealDCGAt(judged, 6), 7.1410},
		{"nDCG@6", NDCGAt(ranking, judged, 6), 0.9608},
		{"nDCG@10 equals nDCG@6 here", Evaluate(ranking, judged).NDCG10, 0.9608},
	} {
		if !near4(tc.got, tc.want) {
			t.Errorf("%s = %.6f, want %.4f", tc.name, tc.got, tc.want)
		}
	}
}

// Edge cases follow trec_eval's conventions (from memory): fixed
// denominators for P@k, unjudged = non-relevant, zero when nothing is
// relevant.
func TestEvaluateEdgeCases(t *testing.T) {
	tests := []struct {
		name    string
		ranking []string
		judged  map[string]int
		want    Measures
	}{
		{"no ranking counts zeros", nil, map[string]int{"a": 1, "b": 2},
			Measures{NumRel: 2}},
		{"no relevant judgments", []string{"a"}, map[string]int{"a": 0},
			Measures{}},
		{"short ranking keeps k=10 denominator", []string{"a", "x"}, map[string]int{"a": 1},
			Measures{MAP: 1, P10: 0.1, NDCG10: 1, RPrec: 1, Recall100: 1, NumRel: 1}},
		{"repeated relevant doc earns once", []string{"x", "a", "a", "b"}, map[string]int{"a": 1, "b": 1},
			// AP = (1/2 + 2/4)/2; R-prec: 1 of top 2;
			// nDCG = (1/log2 3 + 1/log2 5)/(1 + 1/log2 3) = 1.0616/1.6309
			Measures{MAP: 0.5, P10: 0.2, NDCG10: 0.6509, RPrec: 0.5, Recall100: 1, NumRel: 2}},
		{"relevant beyond rank 100", append(make([]string, 100), "a"), map[string]int{"a": 1},
			Measures{MAP: 1.0 / 101, NDCG10: 0, NumRel: 1}},
		{"negative grade gains nothing", []string{"bad", "a"}, map[string]int{"a": 2, "bad": -1},
			// nDCG = (2/log2 3) / 2
			Measures{MAP: 0.5, P10: 0.1, NDCG10: 0.6309, RPrec: 0, Recall100: 1, NumRel: 1}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := Evaluate(tc.ranking, tc.judged)
			if !nearMeasures(got, tc.want) || got.NumRel != tc.want.NumRel {
				t.Errorf("Evaluate = %+v, want %+v", got, tc.want)
			}
		})
	}
	if got := PrecisionAt([]string{"a"}, map[string]int{"a": 1}, 0); got != 0 {
		t.Errorf("PrecisionAt(k=0) = %v, want 0", got)
	}
}

// trec_eval averages over topics with relevant documents, and -c counts
// topics missing from the run as zeros (trec_eval README, from memory).
func TestEvaluateRunAndMean(t *testing.T) {
	qrels := Qrels{
		"1": {"a": 1, "b": 0},
		"2": {"c": 1}, // not in the run: zeros, still averaged
		"3": {"d": 0}, // no relevant document: skipped
	}
	run := map[string][]string{"1": {"a"}, "9": {"z"}}
	per := EvaluateRun(run, qrels)
	if len(per) != 3 {
		t.Fatalf("EvaluateRun has %d topics, want 3 (one per qrels topic)", len(per))
	}
	mean := Mean([]Measures{per["1"], per["2"], per["3"]})
	want := Measures{MAP: 0.5, P10: 0.05, NDCG10: 0.5, RPrec: 0.5, Recall100: 0.5}
	if !nearMeasures(mean, want) || mean.NumRel != 0 {
		t.Errorf("Mean = %+v, want %+v", mean, want)
	}
	if got := Mean(nil); got != (Measures{}) {
		t.Errorf("Mean(nil) = %+v, want zeros", got)
	}
}

func TestEvaluateScoredUsesTieBreak(t *testing.T) {
	// Equal scores: trec_eval ranks "b" above "a" (docid descending).
	qrels := Qrels{"1": {"b": 1}}
	run := map[string][]Scored{"1": {{"a", 1}, {"b", 1}}}
	if got := EvaluateScored(run, qrels)["1"].MAP; got != 1 {
		t.Errorf("AP = %v, want 1 (b first after SortRun)", got)
	}
	if run["1"][0].DocID != "a" {
		t.Error("EvaluateScored reordered the caller's slice")
	}
}

func nearMeasures(a, b Measures) bool {
	return near4(a.MAP, b.MAP) && near4(a.P10, b.P10) && near4(a.NDCG10, b.NDCG10) &&
		near4(a.RPrec, b.RPrec) && near4(a.Recall100, b.Recall100)
}

func BenchmarkEvaluate(b *testing.B) {
	ranking := make([]string, 1000)
	judged := map[string]int{}
	for i := range ranking {
		ranking[i] = fmt.Sprintf("doc%04d", i)
		switch {
		case i%37 == 0:
			judged[ranking[i]] = 1 + i%3
		case i%11 == 0:
			judged[ranking[i]] = 0
		}
	}
	for i := range 20 { // relevant documents never retrieved
		judged[fmt.Sprintf("miss%02d", i)] = 1
	}
	b.ReportAllocs()
	for b.Loop() {
		Evaluate(ranking, judged)
	}
}

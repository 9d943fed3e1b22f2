package eval

import (
	"math"
	"slices"
)

// RelevanceLevel is the lowest grade counted as relevant (trec_eval's
// default relevance level).
const RelevanceLevel = 1

// Measures are the per-topic (or averaged) scores Kinword reports.
type Measures struct {
	// MAP is average precision for one topic, mean average precision when
	// averaged.
	MAP float64 `json:"map"`
	// P10 is precision at rank 10.
	P10 float64 `json:"p_at_10"`
	// NDCG10 is nDCG at rank 10 with linear gains (gain = grade).
	NDCG10 float64 `json:"ndcg_at_10"`
	// RPrec is R-precision: precision at rank R, R the number of relevant
	// documents.
	RPrec float64 `json:"r_prec"`
	// Recall100 is recall at rank 100.
	Recall100 float64 `json:"recall_at_100"`
	// NumRel is the number of relevant documents judged for the topic. Mean
	// skips topics with NumRel 0 and leaves it 0 in its result.
	NumRel int `json:"num_rel,omitempty"`
}

// Evaluate scores one ranking (document ids, best first) against the
// topic's judgments (docid -> grade), following trec_eval:
//   - AP divides the sum of precisions at relevant ranks by the number of
//     relevant documents in the judgments, retrieved or not;
//   - P@10 divides by 10 even when fewer documents were retrieved;
//   - nDCG@10 uses gain = grade, discount log2(rank+1), and the ideal
//     ranking of all judged grades;
//   - R-precision and Recall@100 divide by the number of relevant documents.
//
// Unjudged documents count as non-relevant. A document id repeated in the
// ranking keeps its rank but only its first occurrence earns credit. With
// no relevant judgments every measure is 0.
func Evaluate(ranking []string, judged map[string]int) Measures {
	m := Measures{NumRel: NumRelevant(judged)}
	if m.NumRel == 0 {
		return m
	}
	R := m.NumRel
	var hits, hits10, hitsR, hits100 int
	var sumPrec, dcg float64
	w := walker{judged: judged}
	for i, doc := range ranking {
		rank := i + 1
		g := w.grade(doc)
		if rank <= 10 && g > 0 {
			dcg += float64(g) / math.Log2(float64(rank)+1)
		}
		if g >= RelevanceLevel {
			hits++
			sumPrec += float64(hits) / float64(rank)
		}
		if rank == 10 {
			hits10 = hits
		}
		if rank == R {
			hitsR = hits
		}
		if rank == 100 {
			hits100 = hits
		}
	}
	if len(ranking) < 10 {
		hits10 = hits
	}
	if len(ranking) < R {
		hitsR = hits
	}
	if len(ranking) < 100 {
		hits100 = hits
	}
	m.MAP = sumPrec / float64(R)
	m.P10 = float64(hits10) / 10
	if ideal := IdealDCGAt(judged, 10); ideal > 0 {
		m.NDCG10 = dcg / ideal
	}
	m.RPrec = float64(hitsR) / float64(R)
	m.Recall100 = float64(hits100) / float64(R)
	return m
}

// NumRelevant counts the judgments with grade >= RelevanceLevel.
func NumRelevant(judged map[string]int) int {
	n := 0
	for _, g := range judged {
		if g >= RelevanceLevel {
			n++
		}
	}
	return n
}

// AveragePrecision is the sum, over the ranks of relevant retrieved
// documents, of precision at that rank, divided by the number of relevant
// judged documents (0 when there are none).
func AveragePrecision(ranking []string, judged map[string]int) float64 {
	return Evaluate(ranking, judged).MAP
}

// PrecisionAt is the fraction of the first k ranks holding relevant
// documents; missing ranks count as non-relevant. 0 for k <= 0.
func PrecisionAt(ranking []string, judged map[string]int, k int) float64 {
	if k <= 0 {
		return 0
	}
	return float64(hitsAt(ranking, judged, k)) / float64(k)
}

// RecallAt is the fraction of the relevant judged documents found in the
// first k ranks (0 when there are none or k <= 0).
func RecallAt(ranking []string, judged map[string]int, k int) float64 {
	r := NumRelevant(judged)
	if r == 0 || k <= 0 {
		return 0
	}
	return float64(hitsAt(ranking, judged, k)) / float64(r)
}

// RPrecision is precision at rank R, R the number of relevant judged
// documents (0 when R is 0).
func RPrecision(ranking []string, judged map[string]int) float64 {
	return PrecisionAt(ranking, judged, NumRelevant(judged))
}

// ReciprocalRank is 1/rank of the first relevant document, 0 if none is
// retrieved.
func ReciprocalRank(ranking []string, judged map[string]int) float64 {
	for i, doc := range ranking {
		if judged[doc] >= RelevanceLevel {
			return 1 / float64(i+1)
		}
	}
	return 0
}

// DCGAt is discounted cumulative gain over the first k ranks with gain =
// grade (grades <= 0 gain nothing) and discount log2(rank+1).
func DCGAt(ranking []string, judged map[string]int, k int) float64 {
	var dcg float64
	w := walker{judged: judged}
	for i, doc := range ranking {
		if i >= k {
			break
		}
		if g := w.grade(doc); g > 0 {
			dcg += float64(g) / math.Log2(float64(i)+2)
		}
	}
	return dcg
}

// IdealDCGAt is the DCG at k of the best possible ranking: all judged
// grades sorted descending.
func IdealDCGAt(judged map[string]int, k int) float64 {
	grades := make([]int, 0, len(judged))
	for _, g := range judged {
		if g > 0 {
			grades = append(grades, g)
		}
	}
	slices.SortFunc(grades, func(a, b int) int { return b - a })
	var dcg float64
	for i, g := range grades {
		if i >= k {
			break
		}
		dcg += float64(g) / math.Log2(float64(i)+2)
	}
	return dcg
}

// NDCGAt is DCGAt divided by IdealDCGAt (0 when the ideal is 0).
func NDCGAt(ranking []string, judged map[string]int, k int) float64 {
	ideal := IdealDCGAt(judged, k)
	if ideal == 0 {
		return 0
	}
	return DCGAt(ranking, judged, k) / ideal
}

func hitsAt(ranking []string, judged map[string]int, k int) int {
	hits := 0
	w := walker{judged: judged}
	for i, doc := range ranking {
		if i >= k {
			break
		}
		if w.grade(doc) >= RelevanceLevel {
			hits++
		}
	}
	return hits
}

// walker yields each ranked document's grade, 0 for repeats of a document
// that already earned a positive grade.
type walker struct {
	judged map[string]int
	seen   map[string]struct{}
}

func (w *walker) grade(doc string) int {
	g := w.judged[doc]
	if g <= 0 {
		return g
	}
	if _, dup := w.seen[doc]; dup {
		return 0
	}
	if w.seen == nil {
		w.seen = map[string]struct{}{}
	}
	w.seen[doc] = struct{}{}
	return g
}

// Mean averages measures over the topics that have at least one relevant
// judgment (NumRel > 0), as trec_eval does; others are skipped. Pass the
// measures of every judged topic, including topics the run did not answer
// (Evaluate with a nil ranking gives zeros), to average as trec_eval -c
// does; EvaluateRun does this. The result's NumRel is 0; with no counted
// topic every field is 0.
func Mean(ms []Measures) Measures {
	var sum Measures
	n := 0
	for _, m := range ms {
		if m.NumRel == 0 {
			continue
		}
		n++
		sum.MAP += m.MAP
		sum.P10 += m.P10
		sum.NDCG10 += m.NDCG10
		sum.RPrec += m.RPrec
		sum.Recall100 += m.Recall100
	}
	if n == 0 {
		return Measures{}
	}
	f := float64(n)
	return Measures{
		MAP:       sum.MAP / f,
		P10:       sum.P10 / f,
		NDCG10:    sum.NDCG10 / f,
		RPrec:     sum.RPrec / f,
		Recall100: sum.Recall100 / f,
	}
}

// EvaluateRun evaluates a run (qid -> ranked document ids) against qrels.
// The result has one entry for every topic in qrels, so topics missing from
// the run score zeros (trec_eval -c); run topics absent from qrels are
// ignored. Topics judged without any relevant document appear with
// NumRel 0 and are skipped by Mean and NewRun.
func EvaluateRun(run map[string][]string, qrels Qrels) map[string]Measures {
	out := make(map[string]Measures, len(qrels))
	for qid, judged := range qrels {
		out[qid] = Evaluate(run[qid], judged)
	}
	return out
}

// EvaluateScored is EvaluateRun for scored runs: each topic's documents are
// ranked by SortRun (on a copy) first, so results match trec_eval on the
// same run file.
func EvaluateScored(run map[string][]Scored, qrels Qrels) map[string]Measures {
	ranked := make(map[string][]string, len(run))
	for qid, docs := range run {
		c := append([]Scored(nil), docs...)
		SortRun(c)
		ranked[qid] = DocIDs(c)
	}
	return EvaluateRun(ranked, qrels)
}

package eval_test

import (
	"fmt"
	"os"

	"kinword/internal/eval"
)

func ExampleEvaluate() {
	// Ten retrieved documents; the topic has four relevant ones (grades
	// >= 1), three of them retrieved at ranks 1, 3 and 6.
	ranking := []string{"d1", "d2", "d3", "d4", "d5", "d6", "d7", "d8", "d9", "d10"}
	judged := map[string]int{"d1": 2, "d3": 1, "d6": 1, "d42": 1, "d2": 0}
	// AP = (1/1 + 2/3 + 3/6) / 4; nDCG@10 uses gains 2,1,1 against the
	// ideal 2,1,1,1.
	m := eval.Evaluate(ranking, judged)
	fmt.Printf("AP %.4f  P@10 %.4f  nDCG@10 %.4f  R-prec %.4f  R@100 %.4f\n",
		m.MAP, m.P10, m.NDCG10, m.RPrec, m.Recall100)
	// Output:
	// AP 0.5417  P@10 0.3000  nDCG@10 0.8019  R-prec 0.5000  R@100 0.7500
}

func ExampleReport_WriteTable() {
	qrels := eval.Qrels{"1": {"a": 1, "b": 1}, "2": {"c": 2}}
	report := &eval.Report{Collection: "tarnwick-demo"}
	report.Add(eval.NewRun("bm25", eval.EvaluateRun(map[string][]string{
		"1": {"a", "x", "b"}, "2": {"y", "c"},
	}, qrels)))
	report.Add(eval.NewRun("bm25+rm3", eval.EvaluateRun(map[string][]string{
		"1": {"a", "b"}, "2": {"c"},
	}, qrels)))
	report.CompareAgainst("bm25", eval.CompareOptions{Seed: 1})
	// Two topics allow four sign flips of the AP differences; two of them
	// are as extreme as observed, so the exact p-value is 0.5; the output
	// shows the 100000-trial estimate for seed 1.
	report.WriteTable(os.Stdout)
	// Output:
	// collection: tarnwick-demo
	// method    topics  MAP     P@10    nDCG@10  R-prec  R@100   vs    helped  hurt  RI      p
	// bm25      2       0.6667  0.1500  0.7753   0.2500  1.0000  -     -       -     -       -
	// bm25+rm3  2       1.0000  0.1500  1.0000   1.0000  1.0000  bm25  2       0     1.0000  0.4997
}

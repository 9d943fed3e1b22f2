package eval

import (
	"fmt"
	"reflect"
	"testing"
)

func TestFoldsDeterministicAndBalanced(t *testing.T) {
	var ids []string
	for i := 0; i < 11; i++ {
		ids = append(ids, fmt.Sprint(i))
	}
	a := Folds(ids, 2, 7)
	rev := append([]string(nil), ids...)
	for i, j := 0, len(rev)-1; i < j; i, j = i+1, j-1 {
		rev[i], rev[j] = rev[j], rev[i]
	}
	if b := Folds(rev, 2, 7); !reflect.DeepEqual(a, b) {
		t.Errorf("folds depend on input order: %v vs %v", a, b)
	}
	if len(a[0])+len(a[1]) != 11 || len(a[0])-len(a[1]) > 1 || len(a[1])-len(a[0]) > 1 {
		t.Errorf("unbalanced folds %v", a)
	}
}

// TestCrossValidateNeverTunesOnScoredTopics: a configuration that is best
// only on fold A's topics must not be chosen to score fold A (the point of
// cross-validation; common practice, e.g. Kohavi 1995).
func TestCrossValidateNeverTunesOnScoredTopics(t *testing.T) {
	ids := []string{"a", "b", "c", "d", "e", "f"}
	folds := Folds(ids, 2, 1)
	inFold0 := map[string]bool{}
	for _, id := range folds[0] {
		inFold0[id] = true
	}
	// Config 1 is excellent on fold 0's topics and poor elsewhere; config 0
	// is middling everywhere.
	value := func(c int, topics []string) (map[string]float64, error) {
		out := map[string]float64{}
		for _, t := range topics {
			switch {
			case c == 0:
				out[t] = 0.5
			case inFold0[t]:
				out[t] = 1
			default:
				out[t] = 0
			}
		}
		return out, nil
	}
	res, err := CrossValidate(ids, 2, 1, 2, value)
	if err != nil {
		t.Fatal(err)
	}
	// Fold 0 is scored by the choice made on fold 1, where config 0 wins;
	// fold 1 is scored by the choice made on fold 0, where config 1 wins.
	if res.Chosen[0] != 0 || res.Chosen[1] != 1 {
		t.Errorf("chosen %v, want [0 1]", res.Chosen)
	}
	for _, id := range folds[0] {
		if res.PerTopic[id] != 0.5 {
			t.Errorf("%s scored %v", id, res.PerTopic[id])
		}
	}
	for _, id := range folds[1] {
		if res.PerTopic[id] != 0 {
			t.Errorf("%s scored %v", id, res.PerTopic[id])
		}
	}
}

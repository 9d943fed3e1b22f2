package main

import (
	"bufio"
	"errors"
	"fmt"
	"os"
	"slices"
	"sort"
	"strings"

	"kinword/internal/eval"
)

// readKinds reads an optional topic-kinds.tsv (qid TAB kind); a missing
// file gives an empty map.
func readKinds(path string) (map[string]string, error) {
	f, err := os.Open(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("eval: %w", err)
	}
	defer f.Close()
	out := map[string]string{}
	sc := bufio.NewScanner(f)
	for line := 1; sc.Scan(); line++ {
		t := strings.TrimSpace(sc.Text())
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		qid, kind, ok := strings.Cut(t, "\t")
		if !ok {
			return nil, fmt.Errorf("eval: %s line %d: want qid<TAB>kind", path, line)
		}
		out[qid] = strings.TrimSpace(kind)
	}
	return out, sc.Err()
}

func sortedKinds(kinds map[string]string) []string {
	set := map[string]bool{}
	for _, k := range kinds {
		set[k] = true
	}
	out := make([]string, 0, len(set))
	for k := range set {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// kindMiss counts topics of a kind whose top 10 holds no relevant document:
// the searches a suggestion has to rescue.
type kindMiss struct {
	Kind   string `json:"kind"`
	Topics int    `json:"topics"`
	// Missed counts topics with no document of grade >= 1 in the top 10.
	Missed int `json:"missed"`
	// MissedBest counts topics whose top 10 lacks every document of the
	// topic's highest grade (the exact answers).
	MissedBest int `json:"missed_best"`
}

func countMisses(kind string, sub map[string]eval.Measures, runs map[string][]eval.Scored, q eval.Qrels) kindMiss {
	m := kindMiss{Kind: kind}
	for qid := range sub {
		m.Topics++
		best := 0
		for _, g := range q[qid] {
			best = max(best, g)
		}
		hit, hitBest := false, false
		for i, s := range runs[qid] {
			if i >= 10 {
				break
			}
			g := q[qid][s.DocID]
			hit = hit || g >= eval.RelevanceLevel
			hitBest = hitBest || (g == best && g >= eval.RelevanceLevel)
		}
		if !hit {
			m.Missed++
		}
		if !hitBest {
			m.MissedBest++
		}
	}
	return m
}

// evalMethods are the methods eval knows, in report order.
var evalMethods = []string{"bm25", "rm3", "mixture", "rocchio", "kinword"}

func parseMethods(s string) ([]string, error) {
	seen := map[string]bool{}
	for _, m := range strings.Split(s, ",") {
		m = strings.TrimSpace(m)
		if m == "" {
			continue
		}
		if !slices.Contains(evalMethods, m) {
			return nil, usagef("unknown method %q (known: %s)", m, strings.Join(evalMethods, ", "))
		}
		seen[m] = true
	}
	var out []string
	for _, m := range evalMethods {
		if seen[m] {
			out = append(out, m)
		}
	}
	return out, nil
}

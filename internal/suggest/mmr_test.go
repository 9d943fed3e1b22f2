package suggest

import (
	"slices"
	"strings"
	"testing"
)

// mmrCand is a candidate with a preset score, display and feedback
// documents (of 10).
func mmrCand(key, display string, score float64, docs ...int) *cand {
	cd := &cand{key: key, words: strings.Fields(key), display: display, score: score, haveSet: true, docSet: make([]uint64, 1)}
	for _, d := range docs {
		cd.docSet[0] |= 1 << d
		cd.ndocs++
	}
	return cd
}

func pickKeys(cs []*cand) []string {
	out := make([]string, len(cs))
	for i, c := range cs {
		out[i] = c.key
	}
	return out
}

// nearDuplicates are five candidates found in the same four feedback
// documents and four distinct ones, each in documents of its own.
func nearDuplicates() []*cand {
	pool := []*cand{
		mmrCand("dupa", "dupa", 1.00, 0, 1, 2, 3),
		mmrCand("dupb", "dupb", 0.98, 0, 1, 2, 3),
		mmrCand("dupc", "dupc", 0.96, 0, 1, 2, 3),
		mmrCand("dupd", "dupd", 0.94, 0, 1, 2, 3),
		mmrCand("dupe", "dupe", 0.92, 0, 1, 2, 3),
		mmrCand("solo", "solo", 0.70, 4),
		mmrCand("solp", "solp", 0.68, 5),
		mmrCand("solq", "solq", 0.66, 6),
		mmrCand("solr", "solr", 0.64, 7, 8),
	}
	slices.SortFunc(pool, byScore)
	return pool
}

// TestMMR checks maximal marginal relevance (Carbonell & Goldstein, SIGIR
// 1998) with sim = Jaccard overlap of feedback-document sets: with λ 0.7
// five near-duplicates collapse to one, since a near-duplicate's
// 0.7·0.98 − 0.3·1 = 0.386 loses to a distinct 0.7·0.64 = 0.448; with
// λ = 1 (relevance only) they all come first.
func TestMMR(t *testing.T) {
	cases := []struct {
		name   string
		lambda float64
		want   []string
	}{
		{"lambda 0.7 collapses near-duplicates", 0.7, []string{"dupa", "solo", "solp", "solq", "solr"}},
		{"lambda 1 ranks by score only", 1, []string{"dupa", "dupb", "dupc", "dupd", "dupe"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e, err := New(nil, Options{Lambda: c.lambda})
			if err != nil {
				t.Fatal(err)
			}
			r := &run{e: e}
			if got := pickKeys(r.selectMMR(nearDuplicates(), 5)); !slices.Equal(got, c.want) {
				t.Errorf("picked %v, want %v", got, c.want)
			}
		})
	}
}

// TestDistinct checks that no two suggestions share a display (stem
// variants collapse) and that a phrase and its own part are both offered
// only when both are strong and the part also occurs outside the phrase.
func TestDistinct(t *testing.T) {
	cases := []struct {
		name string
		pool []*cand
		want []string
	}{
		{"same display shown once", []*cand{
			mmrCand("meter", "Meter", 1, 0), mmrCand("metr", "meter", 0.9, 5), mmrCand("tariff", "tariff", 0.8, 6),
		}, []string{"meter", "tariff"}},
		{"weak part dropped", []*cand{
			mmrCand("main break", "main break", 1, 0, 1), mmrCand("break", "break", 0.4, 0, 1, 2), mmrCand("logger", "logger", 0.35, 5),
		}, []string{"main break", "logger"}},
		{"strong part seen only inside the phrase dropped", []*cand{
			mmrCand("main break", "main break", 1, 0, 1), mmrCand("break", "break", 0.9, 0, 1), mmrCand("logger", "logger", 0.3, 5),
		}, []string{"main break", "logger"}},
		{"both strong, part also elsewhere: both kept", []*cand{
			mmrCand("main break", "main break", 1, 0, 1), mmrCand("break", "break", 0.9, 0, 1, 2), mmrCand("logger", "logger", 0.3, 5),
		}, []string{"main break", "break", "logger"}},
		{"phrase after its strong part", []*cand{
			mmrCand("break", "break", 1, 0, 1, 2), mmrCand("main break", "main break", 0.95, 0, 1), mmrCand("logger", "logger", 0.2, 5),
		}, []string{"break", "main break", "logger"}},
		{"stopword display dropped", []*cand{
			mmrCand("howev", "however", 1, 0), mmrCand("logger", "logger", 0.9, 5),
		}, []string{"logger"}},
	}
	e, err := New(nil, Options{Lambda: 1, MinShare: -1})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := &run{e: e}
			slices.SortFunc(c.pool, byScore)
			if got := pickKeys(r.selectMMR(c.pool, 5)); !slices.Equal(got, c.want) {
				t.Errorf("picked %v, want %v", got, c.want)
			}
		})
	}
}

// TestMinShare: candidates far below the best are not offered.
func TestMinShare(t *testing.T) {
	e, _ := New(nil, Options{Lambda: 1})
	r := &run{e: e}
	pool := []*cand{mmrCand("valv", "valve", 1, 0), mmrCand("chamber", "chamber", 0.5, 1), mmrCand("wdab", "wdab", 0.1, 2)}
	if got := pickKeys(r.selectMMR(pool, 5)); !slices.Equal(got, []string{"valv", "chamber"}) {
		t.Errorf("picked %v", got)
	}
}

func TestSimilarity(t *testing.T) {
	cases := []struct {
		name string
		a, b *cand
		want float64
	}{
		{"identical sets", mmrCand("a", "a", 1, 0, 1), mmrCand("b", "b", 1, 0, 1), 1},
		{"half overlap", mmrCand("a", "a", 1, 0, 1), mmrCand("b", "b", 1, 1, 2), 1.0 / 3},
		{"disjoint", mmrCand("a", "a", 1, 0), mmrCand("b", "b", 1, 1), 0},
		{"both empty", mmrCand("a", "a", 1), mmrCand("b", "b", 1), 0},
		{"part of phrase", mmrCand("main break", "", 1, 0), mmrCand("break", "", 1, 5), 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := similarity(c.a, c.b); got != c.want {
				t.Errorf("similarity = %g, want %g", got, c.want)
			}
		})
	}
}

package trial

import (
	"context"
	"encoding/csv"
	"errors"
	"math"
	"strings"
	"testing"

	"kinword/internal/curate"
	"kinword/internal/eval"
	"kinword/internal/finder"
	"kinword/internal/index"
	"kinword/internal/suggest"
)

// fake answers from fixed tables: the ranking of a query depends on whether
// the request's rule set holds any rule (so the proposed side differs), and
// on the accepted term.
type fake struct {
	plain, ruled map[string][]string // query -> ranking, without / with rules
	accepted     map[string][]string // accepted term -> ranking
	sugg         []string            // suggestions offered, in order
	calls        int
}

func (f *fake) Search(_ context.Context, req finder.Request) (finder.Response, error) {
	f.calls++
	if req.Query == "the" {
		return finder.Response{}, index.ErrBadQuery
	}
	if req.Ranking != 100 || req.Impression == "" || req.Rules == nil {
		return finder.Response{}, errors.New("fake: the trial must ask for a ranking with a fixed impression and explicit rules")
	}
	var out finder.Response
	switch {
	case len(req.Accepted) == 1:
		out.Ranking = f.accepted[req.Accepted[0]]
	case req.Rules.Len() > 0:
		out.Ranking = f.ruled[req.Query]
	default:
		out.Ranking = f.plain[req.Query]
	}
	for _, s := range f.sugg {
		out.Suggestions = append(out.Suggestions, suggest.Suggestion{Term: s, Display: s + "s"})
	}
	return out, nil
}

func TestRunHandComputed(t *testing.T) {
	// Two judged topics, one relevant document each, and a third topic
	// whose query the search refuses. Average precision by hand
	// (trec_eval's definition; Manning, Raghavan & Schütze 2008, §8.4):
	//   q1 current: relevant d1 at rank 2 -> AP 1/2; proposed (rules): rank
	//      1 -> AP 1.
	//   q2 the same ranking on both sides: relevant d9 at rank 4 -> 1/4.
	//   q3 scores 0 on both sides.
	// Accepting "a" ranks only d1 (q1: AP 1, q2: 0), accepting "b" nothing
	// relevant, on both sides: first and best are "a" everywhere.
	col := &eval.Collection{Name: "tiny",
		Topics: []eval.Topic{{ID: "q1", Text: "pipe"}, {ID: "q2", Text: "meter"}, {ID: "q3", Text: "the"}},
		Qrels:  eval.Qrels{"q1": {"d1": 1}, "q2": {"d9": 2}, "q3": {"d5": 1}}}
	f := &fake{
		plain:    map[string][]string{"pipe": {"d2", "d1"}, "meter": {"d6", "d7", "d8", "d9"}},
		ruled:    map[string][]string{"pipe": {"d1", "d2"}, "meter": {"d6", "d7", "d8", "d9"}},
		accepted: map[string][]string{"a": {"d1"}, "b": {"d3"}},
		sugg:     []string{"a", "b"},
	}
	cur, prop, err := Sets(nil, Proposal{Title: "t", Add: []curate.Rule{{Kind: curate.Use, Query: "pipe", Term: "main"}}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Run(context.Background(), f, col, cur, prop, Proposal{Title: "t"}, Options{Trials: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Topics != 3 || rep.Changed != 1 || rep.RulesInForce != 0 || rep.RulesProposed != 1 {
		t.Fatalf("topics %d changed %d rules %d/%d, want 3 1 0/1", rep.Topics, rep.Changed, rep.RulesInForce, rep.RulesProposed)
	}
	want := map[string][2]float64{ // view -> current, proposed MAP over 3 topics
		ViewSearch: {(0.5 + 0.25 + 0) / 3, (1 + 0.25 + 0) / 3},
		ViewFirst:  {1.0 / 3, 1.0 / 3},
		ViewBest:   {1.0 / 3, 1.0 / 3},
	}
	for name, w := range want {
		v := rep.Find(name)
		if v == nil {
			t.Fatalf("no view %s", name)
		}
		c, p := v.Report.Find(Current), v.Report.Find(Proposed)
		if !near(c.MAP, w[0]) || !near(p.MAP, w[1]) || c.Topics != 3 {
			t.Errorf("%s: MAP %.6f / %.6f over %d topics, want %.6f / %.6f over 3", name, c.MAP, p.MAP, c.Topics, w[0], w[1])
		}
		if p.Comparison == nil || p.Baseline != Current {
			t.Fatalf("%s: proposed side not compared with the current one", name)
		}
	}
	if s := rep.Find(ViewSearch).Report.Find(Proposed); s.Helped != 1 || s.Hurt != 0 {
		t.Errorf("search view helped/hurt %d/%d, want 1/0", s.Helped, s.Hurt)
	}
	// Two topics searched per side, each with 2 accepted suggestions, plus
	// the refused one: (2*(1+2) + 1) * 2 sides.
	if f.calls != 14 {
		t.Errorf("%d searches, want 14", f.calls)
	}
	var b strings.Builder
	if err := rep.WriteMarkdown(&b); err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"# Trial: t", "Judged set tiny: 3 topics, 1 of them changed", "| proposed | 3 | 0.4167 |", "## After accepting the first suggestion"} {
		if !strings.Contains(b.String(), s) {
			t.Errorf("markdown lacks %q:\n%s", s, b.String())
		}
	}
}

// TestWriteCSV: one header and one line per view and side, parsing back
// with encoding/csv, the comparison only on the proposed side.
func TestWriteCSV(t *testing.T) {
	col := &eval.Collection{Name: "tiny", Topics: []eval.Topic{{ID: "q1", Text: "pipe"}}, Qrels: eval.Qrels{"q1": {"d1": 1}}}
	f := &fake{plain: map[string][]string{"pipe": {"d2", "d1"}}, ruled: map[string][]string{"pipe": {"d1"}}}
	cur, prop, _ := Sets(nil, Proposal{Add: []curate.Rule{{Kind: curate.Use, Query: "pipe", Term: "main"}}}, nil)
	rep, err := Run(context.Background(), f, col, cur, prop, Proposal{}, Options{Trials: 100})
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	if err := rep.WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	lines, err := csv.NewReader(strings.NewReader(b.String())).ReadAll()
	if err != nil || len(lines) != 7 || strings.Join(lines[0], ",") != strings.Join(CSVHeader, ",") {
		t.Fatalf("csv %q (%v): want the header and 6 lines", b.String(), err)
	}
	if l := lines[2]; l[0] != ViewSearch || l[1] != Proposed || l[3] != "1" || l[8] != Current || l[9] != "1" {
		t.Errorf("proposed search line %q: want MAP 1, compared with current, 1 helped", l)
	}
	if l := lines[1]; l[3] != "0.5" || l[8] != "" {
		t.Errorf("current search line %q: want MAP 0.5 and no comparison", l)
	}
}

func near(a, b float64) bool { return a-b < 1e-9 && b-a < 1e-9 }

func TestSetsBadProposals(t *testing.T) {
	inForce := []curate.Rule{{ID: "r1", Kind: curate.Pin, Query: "leak", Term: "night flow"}}
	tests := []struct {
		name string
		p    Proposal
		want string // "" = accepted
	}{
		{"nothing", Proposal{}, ""},
		{"remove one in force", Proposal{Remove: []string{"r1"}}, ""},
		{"replace by id", Proposal{Add: []curate.Rule{{ID: "r1", Kind: curate.Block, Term: "night flow"}}}, ""},
		{"remove unknown", Proposal{Remove: []string{"r9"}}, `rule "r9" is not in force`},
		{"contradiction", Proposal{Add: []curate.Rule{{Kind: curate.Block, Query: "leak", Term: "night flow"}}}, "proposed rules"},
		{"empty term", Proposal{Add: []curate.Rule{{Kind: curate.Pin, Query: "leak"}}}, "proposed rules"},
		{"long title", Proposal{Title: strings.Repeat("x", MaxTitleBytes+1)}, "title"},
		{"bad utf-8 title", Proposal{Title: "\xff"}, "title"},
		{"too many", Proposal{Remove: make([]string, MaxRules+1)}, "at most"},
		{"accepted weight", Proposal{AcceptedWeight: ptr(0.5)}, ""},
		{"accepted weight 1", Proposal{AcceptedWeight: ptr(1.0)}, ""},
		{"accepted weight 0", Proposal{AcceptedWeight: ptr(0.0)}, "accepted_weight"},
		{"accepted weight above 1", Proposal{AcceptedWeight: ptr(1.5)}, "accepted_weight"},
		{"accepted weight NaN", Proposal{AcceptedWeight: ptr(math.NaN())}, "accepted_weight"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := Sets(inForce, tc.p, nil)
			if tc.want == "" {
				if err != nil {
					t.Fatalf("refused: %v", err)
				}
				return
			}
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("err %v, want ErrInvalid mentioning %q", err, tc.want)
			}
		})
	}
}

func TestRunNoJudgedTopics(t *testing.T) {
	col := &eval.Collection{Name: "none", Topics: []eval.Topic{{ID: "q1", Text: "pipe"}}, Qrels: eval.Qrels{"q1": {"d1": 0}}}
	cur, prop, _ := Sets(nil, Proposal{}, nil)
	if _, err := Run(context.Background(), &fake{}, col, cur, prop, Proposal{}, Options{}); !errors.Is(err, ErrInvalid) {
		t.Fatalf("err %v, want ErrInvalid", err)
	}
}

func ptr[T any](v T) *T { return &v }

// weighted answers an accepted search by the request's accepted-term
// weight: with the proposed side's override the relevant d1 ranks first,
// with the configured weight (0 in the request) second.
type weighted struct{ calls, overridden int }

func (w *weighted) Search(_ context.Context, req finder.Request) (finder.Response, error) {
	w.calls++
	out := finder.Response{Ranking: []string{"d2", "d1"},
		Suggestions: []suggest.Suggestion{{Term: "a", Display: "a"}}}
	if len(req.Accepted) == 1 && req.AcceptWeight > 0 {
		w.overridden++
		if req.AcceptWeight != 0.6 {
			return out, errors.New("weighted: the proposal's weight did not reach the search")
		}
		out.Ranking = []string{"d1", "d2"}
	}
	return out, nil
}

// TestRunAcceptedWeight: a proposal of another accepted-term weight leaves
// the plain search alone and acts on the views with an accepted
// suggestion. AP by hand (trec_eval's definition; Manning, Raghavan &
// Schütze 2008, §8.4), one topic with relevant d1: after accepting "a" AP
// is 1/2 on the current side (d1 second) and 1 on the proposed side (first).
func TestRunAcceptedWeight(t *testing.T) {
	col := &eval.Collection{Name: "tiny", Topics: []eval.Topic{{ID: "q1", Text: "pipe"}}, Qrels: eval.Qrels{"q1": {"d1": 1}}}
	p := Proposal{Title: "heavier accepted terms", AcceptedWeight: ptr(0.6)}
	cur, prop, err := Sets(nil, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	w := &weighted{}
	rep, err := Run(context.Background(), w, col, cur, prop, p, Options{Trials: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Changed != 1 || w.calls != 4 || w.overridden != 1 {
		t.Fatalf("changed %d, %d searches (%d with the override), want 1, 4 (1)", rep.Changed, w.calls, w.overridden)
	}
	want := map[string][2]float64{ViewSearch: {0.5, 0.5}, ViewFirst: {0.5, 1}, ViewBest: {0.5, 1}}
	for name, m := range want {
		r := rep.Find(name).Report
		if c, pr := r.Find(Current).MAP, r.Find(Proposed).MAP; !near(c, m[0]) || !near(pr, m[1]) {
			t.Errorf("%s: MAP %.4f / %.4f, want %.4f / %.4f", name, c, pr, m[0], m[1])
		}
	}
	var b strings.Builder
	if err := rep.WriteMarkdown(&b); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "Accepted-term weight on the proposed side: 0.60.") {
		t.Errorf("markdown does not name the proposed weight:\n%s", b.String())
	}
}

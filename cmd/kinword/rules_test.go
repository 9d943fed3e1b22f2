package main

import (
	"context"
	"fmt"
	"path/filepath"
	"slices"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/curate"
	"kinword/internal/finder"
	"kinword/internal/prefs"
	"kinword/internal/store"
	"kinword/internal/suggest"
	"kinword/internal/text"
)

// demoFinder ingests and mines the demo intranet and opens a finder on it.
func demoFinder(t *testing.T) (*finder.Finder, *text.Pipeline) {
	t.Helper()
	data := t.TempDir()
	corpus := filepath.Join("..", "..", "testdata", "tarnwick", "docs")
	if code, _, errs := runCLI(t, "ingest", "--data", data, corpus); code != 0 {
		t.Fatalf("ingest: %s", errs)
	}
	if code, _, errs := runCLI(t, "mine", "--data", data, "--json"); code != 0 {
		t.Fatalf("mine: %s", errs)
	}
	p, _ := text.NewPipeline("")
	f, err := finder.Open(context.Background(), data, p, finder.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	return f, p
}

func ask(t *testing.T, f *finder.Finder, q, dept string, accepted ...string) finder.Response {
	t.Helper()
	res, err := f.Search(context.Background(), finder.Request{Query: q, Viewer: access.Viewer{Department: dept}.Normalize(),
		WithResults: true, Accepted: accepted})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func offered(s []suggest.Suggestion) []string { return suggest.Keys(s) }

func sourceOf(s []suggest.Suggestion, key string) []string {
	for _, x := range s {
		if x.Term == key {
			return x.Evidence.Sources
		}
	}
	return nil
}

// TestRuleKindsAtQueryTime proves each librarian rule kind's effect on the
// demo intranet at query time, without re-mining: block (including a term
// the association table proposes and the department's learned ranking
// favours), pin, relate, use (ANSI/NISO Z39.19-2005 §8 equivalence: a
// search for the non-preferred term also finds the preferred one's
// documents), broader and narrower, department scope and expiry.
func TestRuleKindsAtQueryTime(t *testing.T) {
	f, p := demoFinder(t)
	const q, dept, other = "burst pipe", "field-operations", "asset-engineering"
	base := ask(t, f, q, dept)
	var fav string // a term the association table proposes for the query
	for _, s := range base.Suggestions {
		if slices.Contains(s.Evidence.Sources, "association") {
			fav = s.Term
			break
		}
	}
	if fav == "" {
		t.Fatalf("no association-sourced suggestion for %q: %v", q, offered(base.Suggestions))
	}
	// The department's searchers accepted fav in many sessions, so learning
	// favours it too.
	now := time.Now().UTC()
	b := prefs.NewBuilder(prefs.Options{})
	qkey := f.CanonicalQuery(q)
	shown := offered(base.Suggestions)
	for i := range 40 {
		sess := fmt.Sprintf("s%02d", i)
		b.Add(prefs.Event{Kind: prefs.KindImpression, Time: now, Session: sess, Department: dept, Query: qkey, Shown: shown})
		b.Add(prefs.Event{Kind: prefs.KindAccept, Time: now, Session: sess, Department: dept, Query: qkey, Term: fav, Position: slices.Index(shown, fav)})
	}
	f.SetModel(b.Snapshot(now))
	learned := ask(t, f, q, dept)
	if len(learned.Suggestions) == 0 || learned.Suggestions[0].Term != fav {
		t.Fatalf("learning should put %q first: %v", fav, offered(learned.Suggestions))
	}
	favDisplay := learned.Suggestions[0].Display

	rules := func(rs ...curate.Rule) {
		t.Helper()
		set, err := curate.Compile(rs, p)
		if err != nil {
			t.Fatal(err)
		}
		f.SetRules(set)
	}
	cases := []struct {
		name  string
		rules []curate.Rule
		check func(t *testing.T)
	}{
		{"block in one department", []curate.Rule{{ID: "b1", Kind: curate.Block, Term: favDisplay, Department: dept}}, func(t *testing.T) {
			if got := offered(ask(t, f, q, dept).Suggestions); slices.Contains(got, fav) {
				t.Errorf("blocked %q still offered to %s: %v", fav, dept, got)
			}
			if n := len(ask(t, f, q, dept).Suggestions); n < len(base.Suggestions) {
				t.Errorf("the next best should fill the blocked place: %d suggestions, want %d", n, len(base.Suggestions))
			}
			if got := offered(ask(t, f, q, other).Suggestions); !slices.Contains(got, fav) {
				t.Errorf("block for %s removed %q for %s too: %v", dept, fav, other, got)
			}
		}},
		{"organisation block for one query", []curate.Rule{{ID: "b2", Kind: curate.Block, Query: "pipe", Term: favDisplay}}, func(t *testing.T) {
			if got := offered(ask(t, f, q, other).Suggestions); slices.Contains(got, fav) {
				t.Errorf("blocked %q still offered: %v", fav, got)
			}
		}},
		{"pin", []curate.Rule{{ID: "p1", Kind: curate.Pin, Query: "pipe", Term: "leak detection"}}, func(t *testing.T) {
			s := ask(t, f, q, dept).Suggestions
			if len(s) == 0 || s[0].Term != p.Key("leak detection", "") || s[0].Display != "leak detection" || s[0].Evidence.Rule != "p1" {
				t.Errorf("pinned term not first with its rule as evidence: %+v", s)
			}
		}},
		{"relate", []curate.Rule{{ID: "r1", Kind: curate.Relate, Query: "burst pipe", Term: "valve"}}, func(t *testing.T) {
			s := ask(t, f, q, other).Suggestions
			if src := sourceOf(s, p.Key("valve", "")); !slices.Contains(src, "rule:relate") {
				t.Errorf("related term not offered by the rule: %v", offered(s))
			}
		}},
		{"broader and narrower", []curate.Rule{{ID: "n1", Kind: curate.Broader, Query: "burst pipe", Term: "network incident"},
			{ID: "n2", Kind: curate.Narrower, Query: "burst pipe", Term: "hydrant"}}, func(t *testing.T) {
			s := ask(t, f, q, dept).Suggestions
			if !slices.Contains(sourceOf(s, p.Key("hydrant", "")), "rule:narrower") {
				t.Errorf("narrower term not offered: %v", offered(s))
			}
		}},
		{"use: the non-preferred term finds the preferred one", []curate.Rule{{ID: "u1", Kind: curate.Use, Query: "aquaduct rupture", Term: "main break"}}, func(t *testing.T) {
			if n := ask(t, f, "aquaduct rupture", dept).Total; n == 0 {
				t.Errorf("search for the non-preferred term found nothing")
			}
		}},
		{"expired rules do not fire", []curate.Rule{{ID: "x1", Kind: curate.Block, Term: favDisplay, Department: dept,
			Start: now.Add(-48 * time.Hour), Expiry: now.Add(-24 * time.Hour)}}, func(t *testing.T) {
			if got := offered(ask(t, f, q, dept).Suggestions); !slices.Contains(got, fav) {
				t.Errorf("expired block still applies: %v", got)
			}
		}},
	}
	// Control: without the use rule the made-up synonym finds nothing.
	if n := ask(t, f, "aquaduct rupture", dept).Total; n != 0 {
		t.Fatalf("control: %d results for a word the corpus lacks", n)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rules(c.rules...)
			defer f.SetRules(nil)
			c.check(t)
		})
	}
}

// TestStoredRulesReachTheFinder: a rule saved in the store takes effect at
// query time after one refresh (what the server's loop does every refresh
// interval), and deleting it undoes that.
func TestStoredRulesReachTheFinder(t *testing.T) {
	ctx := context.Background()
	f, p := demoFinder(t)
	st, err := store.Open(ctx, "sqlite:"+filepath.Join(t.TempDir(), "events.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	r := &rulesRefresher{st: st, f: f, p: p}
	if err := r.refresh(ctx); err != nil {
		t.Fatal(err)
	}
	const q, dept = "burst pipe", "field-operations"
	first := ask(t, f, q, dept).Suggestions
	if len(first) == 0 {
		t.Fatal("no suggestions")
	}
	rule, err := st.CreateRule(ctx, store.Rule{Kind: "block", Term: first[0].Display, Department: dept, Reason: "test"}, "test", "test")
	if err != nil {
		t.Fatal(err)
	}
	if got := offered(ask(t, f, q, dept).Suggestions); !slices.Contains(got, first[0].Term) {
		t.Fatalf("the rule took effect before a refresh: %v", got)
	}
	if err := r.refresh(ctx); err != nil {
		t.Fatal(err)
	}
	if got := offered(ask(t, f, q, dept).Suggestions); slices.Contains(got, first[0].Term) {
		t.Errorf("stored block not applied after refresh: %v", got)
	}
	if err := st.DeleteRule(ctx, rule.ID, rule.Version, "test", "undo"); err != nil {
		t.Fatal(err)
	}
	if err := r.refresh(ctx); err != nil {
		t.Fatal(err)
	}
	if got := offered(ask(t, f, q, dept).Suggestions); !slices.Contains(got, first[0].Term) {
		t.Errorf("deleted block still applied: %v", got)
	}
}

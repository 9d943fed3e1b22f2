package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"kinword/internal/curate"
	"kinword/internal/store"
	"kinword/internal/trial"
)

// TestTrialOnDemoGolden runs an admin's trial through the live finder and
// the store on the demo intranet: the rules in force (one stored block) are
// compared with a proposal that removes it and adds the equivalence "burst
// pipe" -> "main break" (ANSI/NISO Z39.19-2005 §8, use / used for). The
// equivalence finds the field crews' "main break" pages for the mismatch
// topic M01, so the plain search's MAP rises; the report is stored, read
// back unchanged, and its Markdown matches the golden file (regenerate with
// -update after a deliberate change).
func TestTrialOnDemoGolden(t *testing.T) {
	f, p := demoFinder(t)
	ctx := context.Background()
	st, err := store.Open(ctx, "sqlite:"+filepath.Join(t.TempDir(), "events.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	blocked, err := st.CreateRule(ctx, store.Rule{Kind: "block", Term: "hydrant", Department: "field-operations"}, "test", "in force")
	if err != nil {
		t.Fatal(err)
	}
	col, err := loadJudged(filepath.Join("..", "..", "testdata", "tarnwick"))
	if err != nil {
		t.Fatal(err)
	}
	at := time.Date(2026, 12, 1, 9, 0, 0, 0, time.UTC)
	k := &trialKeeper{st: st, s: f, p: p, col: col, now: func() time.Time { return at }}
	prop := trial.Proposal{Title: "burst pipe means main break", Remove: []string{blocked.ID},
		Add: []curate.Rule{{Kind: curate.Use, Query: "burst pipe", Term: "main break"}}}
	rep, err := k.Run(ctx, prop, nil, "ops")
	if err != nil {
		t.Fatal(err)
	}
	if rep.ID == "" || rep.Topics != 88 || rep.RulesInForce != 1 || rep.RulesProposed != 1 || rep.Changed == 0 {
		t.Fatalf("report %s: id %q, %d topics, rules %d/%d, %d changed", rep, rep.ID, rep.Topics, rep.RulesInForce, rep.RulesProposed, rep.Changed)
	}
	search := rep.Find(trial.ViewSearch).Report
	if c, pr := search.Find(trial.Current), search.Find(trial.Proposed); pr.MAP <= c.MAP || pr.Helped == 0 || pr.PValue <= 0 || pr.PValue > 1 {
		t.Errorf("search view: MAP %.4f -> %.4f, helped %d, p %.4f; want a rise", c.MAP, pr.MAP, pr.Helped, pr.PValue)
	}
	back, err := k.Get(ctx, rep.ID)
	if err != nil {
		t.Fatal(err)
	}
	var a, b bytes.Buffer
	if err := rep.WriteMarkdown(&a); err != nil {
		t.Fatal(err)
	}
	if err := back.WriteMarkdown(&b); err != nil {
		t.Fatal(err)
	}
	if a.String() != b.String() {
		t.Errorf("stored report reads back differently:\n%s\n---\n%s", a.String(), b.String())
	}
	list, err := k.List(ctx)
	if err != nil || len(list) != 1 || list[0].ID != rep.ID || list[0].Actor != "ops" || !list[0].Created.Equal(at) {
		t.Errorf("list %+v, %v", list, err)
	}
	// The golden file holds the report without its random ID.
	back.ID = ""
	var g bytes.Buffer
	if err := back.WriteMarkdown(&g); err != nil {
		t.Fatal(err)
	}
	golden := filepath.Join("testdata", "trial-demo.golden.md")
	if *update {
		if err := os.WriteFile(golden, g.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if g.String() != string(want) {
		t.Errorf("trial report differs from %s (run with -update after a deliberate change):\n%s", golden, g.String())
	}
	// Canaries: a proposal pinning and relating every canary term for
	// every topic's words, run by a caller outside every group, never shows
	// one in its report (rules offer a term only to viewers who may read a
	// document holding it).
	var canaryRules []curate.Rule
	canaries := readTSV(t, filepath.Join("..", "..", "testdata", "tarnwick", "canaries.tsv"))
	for _, row := range canaries {
		for _, tp := range col.Topics[:10] {
			w := strings.Fields(tp.Text)
			q := strings.Join(w[max(0, len(w)-2):], " ") // the topic's last two words
			canaryRules = append(canaryRules, curate.Rule{Kind: curate.Pin, Query: q, Term: row[0]},
				curate.Rule{Kind: curate.Relate, Query: q, Term: row[0], Department: tp.Department})
		}
	}
	leak, err := k.Run(ctx, trial.Proposal{Title: "canaries", Add: canaryRules}, nil, "ops")
	if err != nil {
		t.Fatal(err)
	}
	body, _ := json.Marshal(leak)
	var md bytes.Buffer
	_ = leak.WriteMarkdown(&md)
	for _, row := range canaries {
		if c := strings.ToLower(row[0]); strings.Contains(strings.ToLower(string(body)), c) && !strings.Contains(strings.ToLower(string(body)), `"term":"`+c) ||
			strings.Contains(strings.ToLower(md.String()), c) {
			t.Errorf("canary %s (group %s) reached an outsider's trial report", row[0], row[1])
		}
	}
	// Without a judged set the keeper says so.
	if _, err := (&trialKeeper{st: st, s: f, p: p}).Run(ctx, prop, nil, "ops"); err == nil {
		t.Error("a keeper without a judged set ran a trial")
	}
}

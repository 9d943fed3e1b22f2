package store

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"
)

// ruleIDs lists the stored rules as "id:term@version".
func ruleIDs(t *testing.T, s *Store) string {
	t.Helper()
	rules, err := s.Rules(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, r := range rules {
		out = append(out, r.ID+":"+r.Term+"@"+itoa(r.Version))
	}
	return strings.Join(out, ",")
}

// TestImportAtomic: an import is all or nothing (the atomicity of a
// transaction, Haerder & Reuter 1983, "Principles of Transaction-Oriented
// Database Recovery", section 2). A bad row in the middle leaves the rules
// and the audit log as they were.
func TestImportAtomic(t *testing.T) {
	cases := []struct {
		name  string
		rules []Rule
		want  error
		left  string // rules afterwards; "existing" is there before
		added int    // audit entries the import adds
	}{
		{"all good", []Rule{testRule("r-a", "pin", "sluice"), testRule("r-b", "block", "weir")}, nil,
			"existing:penstock@1,r-a:sluice@1,r-b:weir@1", 2},
		{"invalid row in the middle", []Rule{testRule("r-a", "pin", "sluice"), {Kind: "pin"}, testRule("r-b", "block", "weir")},
			ErrInvalid, "existing:penstock@1", 0},
		{"stored id in the middle", []Rule{testRule("r-a", "pin", "sluice"), testRule("existing", "pin", "x"), testRule("r-b", "block", "weir")},
			ErrConflict, "existing:penstock@1", 0},
		{"repeated id", []Rule{testRule("r-a", "pin", "sluice"), testRule("r-a", "block", "weir")},
			ErrInvalid, "existing:penstock@1", 0},
	}
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			for _, tc := range cases {
				t.Run(tc.name, func(t *testing.T) {
					s := openTest(t, b)
					ctx := context.Background()
					if _, err := s.CreateRule(ctx, testRule("existing", "pin", "penstock"), "demo", ""); err != nil {
						t.Fatal(err)
					}
					err := s.ImportRules(ctx, tc.rules, "token-import", "spring list")
					if tc.want == nil && err != nil || tc.want != nil && !errors.Is(err, tc.want) {
						t.Fatalf("import: %v, want %v", err, tc.want)
					}
					if tc.want != nil && !strings.Contains(err.Error(), "rule 1") {
						t.Errorf("error %q does not name rule 1", err)
					}
					if got := ruleIDs(t, s); got != tc.left {
						t.Errorf("rules %s, want %s", got, tc.left)
					}
					entries, _ := s.Audit(ctx, AuditFilter{})
					if len(entries) != 1+tc.added {
						t.Errorf("%d audit entries, want %d", len(entries), 1+tc.added)
					}
					for _, e := range entries[:tc.added] {
						if e.Action != ActionImport || e.Before != nil || e.After == nil || e.Actor != "token-import" || e.Reason != "spring list" {
							t.Errorf("import entry %+v", e)
						}
					}
				})
			}
		})
	}
}

// TestReplaceRules: removed rules are deleted, changed ones updated,
// unchanged ones untouched, new ones added; one import entry per change in
// ID order; a bad rule changes nothing.
func TestReplaceRules(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			for _, r := range []Rule{testRule("a", "pin", "sluice"), testRule("b", "pin", "weir"), testRule("c", "block", "silt")} {
				if _, err := s.CreateRule(ctx, r, "demo", ""); err != nil {
					t.Fatal(err)
				}
			}
			v0, _ := s.RulesVersion(ctx)
			bad := []Rule{testRule("a", "pin", "sluice"), {ID: "z", Kind: "pin"}}
			if err := s.ReplaceRules(ctx, bad, "demo", ""); !errors.Is(err, ErrInvalid) {
				t.Fatalf("bad replace: %v, want ErrInvalid", err)
			}
			if v, _ := s.RulesVersion(ctx); v != v0 {
				t.Fatalf("bad replace moved RulesVersion %d -> %d", v0, v)
			}
			next := []Rule{testRule("a", "pin", "sluice"), testRule("b", "pin", "weir gate"), testRule("d", "relate", "intake")}
			next[0].Version = 77 // ignored: replace is not a versioned edit
			if err := s.ReplaceRules(ctx, next, "token-sync", "nightly list"); err != nil {
				t.Fatal(err)
			}
			if got, want := ruleIDs(t, s), "a:sluice@1,b:weir gate@2,d:intake@1"; got != want {
				t.Errorf("rules %s, want %s", got, want)
			}
			entries, _ := s.Audit(ctx, AuditFilter{Limit: 3})
			var got []string
			for _, e := range entries {
				got = append(got, e.RuleID+":"+e.Action+":"+state(e.Before)+">"+state(e.After))
			}
			want := "d:import:-" + ">intake,c:import:silt>-,b:import:weir>weir gate"
			if strings.Join(got, ",") != want {
				t.Errorf("audit %v, want %s", got, want)
			}
			// Reverting the import's deletion brings c back.
			if _, err := s.Revert(ctx, entries[1].Seq, "demo", "keep c"); err != nil {
				t.Fatal(err)
			}
			if r, err := s.Rule(ctx, "c"); err != nil || r.Term != "silt" || r.Version != 2 {
				t.Errorf("reverted c = %+v, %v; want silt@2", r, err)
			}
		})
	}
}

func state(r *Rule) string {
	if r == nil {
		return "-"
	}
	return r.Term
}

// TestAuditOrderAndPaging: entries come newest first with strictly
// decreasing Seq; RuleID and Before filter; Before pages without overlap.
func TestAuditOrderAndPaging(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			for i, id := range []string{"r1", "r2", "r1", "r2", "r1"} {
				var err error
				if r, e := s.Rule(ctx, id); e == nil {
					r.Term = "t" + itoa(int64(i))
					_, err = s.UpdateRule(ctx, r, "demo", "step "+itoa(int64(i)))
				} else {
					_, err = s.CreateRule(ctx, testRule(id, "pin", "t"+itoa(int64(i))), "demo", "step "+itoa(int64(i)))
				}
				if err != nil {
					t.Fatal(err)
				}
			}
			all, err := s.Audit(ctx, AuditFilter{})
			if err != nil || len(all) != 5 {
				t.Fatalf("audit: %d entries, %v; want 5", len(all), err)
			}
			for i, e := range all {
				if want := "step " + itoa(int64(4-i)); e.Reason != want {
					t.Errorf("entry %d reason %q, want %q (newest first)", i, e.Reason, want)
				}
				if i > 0 && (e.Seq >= all[i-1].Seq) {
					t.Errorf("entry %d seq %d not below entry %d", i, e.Seq, i-1)
				}
			}
			if v, _ := s.RulesVersion(ctx); v != all[0].Seq {
				t.Errorf("RulesVersion %d, want newest seq %d", v, all[0].Seq)
			}
			r1, _ := s.Audit(ctx, AuditFilter{RuleID: "r1"})
			if len(r1) != 3 || r1[0].After.Term != "t4" || r1[2].Action != ActionCreate || r1[0].Before.Term != "t2" {
				t.Errorf("r1 history %+v", r1)
			}
			page1, _ := s.Audit(ctx, AuditFilter{Limit: 2})
			page2, _ := s.Audit(ctx, AuditFilter{Limit: 2, Before: page1[1].Seq})
			page3, _ := s.Audit(ctx, AuditFilter{Limit: 2, Before: page2[1].Seq})
			var seqs []int64
			for _, p := range [][]AuditEntry{page1, page2, page3} {
				for _, e := range p {
					seqs = append(seqs, e.Seq)
				}
			}
			if len(seqs) != 5 || seqs[0] != all[0].Seq || seqs[4] != all[4].Seq {
				t.Errorf("paged seqs %v, want the 5 of %v", seqs, all)
			}
		})
	}
}

// FuzzRuleRecord: the audit log's JSON form of a structurally valid rule
// decodes to the same rule (encoding/json round trip, RFC 8259).
func FuzzRuleRecord(f *testing.F) {
	f.Add("r1", "pin", "pump maintenance", "sluice", "operations", "seasonal", "en", int64(0), int64(1767225600123456789), int64(3))
	f.Add("", "block", "", "é✓\U0001F4A7", "", "quote\" back\\slash", "", int64(-5), int64(0), int64(1))
	f.Fuzz(func(t *testing.T, id, kind, query, term, dept, reason, lang string, start, expiry, version int64) {
		r := Rule{ID: id, Kind: kind, Query: query, Term: term, Department: dept, Reason: reason, Lang: lang,
			Version: version, Updated: time.Unix(0, expiry^start).UTC()}
		if start != 0 {
			r.Start = time.Unix(0, start).UTC()
		}
		if expiry != 0 {
			r.Expiry = time.Unix(0, expiry).UTC()
		}
		if validateRule(&r, false) != nil {
			return
		}
		back, err := decodeRule(encodeRule(&r))
		if err != nil || back == nil || *back != r {
			t.Fatalf("round trip of %+v gave %+v, %v", r, back, err)
		}
	})
}

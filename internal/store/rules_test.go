package store

import (
	"context"
	"errors"
	"maps"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"
)

func testRule(id, kind, term string) Rule {
	return Rule{ID: id, Kind: kind, Query: "pump maintenance", Term: term, Department: "operations",
		Reason: "seasonal works", Lang: "en"}
}

// chain is the state a sequence of rule operations passes along: the
// audit seq of every labelled step.
type chain map[string]int64

type ruleStep struct {
	label string // records the step's audit seq (RulesVersion after it) under this label
	do    func(ctx context.Context, s *Store, c chain) error
	want  error // nil, or the sentinel the error must wrap
}

func create(r Rule) func(context.Context, *Store, chain) error {
	return func(ctx context.Context, s *Store, _ chain) error {
		_, err := s.CreateRule(ctx, r, "token-librarian", "new rule")
		return err
	}
}

func update(id string, version int64, term string) func(context.Context, *Store, chain) error {
	return func(ctx context.Context, s *Store, _ chain) error {
		r := testRule(id, "pin", term)
		r.Version = version
		_, err := s.UpdateRule(ctx, r, "token-librarian", "reword")
		return err
	}
}

func del(id string, version int64) func(context.Context, *Store, chain) error {
	return func(ctx context.Context, s *Store, _ chain) error {
		return s.DeleteRule(ctx, id, version, "demo", "no longer needed")
	}
}

func revert(label string) func(context.Context, *Store, chain) error {
	return func(ctx context.Context, s *Store, c chain) error {
		seq, ok := c[label]
		if !ok {
			seq = 999999
		}
		_, err := s.Revert(ctx, seq, "token-admin", "undo "+label)
		return err
	}
}

// TestRuleChains runs create/update/delete/revert chains. The expected
// behaviour is the API contract: optimistic concurrency with a version
// that must match (the compare-and-set pattern of HTTP If-Match, Fielding
// et al. 2022, RFC 9110 section 13.1.1) and revert as a new, audited change.
func TestRuleChains(t *testing.T) {
	cases := []struct {
		name    string
		steps   []ruleStep
		want    map[string]string // rule id -> "term@version"
		actions []string          // audit actions, newest first
	}{
		{"create update delete", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"u", update("r1", 1, "spillway"), nil},
			{"d", del("r1", 2), nil},
		}, map[string]string{}, []string{"delete", "update", "create"}},
		{"revert update restores content, bumps version", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"u", update("r1", 1, "spillway"), nil},
			{"v", revert("u"), nil},
		}, map[string]string{"r1": "sluice@3"}, []string{"revert", "update", "create"}},
		{"revert create deletes", []ruleStep{
			{"c", create(testRule("r1", "block", "sluice")), nil},
			{"v", revert("c"), nil},
		}, map[string]string{}, []string{"revert", "create"}},
		{"revert delete re-creates with next version", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"d", del("r1", 1), nil},
			{"v", revert("d"), nil},
		}, map[string]string{"r1": "sluice@2"}, []string{"revert", "delete", "create"}},
		{"revert of a revert redoes", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"u", update("r1", 1, "spillway"), nil},
			{"v", revert("u"), nil},
			{"w", revert("v"), nil},
		}, map[string]string{"r1": "spillway@4"}, []string{"revert", "revert", "update", "create"}},
		{"stale update conflicts", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"u", update("r1", 1, "spillway"), nil},
			{"x", update("r1", 1, "weir"), ErrConflict},
		}, map[string]string{"r1": "spillway@2"}, []string{"update", "create"}},
		{"stale delete conflicts", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"u", update("r1", 1, "spillway"), nil},
			{"x", del("r1", 1), ErrConflict},
		}, map[string]string{"r1": "spillway@2"}, []string{"update", "create"}},
		{"revert after a later change conflicts", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"u", update("r1", 1, "spillway"), nil},
			{"u2", update("r1", 2, "weir"), nil},
			{"x", revert("u"), ErrConflict},
		}, map[string]string{"r1": "weir@3"}, []string{"update", "update", "create"}},
		{"revert create after delete conflicts", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"d", del("r1", 1), nil},
			{"x", revert("c"), ErrConflict},
		}, map[string]string{}, []string{"delete", "create"}},
		{"revert delete after re-creation conflicts", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"d", del("r1", 1), nil},
			{"c2", create(testRule("r1", "pin", "weir")), nil},
			{"x", revert("d"), ErrConflict},
		}, map[string]string{"r1": "weir@2"}, []string{"create", "delete", "create"}},
		{"re-created id continues numbering", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"u", update("r1", 1, "spillway"), nil},
			{"d", del("r1", 2), nil},
			{"c2", create(testRule("r1", "pin", "weir")), nil},
			{"x", update("r1", 1, "sluice"), ErrConflict},
		}, map[string]string{"r1": "weir@3"}, []string{"create", "delete", "update", "create"}},
		{"duplicate id conflicts", []ruleStep{
			{"c", create(testRule("r1", "pin", "sluice")), nil},
			{"x", create(testRule("r1", "block", "weir")), ErrConflict},
		}, map[string]string{"r1": "sluice@1"}, []string{"create"}},
		{"unknown rule and entry", []ruleStep{
			{"x", update("nope", 1, "weir"), ErrRuleNotFound},
			{"y", del("nope", 1), ErrRuleNotFound},
			{"z", revert("missing"), ErrRuleNotFound},
		}, map[string]string{}, nil},
	}
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			for _, tc := range cases {
				t.Run(tc.name, func(t *testing.T) {
					s := openTest(t, b)
					ctx := context.Background()
					c := chain{}
					for _, st := range tc.steps {
						before, _ := s.RulesVersion(ctx)
						err := st.do(ctx, s, c)
						after, _ := s.RulesVersion(ctx)
						if st.want == nil && err != nil || st.want != nil && !errors.Is(err, st.want) {
							t.Fatalf("step %s: err %v, want %v", st.label, err, st.want)
						}
						if err != nil && after != before {
							t.Errorf("step %s failed but RulesVersion moved %d -> %d", st.label, before, after)
						}
						if err == nil {
							if after <= before {
								t.Errorf("step %s: RulesVersion %d -> %d, want an increase", st.label, before, after)
							}
							c[st.label] = after
						}
					}
					rules, err := s.Rules(ctx)
					if err != nil {
						t.Fatal(err)
					}
					got := map[string]string{}
					for _, r := range rules {
						got[r.ID] = r.Term + "@" + itoa(r.Version)
					}
					if !maps.Equal(got, tc.want) {
						t.Errorf("rules %v, want %v", got, tc.want)
					}
					entries, err := s.Audit(ctx, AuditFilter{})
					if err != nil {
						t.Fatal(err)
					}
					var actions []string
					for _, e := range entries {
						actions = append(actions, e.Action)
					}
					if strings.Join(actions, ",") != strings.Join(tc.actions, ",") {
						t.Errorf("audit actions %v, want %v", actions, tc.actions)
					}
				})
			}
		})
	}
}

func TestRuleValidation(t *testing.T) {
	long := strings.Repeat("q", MaxRuleFieldBytes+1)
	ok := testRule("", "pin", "sluice")
	cases := []struct {
		name   string
		r      Rule
		actor  string
		detail string
	}{
		{"missing kind", Rule{Term: "sluice"}, "demo", "missing kind"},
		{"missing term", Rule{Kind: "pin", Term: "  "}, "demo", "missing term"},
		{"query over 200 bytes", Rule{Kind: "pin", Term: "t", Query: long}, "demo", "query is 201 bytes"},
		// 0xFF never appears in UTF-8 (Yergeau 2003, RFC 3629, section 1).
		{"invalid utf-8", Rule{Kind: "pin", Term: "t\xff"}, "demo", "term is not valid UTF-8"},
		{"nul byte", Rule{Kind: "pin", Term: "t", Reason: "a\x00b"}, "demo", "reason contains a NUL byte"},
		{"expiry out of range", Rule{Kind: "pin", Term: "t", Expiry: time.Date(2300, 1, 1, 0, 0, 0, 0, time.UTC)}, "demo", "expiry"},
		{"missing actor", ok, "", "missing actor"},
		{"actor over 200 bytes", ok, long, "actor is 201 bytes"},
	}
	s := openTest(t, backend{name: "sqlite", dsn: sqliteDSN})
	ctx := context.Background()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := s.CreateRule(ctx, tc.r, tc.actor, "why")
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), tc.detail) {
				t.Errorf("err %v, want ErrInvalid naming %q", err, tc.detail)
			}
			if !strings.HasPrefix(err.Error(), "store: create rule: ") {
				t.Errorf("err %q lacks the package prefix", err)
			}
		})
	}
	if n, _ := s.RulesVersion(ctx); n != 0 {
		t.Errorf("rejected rules left %d audit entries", n)
	}
}

// TestRuleRoundTrip checks stored fields, assigned IDs and byte-order
// sorting (Go's string comparison is bytewise, Go specification,
// "Comparison operators"; a database collation may order "B" after "a").
func TestRuleRoundTrip(t *testing.T) {
	idPattern := regexp.MustCompile(`^r[0-9a-f]{12}$`)
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			in := testRule("", "relate", "penstock")
			in.Start = time.Date(2026, 4, 1, 6, 0, 0, 123456789, time.FixedZone("x", 3600))
			got, err := s.CreateRule(ctx, in, "demo", "")
			if err != nil {
				t.Fatal(err)
			}
			if !idPattern.MatchString(got.ID) || got.Version != 1 || got.Updated.IsZero() {
				t.Errorf("created %+v: want id r+12 hex, version 1, updated set", got)
			}
			back, err := s.Rule(ctx, got.ID)
			if err != nil {
				t.Fatal(err)
			}
			if !back.Start.Equal(in.Start) || !back.Expiry.IsZero() || !back.Updated.Equal(got.Updated) ||
				!sameContent(back, in) || back.Version != 1 {
				t.Errorf("read back %+v, want %+v", back, got)
			}
			if es, err := s.Audit(ctx, AuditFilter{RuleID: got.ID}); err != nil || len(es) != 1 || es[0].Before != nil ||
				*es[0].After != back || es[0].Actor != "demo" || !es[0].At.Equal(back.Updated) {
				t.Errorf("audit of the creation = %+v, %v; want one entry whose After is %+v", es, err, back)
			}
			for _, id := range []string{"b", "B", "a", "_"} {
				if _, err := s.CreateRule(ctx, testRule(id, "pin", "t"), "demo", ""); err != nil {
					t.Fatal(err)
				}
			}
			rules, _ := s.Rules(ctx)
			var ids []string
			for _, r := range rules {
				ids = append(ids, r.ID)
			}
			if want := "B,_,a,b," + got.ID; strings.Join(ids, ",") != want {
				t.Errorf("ids %v, want %s", ids, want)
			}
			if _, err := s.Rule(ctx, "zz"); !errors.Is(err, ErrRuleNotFound) {
				t.Errorf("missing rule: %v, want ErrRuleNotFound", err)
			}
		})
	}
}

// TestRuleConcurrentUpdates: of several writers holding the same version
// exactly one wins (compare-and-set, RFC 9110 section 13.1.1).
func TestRuleConcurrentUpdates(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			if _, err := s.CreateRule(ctx, testRule("r1", "pin", "sluice"), "demo", ""); err != nil {
				t.Fatal(err)
			}
			const n = 6
			errs := make([]error, n)
			var wg sync.WaitGroup
			for i := range n {
				wg.Go(func() { errs[i] = update("r1", 1, "term"+itoa(int64(i)))(ctx, s, nil) })
			}
			wg.Wait()
			wins := 0
			for _, err := range errs {
				switch {
				case err == nil:
					wins++
				case !errors.Is(err, ErrConflict):
					t.Errorf("unexpected error %v", err)
				}
			}
			r, _ := s.Rule(ctx, "r1")
			if entries, _ := s.Audit(ctx, AuditFilter{}); wins != 1 || r.Version != 2 || len(entries) != 2 {
				t.Errorf("wins %d, version %d, audit entries %d; want 1, 2, 2", wins, r.Version, len(entries))
			}
		})
	}
}

func TestRulesClosedStore(t *testing.T) {
	s, err := Open(context.Background(), sqliteDSN(t))
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	if _, err := s.CreateRule(context.Background(), testRule("r1", "pin", "t"), "demo", ""); !errors.Is(err, ErrUnavailable) {
		t.Errorf("create on closed store: %v, want ErrUnavailable", err)
	}
	if _, err := s.Rules(context.Background()); !errors.Is(err, ErrUnavailable) {
		t.Errorf("rules on closed store: %v, want ErrUnavailable", err)
	}
}

func itoa(v int64) string { return strconv.FormatInt(v, 10) }

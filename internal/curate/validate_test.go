package curate

import (
	"errors"
	"strings"
	"testing"
	"time"
)

var (
	jan = time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	feb = time.Date(2026, 2, 1, 0, 0, 0, 0, time.UTC)
	mar = time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC)
)

func TestValidate(t *testing.T) {
	known := NewDepartmentSet("ops", "billing")
	ok := Rule{Kind: Pin, Query: "burst pipes", Term: "emergency repairs"}
	with := func(f func(*Rule)) Rule { r := ok; f(&r); return r }
	cases := []struct {
		name  string
		rule  Rule
		known Departments
		field string // "" = valid
	}{
		{"valid pin", ok, known, ""},
		{"valid block without query", Rule{Kind: Block, Term: "leak"}, known, ""},
		{"valid department", with(func(r *Rule) { r.Department = "ops" }), known, ""},
		{"nil departments accept any", with(func(r *Rule) { r.Department = "anything" }), nil, ""},
		{"empty set accepts any", with(func(r *Rule) { r.Department = "anything" }), DepartmentSet{}, ""},
		{"unknown department", with(func(r *Rule) { r.Department = "marketing" }), known, "department"},
		{"unknown kind", with(func(r *Rule) { r.Kind = "promote" }), known, "kind"},
		{"empty term", with(func(r *Rule) { r.Term = "" }), known, "term"},
		{"pin needs a query", with(func(r *Rule) { r.Query = "" }), known, "query"},
		{"use needs a query", Rule{Kind: Use, Term: "supply interruption"}, known, "query"},
		{"term of 101 bytes", with(func(r *Rule) { r.Term = strings.Repeat("a", 101) }), known, "term"},
		{"term of 100 bytes", with(func(r *Rule) { r.Term = strings.Repeat("a", 100) }), known, ""},
		{"query of 7 words", with(func(r *Rule) { r.Query = "one two three four five six seven" }), known, "query"},
		{"query of 6 words", with(func(r *Rule) { r.Query = "one two three four five six" }), known, ""},
		{"hyphenated words count apart", with(func(r *Rule) { r.Term = "a-b c-d e-f g" }), known, ""},
		{"control character", with(func(r *Rule) { r.Term = "burst\tpipe" }), known, "term"},
		{"newline in reason", with(func(r *Rule) { r.Reason = "line\nbreak" }), known, "reason"},
		{"invalid UTF-8", with(func(r *Rule) { r.Query = "burst \xff" }), known, "query"},
		{"no words", with(func(r *Rule) { r.Term = "!!!" }), known, "term"},
		{"surrounding space", with(func(r *Rule) { r.Term = " leak" }), known, "term"},
		{"formula prefix", with(func(r *Rule) { r.Term = "=HYPERLINK(1)" }), known, "term"},
		{"query equals term folded", with(func(r *Rule) { r.Term = "Burst Pipes" }), known, "term"},
		{"expiry before start", with(func(r *Rule) { r.Start, r.Expiry = feb, jan }), known, "expiry"},
		{"expiry equal to start", with(func(r *Rule) { r.Start, r.Expiry = feb, feb }), known, "expiry"},
		{"expiry after start", with(func(r *Rule) { r.Start, r.Expiry = jan, feb }), known, ""},
		{"reason too long", with(func(r *Rule) { r.Reason = strings.Repeat("x", 501) }), known, "reason"},
		// Language tags: RFC 5646 (Phillips & Davis, 2009) section 2.1 and
		// its appendix A examples "fr", "zh-hant", "sr-latn-rs", "es-419"
		// (from memory); Kinword requires lower case.
		{"lang fr", with(func(r *Rule) { r.Lang = "fr" }), known, ""},
		{"lang zh-hant", with(func(r *Rule) { r.Lang = "zh-hant" }), known, ""},
		{"lang sr-latn-rs", with(func(r *Rule) { r.Lang = "sr-latn-rs" }), known, ""},
		{"lang es-419", with(func(r *Rule) { r.Lang = "es-419" }), known, ""},
		{"lang upper case", with(func(r *Rule) { r.Lang = "en-GB" }), known, "lang"},
		{"lang digits first", with(func(r *Rule) { r.Lang = "419" }), known, "lang"},
		{"lang empty subtag", with(func(r *Rule) { r.Lang = "en--gb" }), known, "lang"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.rule.Validate(c.known)
			if c.field == "" {
				if err != nil {
					t.Fatalf("want valid, got %v", err)
				}
				return
			}
			var p Problem
			if !errors.As(err, &p) || !errors.Is(err, ErrInvalid) {
				t.Fatalf("want a Problem wrapping ErrInvalid, got %v", err)
			}
			if p.Field != c.field {
				t.Errorf("field %q, want %q (%v)", p.Field, c.field, err)
			}
			if !strings.HasPrefix(err.Error(), "curate: invalid rule: ") {
				t.Errorf("message %q lacks the package prefix and sentinel", err)
			}
		})
	}
}

func TestValidateSet(t *testing.T) {
	p := defaultPipeline()
	pin := func(q, term, dept string) Rule { return Rule{Kind: Pin, Query: q, Term: term, Department: dept} }
	block := func(q, term, dept string) Rule { return Rule{Kind: Block, Query: q, Term: term, Department: dept} }
	use := func(q, term, dept string) Rule { return Rule{Kind: Use, Query: q, Term: term, Department: dept} }
	dated := func(r Rule, start, expiry time.Time) Rule { r.Start, r.Expiry = start, expiry; return r }
	type want struct {
		index int
		err   error
	}
	cases := []struct {
		name  string
		rules []Rule
		want  []want
	}{
		{"sound set", []Rule{pin("burst pipes", "emergency repairs", ""), block("", "leak", "ops")}, nil},
		{"stopword term", []Rule{pin("burst pipes", "the", "")}, []want{{0, ErrInvalid}}},
		{"stopword query", []Rule{pin("of the", "leak", "")}, []want{{0, ErrInvalid}}},
		{"same stem key", []Rule{Rule{Kind: Relate, Query: "burst pipes", Term: "Burst pipe"}}, []want{{0, ErrInvalid}}},
		{"duplicate by stems", []Rule{pin("burst pipes", "leaks", ""), pin("Burst pipe", "leak", "")}, []want{{1, ErrInvalid}}},
		{"same rule other department", []Rule{pin("burst pipes", "leak", "ops"), pin("burst pipes", "leak", "billing")}, nil},
		{"same rule other dates", []Rule{dated(pin("burst pipes", "leak", ""), jan, feb), dated(pin("burst pipes", "leak", ""), feb, mar)}, nil},
		{"pin and global block", []Rule{pin("burst pipes", "leak", ""), block("", "leaks", "")}, []want{{1, ErrContradiction}}},
		{"pin and block same query", []Rule{block("burst pipes", "leak", "ops"), pin("pipe burst", "leak", "ops")}, []want{{1, ErrContradiction}}},
		{"block query among pin's", []Rule{pin("burst pipes school", "leak", ""), block("school", "leak", "")}, []want{{1, ErrContradiction}}},
		{"block more specific than pin", []Rule{pin("burst pipes", "leak", ""), block("burst pipes school", "leak", "")}, nil},
		{"pin and block other departments", []Rule{pin("burst pipes", "leak", "ops"), block("", "leak", "")}, nil},
		{"pin and block apart in time", []Rule{dated(pin("burst pipes", "leak", ""), jan, feb), dated(block("", "leak", ""), feb, time.Time{})}, nil},
		{"pin and block overlapping in time", []Rule{dated(pin("burst pipes", "leak", ""), jan, mar), dated(block("", "leak", ""), feb, time.Time{})}, []want{{1, ErrContradiction}}},
		// ANSI/NISO Z39.19-2005 (NISO, 2005) section 8.2: a non-preferred
		// term leads to one preferred term, so USE must not loop (from
		// memory).
		{"use cycle", []Rule{use("water outage", "supply interruption", ""), use("supply interruptions", "water outages", "")}, []want{{0, ErrContradiction}, {1, ErrContradiction}}},
		{"use cycle of three", []Rule{use("outage", "interruption", ""), use("interruption", "stoppage", ""), use("stoppage", "outage", "")},
			[]want{{0, ErrContradiction}, {1, ErrContradiction}, {2, ErrContradiction}}},
		{"use cycle through a department", []Rule{use("outage", "interruption", ""), use("interruption", "outage", "ops")}, []want{{0, ErrContradiction}, {1, ErrContradiction}}},
		{"use loop split over departments", []Rule{use("outage", "interruption", "billing"), use("interruption", "outage", "ops")}, nil},
		{"use chain is no cycle", []Rule{use("outage", "interruption", ""), use("interruption", "stoppage", "")}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ps := ValidateSet(c.rules, nil, p)
			if len(ps) != len(c.want) {
				t.Fatalf("got %d problems %v, want %d", len(ps), ps, len(c.want))
			}
			for i, w := range c.want {
				if ps[i].Index != w.index || !errors.Is(ps[i], w.err) {
					t.Errorf("problem %d: %v (index %d), want index %d wrapping %v", i, ps[i], ps[i].Index, w.index, w.err)
				}
			}
		})
	}
}

func TestValidateSetReportsUnknownDepartment(t *testing.T) {
	ps := ValidateSet([]Rule{{ID: "r1", Kind: Block, Term: "leak", Department: "marketing"}}, NewDepartmentSet("ops"), defaultPipeline())
	if len(ps) != 1 || ps[0].Field != "department" || ps[0].ID != "r1" || !errors.Is(ps[0], ErrInvalid) {
		t.Fatalf("got %v", ps)
	}
	if !strings.Contains(ps[0].Error(), "rule r1: department: unknown department") {
		t.Errorf("message %q", ps[0].Error())
	}
}

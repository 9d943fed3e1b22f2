package curate

import (
	"errors"
	"fmt"
	"slices"
	"strings"
	"testing"
	"time"
)

// summary renders an Effect compactly: "pins=a,b relates=... refine=key/relation
// equiv=... blocked=... rules=...".
func summary(e Effect) string {
	keys := func(os []Offer, rel bool) string {
		var s []string
		for _, o := range os {
			if rel {
				s = append(s, o.Key+"/"+o.Relation)
			} else {
				s = append(s, o.Key)
			}
		}
		return strings.Join(s, ",")
	}
	return fmt.Sprintf("pins=%s relates=%s refine=%s equiv=%s blocked=%s rules=%s",
		keys(e.Pins, false), keys(e.Relates, false), keys(e.Refinements, true), keys(e.Equivalents, false),
		strings.Join(sortedKeys(e.Blocked), ","), strings.Join(e.Rules, ","))
}

func TestForKinds(t *testing.T) {
	rules := []Rule{
		{ID: "pin", Kind: Pin, Query: "burst pipes", Term: "emergency repairs"},
		{ID: "rel", Kind: Relate, Query: "burst pipes", Term: "water main"},
		{ID: "brd", Kind: Broader, Query: "burst pipes", Term: "pipe failures"},
		{ID: "nrw", Kind: Narrower, Query: "pipe failures", Term: "frozen pipes"},
		{ID: "use", Kind: Use, Query: "water outage", Term: "supply interruption"},
		{ID: "blk", Kind: Block, Term: "leak"},
		{ID: "blq", Kind: Block, Query: "meter", Term: "smart meter"},
	}
	set, err := Compile(rules, nil)
	if err != nil {
		t.Fatal(err)
	}
	p := defaultPipeline()
	cases := []struct{ name, query, want string }{
		// The rule query's stems need only be contained in the query's,
		// in any order ("pipe burst" for "burst pipes"; "near" is a
		// stopword).
		{"contained stems", "pipe burst near school",
			"pins=emerg repair relates=water main refine=pipe failur/broader equiv= blocked=leak rules=blk,brd,pin,rel"},
		{"missing stem", "burst mains", "pins= relates= refine= equiv= blocked=leak rules=blk"},
		{"narrower", "pipe failures", "pins= relates= refine=frozen pipe/narrower equiv= blocked=leak rules=blk,nrw"},
		{"use adds the preferred term", "water outages in Tarnwick", "pins= relates= refine= equiv=suppli interrupt blocked=leak rules=blk,use"},
		{"block with a query", "meter reading", "pins= relates= refine= equiv= blocked=leak,smart meter rules=blk,blq"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := summary(set.For("", p.Terms(c.query, ""), jan)); got != c.want {
				t.Errorf("got  %s\nwant %s", got, c.want)
			}
		})
	}
	e := set.For("", p.Terms("burst pipes", ""), jan)
	if o := e.Pins[0]; o.Display != "emergency repairs" || o.RuleID != "pin" || o.Relation != "pin" {
		t.Errorf("offer %+v", o)
	}
	if !e.Blocks("leak") || e.Blocks("emerg repair") {
		t.Errorf("Blocks: leak %v, emerg repair %v", e.Blocks("leak"), e.Blocks("emerg repair"))
	}
}

func TestForScopeAndPrecedence(t *testing.T) {
	p := defaultPipeline()
	cases := []struct {
		name        string
		rules       []Rule
		dept, query string
		want        string
	}{
		{"department rule stays in its department",
			[]Rule{{ID: "d", Kind: Pin, Query: "burst", Term: "leak", Department: "ops"}},
			"billing", "burst", "pins= relates= refine= equiv= blocked= rules="},
		{"no department sees organisation rules only",
			[]Rule{{ID: "d", Kind: Pin, Query: "burst", Term: "leak", Department: "ops"}, {ID: "o", Kind: Relate, Query: "burst", Term: "main"}},
			"", "burst", "pins= relates=main refine= equiv= blocked= rules=o"},
		{"department block beats organisation pin",
			[]Rule{{ID: "o", Kind: Pin, Query: "burst", Term: "leak"}, {ID: "d", Kind: Block, Term: "leaks", Department: "ops"}},
			"ops", "burst", "pins= relates= refine= equiv= blocked=leak rules=d"},
		{"organisation pin elsewhere",
			[]Rule{{ID: "o", Kind: Pin, Query: "burst", Term: "leak"}, {ID: "d", Kind: Block, Term: "leaks", Department: "ops"}},
			"billing", "burst", "pins=leak relates= refine= equiv= blocked= rules=o"},
		{"department pin beats organisation block",
			[]Rule{{ID: "o", Kind: Block, Term: "leak"}, {ID: "d", Kind: Pin, Query: "burst", Term: "leak", Department: "ops"}},
			"ops", "burst", "pins=leak relates= refine= equiv= blocked= rules=d"},
		{"organisation block holds where the department rule does not fire",
			[]Rule{{ID: "o", Kind: Block, Term: "leak"}, {ID: "d", Kind: Pin, Query: "burst", Term: "leak", Department: "ops"}},
			"ops", "meter", "pins= relates= refine= equiv= blocked=leak rules=o"},
		{"block beats pin within a scope",
			[]Rule{{ID: "p", Kind: Pin, Query: "burst", Term: "leak"}, {ID: "b", Kind: Block, Query: "burst school", Term: "leak"}},
			"", "burst school", "pins= relates= refine= equiv= blocked=leak rules=b"},
		{"block removes equivalents too",
			[]Rule{{ID: "u", Kind: Use, Query: "outage", Term: "interruption"}, {ID: "b", Kind: Block, Term: "interruption", Department: "ops"}},
			"ops", "outage", "pins= relates= refine= equiv= blocked=interrupt rules=b"},
		{"department offer first, one per key",
			[]Rule{{ID: "o", Kind: Pin, Query: "burst", Term: "leak"}, {ID: "d", Kind: Pin, Query: "burst", Term: "leaks", Department: "ops"}},
			"ops", "burst", "pins=leak relates= refine= equiv= blocked= rules=d,o"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			set, err := Compile(c.rules, p)
			if err != nil {
				t.Fatal(err)
			}
			e := set.For(c.dept, p.Terms(c.query, ""), jan)
			if got := summary(e); got != c.want {
				t.Errorf("got  %s\nwant %s", got, c.want)
			}
			if c.name == "department offer first, one per key" && e.Pins[0].Department != "ops" {
				t.Errorf("first pin %+v, want the department's", e.Pins[0])
			}
		})
	}
}

func TestForDates(t *testing.T) {
	p := defaultPipeline()
	set, err := Compile([]Rule{{ID: "w", Kind: Pin, Query: "frozen", Term: "winter advice", Start: feb, Expiry: mar}}, p)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		now  time.Time
		want bool
	}{
		{"before start", feb.Add(-time.Nanosecond), false},
		{"at start (inclusive)", feb, true},
		{"inside", feb.Add(24 * time.Hour), true},
		{"at expiry (exclusive)", mar, false},
		{"after expiry", mar.Add(time.Hour), false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := len(set.For("", p.Terms("frozen pipes", ""), c.now).Pins) == 1
			if got != c.want {
				t.Errorf("fired %v, want %v", got, c.want)
			}
		})
	}
}

func TestCompileRejectsInvalidSets(t *testing.T) {
	_, err := Compile([]Rule{{Kind: Pin, Query: "burst", Term: "leak"}, {Kind: Block, Term: "leak"}}, nil)
	if !errors.Is(err, ErrContradiction) {
		t.Errorf("contradiction: got %v", err)
	}
	_, err = Compile([]Rule{{Kind: "promote", Query: "burst", Term: "leak"}}, nil)
	if !errors.Is(err, ErrInvalid) || !strings.HasPrefix(err.Error(), "curate: compile") {
		t.Errorf("invalid: got %v", err)
	}
	set, err := Compile([]Rule{{Kind: Pin, Query: "burst", Term: "leak"}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := set.For("", []string{"burst"}, jan).Rules; !slices.Equal(got, []string{ContentID(Rule{Kind: Pin, Query: "burst", Term: "leak"})}) {
		t.Errorf("rule without ID: Rules %v, want its ContentID", got)
	}
}

// A Set is read-only after Compile: concurrent For calls share it (run
// with -race).
func TestForConcurrent(t *testing.T) {
	set, err := Compile(tarnwickRules(), nil)
	if err != nil {
		t.Fatal(err)
	}
	q := defaultPipeline().Terms("burst pipes near the meter", "")
	want := summary(set.For("ops", q, jan))
	done := make(chan string)
	for i := 0; i < 4; i++ {
		go func() { done <- summary(set.For("ops", q, jan)) }()
	}
	for i := 0; i < 4; i++ {
		if got := <-done; got != want {
			t.Errorf("concurrent For: %s, want %s", got, want)
		}
	}
	if !strings.Contains(want, "pins=emerg repair") || !strings.Contains(want, "blocked=smart meter") {
		t.Errorf("unexpected effect %s", want)
	}
}

// BenchmarkFor runs one query against 10,000 rules over 5 departments.
func BenchmarkFor(b *testing.B) {
	var rules []Rule
	kinds := []Kind{Pin, Relate, Use, Broader, Narrower}
	for i := 0; i < 10000; i++ {
		dept := ""
		if i%3 != 0 {
			dept = fmt.Sprintf("d%d", i%5)
		}
		rules = append(rules, Rule{Kind: kinds[i%len(kinds)], Department: dept,
			Query: fmt.Sprintf("w%d w%d", i%700, i%53), Term: fmt.Sprintf("t%d", i)})
	}
	set, err := Compile(rules, nil)
	if err != nil {
		b.Fatal(err)
	}
	q := []string{"w10", "w3", "school", "w699"}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		set.For("d1", q, jan)
	}
}

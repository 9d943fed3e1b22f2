package review

import (
	"fmt"
	"strconv"
	"strings"
	"testing"
	"time"
)

// TestRescue: a zero-hit impression whose accepted term is followed, in
// the same session within the window, by an impression with results for
// the same query or a query containing the term.
func TestRescue(t *testing.T) {
	base := []Event{
		shown("z", "s1", "operations", "sludge", at(0), 0, "dewatering", "digester"),
		accepted("z", "dewatering", at(10*time.Second)),
	}
	cases := []struct {
		name  string
		later []Event
		want  int
	}{
		{"same query with results", []Event{shown("j", "s1", "operations", "sludge", at(20*time.Second), 5, "x")}, 1},
		{"query containing the term", []Event{shown("j", "s1", "operations", "dewatering press", at(20*time.Second), 2)}, 1},
		{"term only as part of a word", []Event{shown("j", "s1", "operations", "dewateringpress", at(20*time.Second), 2)}, 0},
		{"later impression without results", []Event{shown("j", "s1", "operations", "sludge", at(20*time.Second), 0)}, 0},
		{"result count unknown", []Event{shown("j", "s1", "operations", "sludge", at(20*time.Second), -1)}, 0},
		{"other session", []Event{shown("j", "s2", "operations", "sludge", at(20*time.Second), 5)}, 0},
		{"past the window", []Event{shown("j", "s1", "operations", "sludge", at(31*time.Minute), 5)}, 0},
		{"before the accept", []Event{shown("j", "s1", "operations", "sludge", at(5*time.Second), 5)}, 0},
		{"two later impressions count once", []Event{
			shown("j", "s1", "operations", "sludge", at(20*time.Second), 5),
			shown("k", "s1", "operations", "sludge", at(40*time.Second), 5),
		}, 1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := Build(append(append([]Event{}, base...), tc.later...), Options{})
			got := 0
			for _, a := range r.Rescued {
				if a.Query != "sludge" || a.Term != "dewatering" || a.Impressions != 1 {
					t.Errorf("rescued row %+v", a)
				}
				want := RuleDraft{Kind: DraftPin, Query: "sludge", Term: "dewatering", Department: a.Department}
				if a.Draft != want {
					t.Errorf("draft %+v, want %+v", a.Draft, want)
				}
				got = a.Count
			}
			if tc.want > 0 && len(r.Rescued) != 2 || got != tc.want {
				t.Errorf("rescued %+v, want count %d overall and in operations", r.Rescued, tc.want)
			}
			var draftTerm string
			for _, a := range r.NoResults {
				if a.Query == "sludge" && a.Department == "" {
					draftTerm = a.Draft.Term
				}
			}
			if want := map[bool]string{true: "dewatering", false: ""}[tc.want > 0]; draftTerm != want {
				t.Errorf("no-results draft term %q, want %q", draftTerm, want)
			}
		})
	}
}

// many makes n impressions of (query, term) at position 0 in department
// dept, with the first acc accepted and the next dis dismissed.
func many(prefix, dept, query, term string, n, acc, dis int) []Event {
	var out []Event
	for i := range n {
		id := prefix + strconv.Itoa(i)
		when := at(time.Duration(i) * time.Minute)
		out = append(out, shown(id, "s"+id, dept, query, when, 3, term))
		switch {
		case i < acc:
			out = append(out, accepted(id, term, when.Add(time.Second)))
		case i < acc+dis:
			out = append(out, dismissed(id, term, when.Add(time.Second)))
		}
	}
	return out
}

func TestAttentionLists(t *testing.T) {
	var events []Event
	// 0 of 100 at position 0: Wilson upper bound z²/(n+z²) = 3.841459/103.841459
	// = 0.036994 < 0.05 (Wilson 1927's formula with k = 0).
	events = append(events, many("a", "operations", "pump", "impeller", 100, 0, 0)...)
	// 0 of 40: upper bound 3.841459/43.841459 = 0.087621, not below 0.05.
	events = append(events, many("b", "operations", "pump", "casing", 40, 0, 0)...)
	// 10 of 100 accepted, 30 of the rest dismissed: often dismissed (0.30).
	events = append(events, many("c", "operations", "pump", "volute", 100, 10, 30)...)
	// Below MinImpressions: never listed.
	events = append(events, many("d", "operations", "pump", "shaft", 10, 0, 10)...)
	events = append(events,
		shown("e1", "s9", "finance", "tariff", at(0), 4),
		shown("e2", "s9", "finance", "tariff", at(time.Minute), 0),
		shown("e3", "s9", "finance", "tariff", at(2*time.Minute), 4, "rate"))
	r := Build(events, Options{LowRate: 0.05})
	list := func(as []Attention) string {
		var s string
		for _, a := range as {
			s += fmt.Sprintf("[%s|%s|%s %d/%d %.4f %s]", a.Department, a.Query, a.Term, a.Count, a.Impressions, a.Rate+a.High, a.Draft.Kind)
		}
		return s
	}
	if got, want := list(r.RarelyAccepted), "[|pump|impeller 0/100 0.0370 block][operations|pump|impeller 0/100 0.0370 block]"; got != want {
		t.Errorf("rarely accepted %s\nwant %s", got, want)
	}
	if got, want := list(r.OftenDismissed), "[|pump|volute 30/100 0.3000 block][operations|pump|volute 30/100 0.3000 block]"; got != want {
		t.Errorf("often dismissed %s\nwant %s", got, want)
	}
	if got, want := list(r.NoSuggestions), "[|tariff| 2/3 0.6667 relate][finance|tariff| 2/3 0.6667 relate]"; got != want {
		t.Errorf("no suggestions %s\nwant %s", got, want)
	}
	if got, want := list(r.NoResults), "[|tariff| 1/3 0.3333 relate][finance|tariff| 1/3 0.3333 relate]"; got != want {
		t.Errorf("no results %s\nwant %s", got, want)
	}
	d := r.RarelyAccepted[1].Draft
	if d != (RuleDraft{Kind: DraftBlock, Query: "pump", Term: "impeller", Department: "operations"}) {
		t.Errorf("draft %+v", d)
	}
	// The default LowRate (0.10) lists casing too: 0.087621 < 0.10.
	if got := list(Build(events, Options{}).RarelyAccepted); !strings.Contains(got, "|pump|casing 0/40") {
		t.Errorf("default thresholds: rarely accepted %s lacks casing", got)
	}
	// Tighter thresholds move pairs on and off the lists.
	r = Build(events, Options{LowRate: 0.09, DismissRate: 0.5, MinImpressions: 10})
	if got, want := list(r.RarelyAccepted), "[|pump|impeller 0/100 0.0370 block][|pump|casing 0/40 0.0876 block]"; len(got) < len(want) || got[:len(want)] != want {
		t.Errorf("rarely accepted at 0.09: %s\nwant prefix %s", got, want)
	}
	if got, want := list(r.OftenDismissed), "[|pump|shaft 10/10 1.0000 block][operations|pump|shaft 10/10 1.0000 block]"; got != want {
		t.Errorf("often dismissed at 0.5: %s\nwant %s", got, want)
	}
}

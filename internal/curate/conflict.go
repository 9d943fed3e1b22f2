package curate

import (
	"fmt"
	"sort"
	"strings"
	"time"

	"kinword/internal/text"
)

// analysed is a rule with its stems worked out.
type analysed struct {
	Rule
	qKey, tKey string
	qStems     []string // sorted, distinct
}

// analyse computes the stem keys of r through p.
func analyse(r Rule, p *text.Pipeline) analysed {
	lang := pipelineLang(r.Lang)
	a := analysed{Rule: r, tKey: p.Key(r.Term, lang)}
	if r.Query != "" {
		a.qStems = p.Terms(r.Query, lang)
		a.qKey = strings.Join(a.qStems, " ")
		a.qStems = distinct(a.qStems)
	}
	return a
}

// distinct sorts s and drops repeats, in place.
func distinct(s []string) []string {
	sort.Strings(s)
	out := s[:0]
	for i, x := range s {
		if i == 0 || x != s[i-1] {
			out = append(out, x)
		}
	}
	return out
}

// ValidateSet checks rules as a set and returns every problem, sorted by
// index then field (nil when the set is sound). Beyond each rule's Validate
// (against known; nil accepts any department) it checks, with stems from p:
//   - a term, or a query, that analyses to no stems (only stopwords);
//   - query and term with the same stem key;
//   - duplicates: same kind, department, query and term stem keys, start and
//     expiry (ErrInvalid, reported on the later rule);
//   - a pin and a block of the same term key in the same department with
//     overlapping date ranges where the block's query stems are all among the
//     pin's (an empty or equal block query included), so the block would fire
//     whenever the pin does (ErrContradiction, on the later rule);
//   - a cycle of use rules (A use B, B use A, or longer) among the rules that
//     apply together to one department: the organisation's and that
//     department's, dates not considered (ErrContradiction, on every rule of
//     the cycle).
//
// A nil p means an English pipeline.
func ValidateSet(rules []Rule, known Departments, p *text.Pipeline) []Problem {
	if p == nil {
		p = defaultPipeline()
	}
	var out []Problem
	ok := make([]analysed, 0, len(rules))
	okIdx := make([]int, 0, len(rules))
	for i, r := range rules {
		ps := r.problems(i, known)
		if len(ps) == 0 {
			a := analyse(r, p)
			add := func(field, msg string) {
				ps = append(ps, Problem{Index: i, ID: r.ID, Field: field, Message: msg, Err: ErrInvalid})
			}
			switch {
			case a.tKey == "":
				add("term", "analyses to no stems (only stopwords)")
			case r.Query != "" && a.qKey == "":
				add("query", "analyses to no stems (only stopwords)")
			case r.Query != "" && a.qKey == a.tKey:
				add("term", fmt.Sprintf("same stem key %q as the query", a.tKey))
			}
			if len(ps) == 0 {
				ok = append(ok, a)
				okIdx = append(okIdx, i)
			}
		}
		out = append(out, ps...)
	}
	out = append(out, setProblems(ok, okIdx)...)
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].Index != out[j].Index {
			return out[i].Index < out[j].Index
		}
		if out[i].Field != out[j].Field {
			return out[i].Field < out[j].Field
		}
		return out[i].Message < out[j].Message
	})
	return out
}

// setProblems finds duplicates, pin/block contradictions and use cycles
// among individually sound rules; idx maps positions in as to input indexes.
func setProblems(as []analysed, idx []int) []Problem {
	var out []Problem
	problem := func(j int, err error, format string, args ...any) {
		out = append(out, Problem{Index: idx[j], ID: as[j].ID, Field: "rule", Message: fmt.Sprintf(format, args...), Err: err})
	}
	type sig struct {
		kind                  Kind
		dept, qKey, tKey      string
		start, expiry         int64
		startZero, expiryZero bool
	}
	seen := make(map[sig]int, len(as))
	type scoped struct{ dept, tKey string }
	pins := make(map[scoped][]int)
	blocks := make(map[scoped][]int)
	for j, a := range as {
		s := sig{a.Kind, a.Department, a.qKey, a.tKey, a.Start.UnixNano(), a.Expiry.UnixNano(), a.Start.IsZero(), a.Expiry.IsZero()}
		if k, dup := seen[s]; dup {
			problem(j, ErrInvalid, "duplicate of rule %s", ref(as[k].Rule, idx[k]))
			continue
		}
		seen[s] = j
		switch a.Kind {
		case Pin:
			pins[scoped{a.Department, a.tKey}] = append(pins[scoped{a.Department, a.tKey}], j)
		case Block:
			blocks[scoped{a.Department, a.tKey}] = append(blocks[scoped{a.Department, a.tKey}], j)
		}
	}
	for sc, bs := range blocks {
		for _, b := range bs {
			for _, pn := range pins[sc] {
				if !overlap(as[pn].Rule, as[b].Rule) || !subset(as[b].qStems, as[pn].qStems) {
					continue
				}
				later, other := max(pn, b), min(pn, b)
				problem(later, ErrContradiction, "pin and block of %q in the same scope: contradicts rule %s", sc.tKey, ref(as[other].Rule, idx[other]))
			}
		}
	}
	for _, j := range useCycles(as) {
		problem(j, ErrContradiction, "use rule %q -> %q is on a cycle of use rules", as[j].qKey, as[j].tKey)
	}
	return out
}

// ref names a rule in a message: its ID, else its index.
func ref(r Rule, i int) string {
	if r.ID != "" {
		return r.ID
	}
	return fmt.Sprintf("#%d", i)
}

// overlap reports whether the date ranges [Start, Expiry) of a and b meet.
func overlap(a, b Rule) bool {
	return before(a.Start, b.Expiry) && before(b.Start, a.Expiry)
}

// before reports start < end with a zero start meaning the distant past and
// a zero end the distant future.
func before(start, end time.Time) bool {
	return start.IsZero() || end.IsZero() || start.Before(end)
}

// subset reports whether every element of the sorted a is in the sorted b.
func subset(a, b []string) bool {
	j := 0
	for _, x := range a {
		for j < len(b) && b[j] < x {
			j++
		}
		if j == len(b) || b[j] != x {
			return false
		}
	}
	return true
}

// useCycles returns the positions of use rules on a cycle of use rules in
// some scope (the organisation's rules alone, or with one department's), in
// ascending order. It finds strongly connected components of the graph
// query key -> term key (Tarjan, 1972): an edge inside a component lies on a
// cycle.
func useCycles(as []analysed) []int {
	depts := map[string]bool{"": true}
	for _, a := range as {
		if a.Kind == Use {
			depts[a.Department] = true
		}
	}
	onCycle := make(map[int]bool)
	for d := range depts {
		var edges []int
		for j, a := range as {
			if a.Kind == Use && (a.Department == "" || a.Department == d) {
				edges = append(edges, j)
			}
		}
		comp := components(as, edges)
		for _, j := range edges {
			if comp[as[j].qKey] == comp[as[j].tKey] {
				onCycle[j] = true
			}
		}
	}
	out := make([]int, 0, len(onCycle))
	for j := range onCycle {
		out = append(out, j)
	}
	sort.Ints(out)
	return out
}

// components labels each node (stem key) of the use graph given by edges
// with its strongly connected component.
func components(as []analysed, edges []int) map[string]int {
	adj := make(map[string][]string)
	for _, j := range edges {
		adj[as[j].qKey] = append(adj[as[j].qKey], as[j].tKey)
	}
	index := make(map[string]int)
	low := make(map[string]int)
	onStack := make(map[string]bool)
	comp := make(map[string]int)
	var stack []string
	next, ncomp := 0, 0
	var visit func(v string)
	visit = func(v string) {
		index[v], low[v] = next, next
		next++
		stack = append(stack, v)
		onStack[v] = true
		for _, w := range adj[v] {
			if _, seen := index[w]; !seen {
				visit(w)
				low[v] = min(low[v], low[w])
			} else if onStack[w] {
				low[v] = min(low[v], index[w])
			}
		}
		if low[v] == index[v] {
			for {
				w := stack[len(stack)-1]
				stack = stack[:len(stack)-1]
				onStack[w] = false
				comp[w] = ncomp
				if w == v {
					break
				}
			}
			ncomp++
		}
	}
	for _, j := range edges {
		if _, seen := index[as[j].qKey]; !seen {
			visit(as[j].qKey)
		}
	}
	return comp
}

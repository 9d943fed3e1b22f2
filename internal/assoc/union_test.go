package assoc

import (
	"bytes"
	"context"
	"os"
	"reflect"
	"slices"
	"testing"
)

// subCorpus copies the documents of c that keep selects, as open documents,
// in their original order.
func subCorpus(c *MemCorpus, keep func(i int) bool) *MemCorpus {
	out := NewMemCorpus(nil)
	for i := 0; i < c.NumDocs(); i++ {
		if !keep(i) {
			continue
		}
		d := c.Doc(i)
		var paras [][]string
		start := 0
		for _, b := range append(slices.Clone(d.Breaks), int32(len(d.Tokens))) {
			var p []string
			for _, t := range d.Tokens[start:b] {
				p = append(p, c.Term(t))
			}
			paras = append(paras, p)
			start = int(b)
		}
		out.AddDoc(nil, paras...)
	}
	return out
}

// scopeView is everything scope s of tb holds, keyed by term.
type scopeView struct {
	docs, units, pairs uint64
	terms              map[string][3]uint32 // df, tf, udf
	nbrs               map[string][]Neighbour
}

func viewScope(tb *Table, s int) scopeView {
	st := tb.scopes[s]
	v := scopeView{docs: uint64(st.docs), units: st.units, pairs: st.pairs,
		terms: map[string][3]uint32{}, nbrs: map[string][]Neighbour{}}
	for id := range uint32(tb.numTerms()) {
		if st.df[id] == 0 {
			continue
		}
		v.terms[tb.term(id)] = [3]uint32{st.df[id], st.tf[id], st.udf[id]}
		var ns []Neighbour
		sp := st.entries(id)
		for i := range sp.n {
			src, e := sp.at(i)
			n := tb.neighbour(st, src, id, e, MeasureLLR)
			n.ID, n.Scope, n.Display = 0, "", ""
			ns = append(ns, n)
		}
		v.nbrs[tb.term(id)] = ns
	}
	return v
}

func groupedSpec() synthSpec {
	spec := smallSpec()
	spec.groups = func(i int) []string {
		switch {
		case i%35 == 0:
			return []string{"hr", "ops"}
		case i%7 == 0:
			return []string{"ops"}
		case i%11 == 0:
			return []string{"hr"}
		case i%13 == 0:
			return []string{"fin"}
		}
		return nil
	}
	return spec
}

// TestGroupScopeEqualsUnionMine: with phrases off, every group scope built
// from the shared open counts equals mining that group's documents plus the
// open ones as a corpus of its own (the union recount Mine used to do).
func TestGroupScopeEqualsUnionMine(t *testing.T) {
	spec := groupedSpec()
	c := synthCorpus(spec)
	opts := Options{MinPhraseCount: -1, TopK: 10}
	full, err := Mine(context.Background(), c, opts)
	if err != nil {
		t.Fatal(err)
	}
	names := scopeNames(full)
	if !slices.Equal(names, []string{"", "fin", "hr", "ops"}) {
		t.Fatalf("scopes %q", names)
	}
	openDF := map[string]int{}
	for i := 0; i < c.NumDocs(); i++ {
		if len(spec.groups(i)) > 0 {
			continue
		}
		seen := map[uint32]bool{}
		for _, tok := range c.Doc(i).Tokens {
			if !seen[tok] {
				seen[tok] = true
				openDF[c.Term(tok)]++
			}
		}
	}
	// lifted counts terms of open documents that are below MinDF there but
	// reach it in a group scope: their open pairs must still be counted.
	lifted := 0
	for s, g := range names {
		t.Run("scope="+g, func(t *testing.T) {
			sub := subCorpus(c, func(i int) bool {
				gs := spec.groups(i)
				return len(gs) == 0 || slices.Contains(gs, g)
			})
			want, err := Mine(context.Background(), sub, opts)
			if err != nil {
				t.Fatal(err)
			}
			got, exp := viewScope(full, s), viewScope(want, 0)
			if got.docs != exp.docs || got.units != exp.units || got.pairs != exp.pairs {
				t.Fatalf("docs/units/pairs %d/%d/%d, union mine %d/%d/%d",
					got.docs, got.units, got.pairs, exp.docs, exp.units, exp.pairs)
			}
			if !reflect.DeepEqual(got.terms, exp.terms) {
				t.Fatalf("term counts differ (%d vs %d terms)", len(got.terms), len(exp.terms))
			}
			for term, ns := range exp.nbrs {
				if !reflect.DeepEqual(got.nbrs[term], ns) {
					t.Fatalf("%q: got %+v\nunion mine %+v", term, got.nbrs[term], ns)
				}
			}
			for term := range got.terms {
				if n := openDF[term]; n > 0 && n < DefaultMinDF {
					lifted++
				}
			}
		})
	}
	if lifted == 0 {
		t.Error("no open term reaches MinDF only with a group's documents; test is weak")
	}
	t.Logf("%d scope terms below MinDF in the open documents", lifted)
}

// phraseSets runs phrase detection alone and returns the per-scope sets and
// a function naming a corpus or phrase ID by its key.
func phraseSets(t *testing.T, c Corpus, opts Options) ([]*phraseSet, func(uint32) string) {
	t.Helper()
	o := opts.resolved()
	o.TempDir = t.TempDir()
	sc, err := scanCorpus(context.Background(), c, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := &miner{c: c, o: o, sc: sc, store: newSpillStore(o.TempDir)}
	defer m.store.cleanup()
	sets, defs, err := m.detectPhrases(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	key := func(id uint32) string {
		if int(id) < sc.nTerms {
			return c.Term(id)
		}
		return defs[int(id)-sc.nTerms].key
	}
	return sets, key
}

func bigramKeys(ps *phraseSet, key func(uint32) string) []string {
	var out []string
	for k := range ps.bigram {
		out = append(out, key(uint32(k>>32))+" "+key(uint32(k)))
	}
	slices.Sort(out)
	return out
}

// TestGroupPhraseSemantics checks the documented phrase semantics of a
// group scope g: its bigrams are the open scope's plus those detected on
// the adjacency counts of the open documents and g's own documents
// together; open documents are rewritten with the open phrases and g's own
// documents with g's, and the counts over the two add up. The reference for
// the counts is Mine with phrases off on the documents rewritten that way,
// each phrase written as one token.
func TestGroupPhraseSemantics(t *testing.T) {
	spec := groupedSpec()
	c := synthCorpus(spec)
	opts := Options{MinPhraseCount: 3, TopK: 10}
	full, err := Mine(context.Background(), c, opts)
	if err != nil {
		t.Fatal(err)
	}
	sets, key := phraseSets(t, c, opts)
	openBigrams := bigramKeys(sets[0], key)
	extra := 0
	for s, g := range scopeNames(full) {
		t.Run("scope="+g, func(t *testing.T) {
			inScope := func(i int) bool {
				gs := spec.groups(i)
				return len(gs) == 0 || slices.Contains(gs, g)
			}
			sub := subCorpus(c, inScope)
			subSets, subKey := phraseSets(t, sub, opts)
			want := unionStrings(openBigrams, bigramKeys(subSets[0], subKey))
			if got := bigramKeys(sets[s], key); !slices.Equal(got, want) {
				t.Fatalf("bigrams %q\nwant open ∪ detected on open+%s %q", got, g, want)
			}
			extra += len(want) - len(openBigrams)
			ref := NewMemCorpus(nil)
			for i := 0; i < c.NumDocs(); i++ {
				if !inScope(i) {
					continue
				}
				ps := sets[s]
				if len(spec.groups(i)) == 0 {
					ps = sets[0]
				}
				d := c.Doc(i)
				var paras [][]string
				bounds := paragraphs(nil, len(d.Tokens), d.Breaks)
				for k := 0; k < len(bounds); k += 2 {
					toks, _ := ps.replace(nil, d.Tokens[bounds[k]:bounds[k+1]], nil, nil)
					var words []string
					for _, id := range toks {
						words = append(words, key(id))
					}
					paras = append(paras, words)
				}
				ref.AddDoc(nil, paras...)
			}
			refTable, err := Mine(context.Background(), ref, Options{MinPhraseCount: -1, TopK: 10})
			if err != nil {
				t.Fatal(err)
			}
			got, exp := viewScope(full, s), viewScope(refTable, 0)
			if got.docs != exp.docs || got.units != exp.units || got.pairs != exp.pairs || !reflect.DeepEqual(got.terms, exp.terms) {
				t.Fatalf("counts differ from the rewritten reference: %d/%d/%d vs %d/%d/%d, %d vs %d terms",
					got.docs, got.units, got.pairs, exp.docs, exp.units, exp.pairs, len(got.terms), len(exp.terms))
			}
			for term, ns := range exp.nbrs {
				if !reflect.DeepEqual(got.nbrs[term], ns) {
					t.Fatalf("%q: got %+v\nreference %+v", term, got.nbrs[term], ns)
				}
			}
		})
	}
	if extra == 0 {
		t.Error("no group scope detected a bigram of its own; test is weak")
	}
}

func unionStrings(a, b []string) []string {
	out := slices.Concat(a, b)
	slices.Sort(out)
	return slices.Compact(out)
}

// TestSpillIdentityGroups: with several groups (one document in two), the
// open part's runs are spilled, consolidated and re-read by every group
// scope; the artifact must equal the all-in-memory one.
func TestSpillIdentityGroups(t *testing.T) {
	old := mergeFanIn
	mergeFanIn = 4
	defer func() { mergeFanIn = old }()
	c := synthCorpus(groupedSpec())
	base, err := Mine(context.Background(), c, Options{MinPhraseCount: 3, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	want := writeBytes(t, base)
	for _, workers := range []int{1, 2} {
		tmp := t.TempDir()
		tb, err := Mine(context.Background(), c, Options{MinPhraseCount: 3, MemoryBudget: 1, Workers: workers, TempDir: tmp})
		if err != nil {
			t.Fatal(err)
		}
		if tb.stats.spills < 2 {
			t.Fatalf("only %d spills", tb.stats.spills)
		}
		if !bytes.Equal(writeBytes(t, tb), want) {
			t.Fatalf("workers %d: artifact differs from the in-memory run", workers)
		}
		if left, _ := os.ReadDir(tmp); len(left) != 0 {
			t.Errorf("spill files left behind: %v", left)
		}
	}
}

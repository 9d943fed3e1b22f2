package assoc

import (
	"cmp"
	"encoding/binary"
	"encoding/hex"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"kinword/internal/access"
)

// Table is a mined association table: a dictionary of terms and phrases and,
// per access scope, every term's strongest neighbours with their counts.
// A Table is immutable and safe for concurrent use.
//
// Term IDs are table-local (dictionary order), not the corpus's IDs; use
// LookupFor to find them.
type Table struct {
	params      Params
	fingerprint [32]byte
	nDocs       int
	corpusTerms int

	keys    string // all keys, sorted, concatenated
	keyOff  []uint32
	disp    string
	dispOff []uint32
	words   []uint8 // 1 for a term, 2 or 3 for a phrase

	scopes []*scopeTable
	stats  mineStats // from Mine only; not stored

	partsOnce sync.Once
	parts     map[string][]uint32 // word stem -> phrases containing it

	// withCache holds PhrasesWith results per stem and visible scope set
	// (phraseCacheKey -> []Phrase), at most maxPhraseCache entries.
	withCache sync.Map
	withN     atomic.Int64

	// nbCache holds Neighbours results per term, measure, k and visible
	// scope set (neighbourCacheKey -> []Neighbour), at most
	// maxNeighbourCache entries: a query's words recur across searches,
	// and their neighbour lists never change for a loaded table.
	nbCache sync.Map
	nbN     atomic.Int64
}

// maxNeighbourCache bounds the Neighbours cache; past it lists are built
// per call.
const maxNeighbourCache = 1 << 15

type neighbourCacheKey struct {
	id      uint32
	measure Measure
	k       int
	scopes  string
}

// scopeKey encodes a visible scope set as a cache key.
func scopeKey(scopes []int) string {
	kb := make([]byte, 0, 4*len(scopes))
	for _, sc := range scopes {
		kb = binary.LittleEndian.AppendUint32(kb, uint32(sc))
	}
	return string(kb)
}

// maxPhraseCache bounds the PhrasesWith cache; past it results are built
// per call.
const maxPhraseCache = 1 << 14

type phraseCacheKey struct{ stem, scopes string }

type mineStats struct {
	spills int
	incr   int64
	toks   int64
}

// Neighbour is one related term of a query term, as seen in one scope.
// Counts are over passages; K12 counts passages with the query term but
// not the neighbour, K21 the reverse.
type Neighbour struct {
	// ID is the neighbour's table ID, a handle for further Neighbours calls.
	// Do not show IDs to end users: they follow the key order of the whole
	// dictionary, so gaps would hint at terms of other scopes.
	ID       uint32
	Term     string // stem, or phrase key "stem1 stem2"
	Display  string
	Score    float64 // the requested measure
	LLR      float64 // signed G2
	PMI      float64 // bits
	NPMI     float64
	Chi2     float64
	Dice     float64
	CondProb float64 // P(neighbour | query term)
	TScore   float64
	K11      int
	K12      int
	K21      int
	K22      int
	Window   int    // co-occurrences within ±Window tokens
	Docs     int    // distinct documents supporting the pair
	Scope    string // OpenScope or the access group it came from
}

// Phrase is a multi-word term of the table.
type Phrase struct {
	ID      uint32
	Key     string // "stem1 stem2[ stem3]"
	Display string
	Words   int
	Docs    int      // documents containing it, in the largest visible scope
	Scopes  []string // visible scopes that have it
}

func (t *Table) numTerms() int { return len(t.words) }

func (t *Table) term(id uint32) string { return t.keys[t.keyOff[id]:t.keyOff[id+1]] }

func (t *Table) display(id uint32) string { return t.disp[t.dispOff[id]:t.dispOff[id+1]] }

// viewerScopes returns the indexes of the scopes v may see: the open scope
// and those of v's groups.
func (t *Table) viewerScopes(v access.Viewer) []int {
	out := []int{0}
	for _, g := range access.NormalizeGroups(v.Groups) {
		names := t.scopes[1:]
		i := sort.Search(len(names), func(i int) bool { return names[i].name >= g })
		if i < len(names) && names[i].name == g {
			out = append(out, i+1)
		}
	}
	return out
}

func (t *Table) visibleIn(scopes []int, id uint32) bool {
	if int(id) >= t.numTerms() {
		return false
	}
	for _, s := range scopes {
		if t.scopes[s].df[id] > 0 {
			return true
		}
	}
	return false
}

// Visible reports whether term id occurs in a scope v may see.
func (t *Table) Visible(v access.Viewer, id uint32) bool {
	return t.visibleIn(t.viewerScopes(v), id)
}

// LookupFor returns the ID of a term (stem or phrase key) if v may see it.
func (t *Table) LookupFor(v access.Viewer, term string) (uint32, bool) {
	n := t.numTerms()
	i := sort.Search(n, func(i int) bool { return t.term(uint32(i)) >= term })
	if i < n && t.term(uint32(i)) == term && t.Visible(v, uint32(i)) {
		return uint32(i), true
	}
	return 0, false
}

// Lookup is LookupFor(access.Anonymous, term): it finds only terms of the
// open scope. Use LookupFor with the searcher's viewer.
func (t *Table) Lookup(term string) (uint32, bool) { return t.LookupFor(access.Anonymous, term) }

// Neighbours returns up to k (k <= 0: all kept) neighbours of term id that
// v may see, best first by measure (ties by term). Each neighbour comes from
// the one of v's scopes where it scores highest; it is empty when v may not
// see the term. The neighbours kept per scope were chosen by the build
// measure (Info().Params.Measure); another measure re-ranks them.
func (t *Table) Neighbours(v access.Viewer, id uint32, measure Measure, k int) []Neighbour {
	scopes := t.viewerScopes(v)
	if !t.visibleIn(scopes, id) {
		return nil
	}
	key := neighbourCacheKey{id, measure, max(k, 0), scopeKey(scopes)}
	if c, ok := t.nbCache.Load(key); ok {
		return t.materialise(id, measure, c.([]nbRef))
	}
	refs := t.neighbourRefs(scopes, id, measure, k)
	if t.nbN.Load() < maxNeighbourCache {
		if _, loaded := t.nbCache.LoadOrStore(key, refs); !loaded {
			t.nbN.Add(1)
		}
	}
	return t.materialise(id, measure, refs)
}

// nbRef locates one neighbour list entry: the viewer scope it is scored in
// (an index into Table.scopes), whether its columns are that scope's base
// (the open scope) rather than its own, and the entry's index in them. The
// Neighbours cache holds these, pointer-free and a few bytes each, rather
// than built Neighbour values: a busy server caches tens of thousands of
// lists, and the collector need not scan them.
type nbRef struct {
	scope uint32
	base  bool
	entry uint32
}

// materialise builds the Neighbour values of refs.
func (t *Table) materialise(id uint32, measure Measure, refs []nbRef) []Neighbour {
	if len(refs) == 0 {
		return nil
	}
	out := make([]Neighbour, len(refs))
	for i, r := range refs {
		st := t.scopes[r.scope]
		src := st
		if r.base {
			src = st.base
		}
		out[i] = t.neighbour(st, src, id, r.entry, measure)
	}
	return out
}

// neighbourRefs ranks id's neighbours over scopes, best first by measure
// (ties by term), each from the scope where it scores highest; at most k
// (k <= 0: all).
func (t *Table) neighbourRefs(scopes []int, id uint32, measure Measure, k int) []nbRef {
	type cand struct {
		ref   nbRef
		nb    uint32
		score float64
	}
	var all []cand
	at := map[uint32]int{}
	for _, s := range scopes {
		st := t.scopes[s]
		if st.df[id] == 0 {
			continue
		}
		sp := st.entries(id)
		for i := range sp.n {
			src, e := sp.at(i)
			c := cand{ref: nbRef{scope: uint32(s), base: src != st, entry: e}, nb: src.nb[e], score: t.score(st, src, id, e, measure)}
			if j, ok := at[c.nb]; ok {
				if c.score > all[j].score {
					all[j] = c
				}
				continue
			}
			at[c.nb] = len(all)
			all = append(all, c)
		}
	}
	slices.SortFunc(all, func(a, b cand) int {
		if c := cmp.Compare(b.score, a.score); c != 0 {
			return c
		}
		return strings.Compare(t.term(a.nb), t.term(b.nb))
	})
	if k > 0 && len(all) > k {
		all = all[:k]
	}
	refs := make([]nbRef, len(all))
	for i, c := range all {
		refs[i] = c.ref
	}
	return refs
}

// score is entry e's measure m alone, as neighbour computes it.
func (t *Table) score(st, src *scopeTable, id, e uint32, m Measure) float64 {
	return contingency(st, src, id, e).Score(m)
}

// contingency is the 2x2 table of term id and entry e's neighbour in scope
// st, the pair count taken from src (st or its base).
func contingency(st, src *scopeTable, id, e uint32) Contingency {
	return NewContingency(int64(src.k11[e]), int64(st.udf[id]), int64(st.udf[src.nb[e]]), int64(st.units))
}

// neighbour builds entry e of term id's list in scope st; src holds the
// entry's columns (see scopeTable.entries). Frequencies, passages and the
// scope name are st's.
func (t *Table) neighbour(st, src *scopeTable, id, e uint32, m Measure) Neighbour {
	nb := src.nb[e]
	k11, na, nbn, n := int64(src.k11[e]), int64(st.udf[id]), int64(st.udf[nb]), int64(st.units)
	c := contingency(st, src, id, e)
	return Neighbour{
		ID: nb, Term: t.term(nb), Display: t.display(nb), Score: c.Score(m),
		LLR: c.SignedG2(), PMI: c.PMI(), NPMI: c.NPMI(), Chi2: c.Chi2(), Dice: c.Dice(),
		CondProb: c.CondProb(), TScore: c.TScore(),
		K11: int(k11), K12: int(na - k11), K21: int(nbn - k11), K22: int(n - na - nbn + k11),
		Window: int(src.win[e]), Docs: int(src.sup[e]), Scope: st.name,
	}
}

// Related is LookupFor followed by Neighbours.
func (t *Table) Related(v access.Viewer, term string, measure Measure, k int) []Neighbour {
	id, ok := t.LookupFor(v, term)
	if !ok {
		return nil
	}
	return t.Neighbours(v, id, measure, k)
}

// PhrasesFor lists the phrases v may see, in key order.
func (t *Table) PhrasesFor(v access.Viewer) []Phrase {
	scopes := t.viewerScopes(v)
	var out []Phrase
	for id := range t.numTerms() {
		if t.words[id] < 2 {
			continue
		}
		p := Phrase{ID: uint32(id), Key: t.term(uint32(id)), Display: t.display(uint32(id)), Words: int(t.words[id])}
		for _, s := range scopes {
			if df := int(t.scopes[s].df[id]); df > 0 {
				p.Scopes = append(p.Scopes, t.scopes[s].name)
				p.Docs = max(p.Docs, df)
			}
		}
		if len(p.Scopes) > 0 {
			out = append(out, p)
		}
	}
	return out
}

// PhrasesWith lists the phrases v may see that contain the word stem
// ("boundari" -> "boundari layer", "boundari condit"), most documents
// first. A word absorbed into its phrases has few neighbours of its own;
// its phrases are its natural refinements.
func (t *Table) PhrasesWith(v access.Viewer, stem string) []Phrase {
	return clonePhrases(t.phrasesWith(v, stem))
}

// PhrasesWithTop is PhrasesWith cut to the first n phrases (n < 0: all),
// copying only those: the suggestion engine reads a few phrases per word,
// and a common word is part of hundreds.
func (t *Table) PhrasesWithTop(v access.Viewer, stem string, n int) []Phrase {
	ps := t.phrasesWith(v, stem)
	if n >= 0 && len(ps) > n {
		ps = ps[:n]
	}
	return clonePhrases(ps)
}

// phrasesWith is PhrasesWith without the copy: the result may be shared
// with the cache and must not be modified.
func (t *Table) phrasesWith(v access.Viewer, stem string) []Phrase {
	t.partsOnce.Do(func() {
		t.parts = map[string][]uint32{}
		for id := range t.numTerms() {
			if t.words[id] < 2 {
				continue
			}
			seen := map[string]bool{}
			for _, w := range strings.Fields(t.term(uint32(id))) {
				if !seen[w] {
					seen[w] = true
					t.parts[w] = append(t.parts[w], uint32(id))
				}
			}
		}
	})
	ids := t.parts[stem]
	if len(ids) == 0 {
		return nil
	}
	scopes := t.viewerScopes(v)
	key := phraseCacheKey{stem, scopeKey(scopes)}
	if c, ok := t.withCache.Load(key); ok {
		return c.([]Phrase)
	}
	var out []Phrase
	for _, id := range ids {
		p := Phrase{ID: id, Key: t.term(id), Display: t.display(id), Words: int(t.words[id])}
		for _, s := range scopes {
			if df := int(t.scopes[s].df[id]); df > 0 {
				p.Scopes = append(p.Scopes, t.scopes[s].name)
				p.Docs = max(p.Docs, df)
			}
		}
		if len(p.Scopes) > 0 {
			out = append(out, p)
		}
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Docs != out[j].Docs {
			return out[i].Docs > out[j].Docs
		}
		return out[i].Key < out[j].Key
	})
	if t.withN.Load() < maxPhraseCache {
		if _, loaded := t.withCache.LoadOrStore(key, out); !loaded {
			t.withN.Add(1)
		}
	}
	return out
}

// clonePhrases copies a cached result so callers may modify it.
func clonePhrases(ps []Phrase) []Phrase {
	if ps == nil {
		return nil
	}
	out := slices.Clone(ps)
	for i := range out {
		out[i].Scopes = slices.Clone(out[i].Scopes)
	}
	return out
}

// Phrases is PhrasesFor(access.Anonymous): the phrases of the open scope.
func (t *Table) Phrases() []Phrase { return t.PhrasesFor(access.Anonymous) }

// Info describes a table for operators. It names every scope, so it is not
// for end users.
type Info struct {
	FormatVersion int
	Params        Params
	Fingerprint   string // hex SHA-256 of the corpus data
	Docs          int    // documents in the corpus
	CorpusTerms   int    // corpus dictionary size
	Terms         int    // table dictionary size, phrases included
	Phrases       int
	Scopes        []ScopeInfo
}

// RunStats describe the Mine run that built a table (zero for a loaded
// table): sorted runs spilled to disk under the memory budget, tokens read,
// pair counts incremented.
type RunStats struct {
	Spills         int
	Tokens         int64
	PairIncrements int64
}

// RunStats returns the statistics of the Mine run that built t.
func (t *Table) RunStats() RunStats {
	return RunStats{Spills: t.stats.spills, Tokens: t.stats.toks, PairIncrements: t.stats.incr}
}

// ScopeInfo summarises one scope.
type ScopeInfo struct {
	Name       string // OpenScope or the access group
	Docs       int
	Passages   int64
	Terms      int   // terms and phrases counted in the scope
	Pairs      int64 // pairs passing the support and chance filters
	Neighbours int   // neighbour entries kept
}

// Info returns the table's parameters, fingerprint and counts.
func (t *Table) Info() Info {
	in := Info{FormatVersion: formatVersion, Params: t.params, Fingerprint: hex.EncodeToString(t.fingerprint[:]),
		Docs: t.nDocs, CorpusTerms: t.corpusTerms, Terms: t.numTerms()}
	for _, w := range t.words {
		if w > 1 {
			in.Phrases++
		}
	}
	for _, st := range t.scopes {
		si := ScopeInfo{Name: st.name, Docs: int(st.docs), Passages: int64(st.units), Pairs: int64(st.pairs), Neighbours: st.numNeighbours()}
		for _, df := range st.df {
			if df > 0 {
				si.Terms++
			}
		}
		in.Scopes = append(in.Scopes, si)
	}
	return in
}

package assoc

import (
	"context"
	"fmt"
	"slices"
	"strings"
)

// paragraphs returns the [start, end) bounds, flattened, of the non-empty
// paragraphs of a document with n tokens. Breaks that are out of order or
// out of range are ignored.
func paragraphs(dst []int32, n int, breaks []int32) []int32 {
	dst = dst[:0]
	start := int32(0)
	for _, b := range breaks {
		if b <= start || int(b) >= n {
			continue
		}
		dst = append(dst, start, b)
		start = b
	}
	if int(start) < n {
		dst = append(dst, start, int32(n))
	}
	return dst
}

// phraseSet rewrites token runs into phrase IDs: at each position the
// longest kept phrase starting there (trigram, then bigram) replaces its
// parts, scanning left to right. A phrase never spans a paragraph break.
type phraseSet struct {
	starts  []uint64          // bitset: term starts some bigram
	bigram  map[uint64]uint32 // a<<32|b -> phrase ID
	trigram map[uint64]uint32 // bigram ID<<32|c -> phrase ID
}

func newPhraseSet(nTerms int) *phraseSet {
	return &phraseSet{starts: make([]uint64, (nTerms+63)/64), bigram: map[uint64]uint32{}, trigram: map[uint64]uint32{}}
}

func (p *phraseSet) addBigram(a, b, id uint32) {
	p.starts[a/64] |= 1 << (a % 64)
	p.bigram[uint64(a)<<32|uint64(b)] = id
}

// gapMask marks, per token of a document, whether removed words precede
// it. It reuses dst.
func gapMask(dst []bool, n int, gaps []int32) []bool {
	dst = append(dst[:0], make([]bool, n)...)
	for _, g := range gaps {
		if g >= 0 && int(g) < n {
			dst[g] = true
		}
	}
	return dst
}

// replace appends the rewritten tokens of one paragraph to dst, and to gdst
// whether a gap precedes each output token. gap marks the input tokens that
// follow removed words (nil = none); no phrase spans such a gap.
func (p *phraseSet) replace(dst, toks []uint32, gap, gdst []bool) ([]uint32, []bool) {
	at := func(i int) bool { return gap != nil && gap[i] }
	for i := 0; i < len(toks); {
		t := toks[i]
		if len(p.bigram) > 0 && i+1 < len(toks) && !at(i+1) && p.starts[t/64]&(1<<(t%64)) != 0 {
			if bid, ok := p.bigram[uint64(t)<<32|uint64(toks[i+1])]; ok {
				if i+2 < len(toks) && !at(i+2) {
					if tid, ok := p.trigram[uint64(bid)<<32|uint64(toks[i+2])]; ok {
						dst, gdst = append(dst, tid), append(gdst, at(i))
						i += 3
						continue
					}
				}
				dst, gdst = append(dst, bid), append(gdst, at(i))
				i += 2
				continue
			}
		}
		dst, gdst = append(dst, t), append(gdst, at(i))
		i++
	}
	return dst, gdst
}

// adjPart is the adjacency counts of one part (the open documents, or a
// group's own documents): marginals of first and second positions, the
// number of adjacent pairs, and the candidate pairs' sorted runs.
type adjPart struct {
	first, second []uint32
	n             int64
	runs          [][]slot // in-memory runs; spilled runs are in the store
}

// adjacency counts adjacent token pairs (x, y), x and y below size, over
// the paragraphs of docs rewritten by ps; keep selects the pairs that are
// candidates. Spilled runs are left in the store.
func (m *miner) adjacency(ctx context.Context, docs []int32, ps *phraseSet, size int,
	keep func(x, y uint32) bool, budget int64, pr *progress) (*adjPart, error) {
	a := &adjPart{first: make([]uint32, size), second: make([]uint32, size)}
	cnt := newCounter(budget, m.store)
	var paras []int32
	var buf []uint32
	var gap, gbuf []bool
	for n, di := range docs {
		if n&255 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("assoc: phrases: %w", err)
			}
		}
		d := m.c.Doc(int(di))
		if err := m.checkTokens(int(di), d.Tokens); err != nil {
			return nil, err
		}
		paras = paragraphs(paras, len(d.Tokens), d.Breaks)
		gap = gapMask(gap, len(d.Tokens), d.Gaps)
		for i := 0; i < len(paras); i += 2 {
			lo, hi := paras[i], paras[i+1]
			buf, gbuf = ps.replace(buf[:0], d.Tokens[lo:hi], gap[lo:hi], gbuf[:0])
			for j := 0; j+1 < len(buf); j++ {
				if gbuf[j+1] {
					continue // removed words between: not adjacent
				}
				x, y := buf[j], buf[j+1]
				a.first[x]++
				a.second[y]++
				a.n++
				if keep(x, y) {
					cnt.add(uint64(x)<<32|uint64(y), uint32(di), 1, 0)
				}
			}
		}
		if err := cnt.endDoc(); err != nil {
			return nil, err
		}
		pr.add(1)
	}
	m.stats.spills += cnt.spills
	a.runs = [][]slot{cnt.finish()}
	return a, nil
}

// selectPhrases returns, sorted by key, the candidate pairs whose summed
// adjacency counts over the base part and own (nil: the base alone) pass
// the phrase thresholds. runs are the base part's kept runs; the store's
// run files are own's and are consumed.
func (m *miner) selectPhrases(ctx context.Context, base *adjPart, runs *baseRuns, own *adjPart) ([]uint64, error) {
	first, second, nAdj := base.first, base.second, base.n
	var ownRuns [][]slot
	if own != nil {
		first, second = slices.Clone(first), slices.Clone(second)
		for i := range own.first {
			first[i] += own.first[i]
			second[i] += own.second[i]
		}
		nAdj += own.n
		ownRuns = own.runs
	}
	var kept []uint64
	minCount, minDocs := uint32(m.o.MinPhraseCount), uint32(m.o.MinDF)
	err := runs.merge(ctx, m.store, ownRuns, func(e entry) error {
		if e.u < minCount || e.d < minDocs {
			return nil
		}
		x, y := uint32(e.key>>32), uint32(e.key)
		ct := NewContingency(int64(e.u), int64(first[x]), int64(second[y]), nAdj)
		if ct.SignedG2() >= m.o.MinPhraseLLR {
			kept = append(kept, e.key)
		}
		return nil
	})
	return kept, err
}

// unionKeys returns the sorted union of two sorted key lists.
func unionKeys(a, b []uint64) []uint64 {
	out := slices.Concat(a, b)
	slices.Sort(out)
	return slices.Compact(out)
}

func (m *miner) checkTokens(doc int, toks []uint32) error {
	for _, t := range toks {
		if int(t) >= m.sc.nTerms {
			return fmt.Errorf("%w: document %d has term id %d, dictionary has %d", ErrBadCorpus, doc, t, m.sc.nTerms)
		}
	}
	return nil
}

// detectPhrases finds each scope's bigrams, then trigrams made of a kept
// bigram and the next token, and returns the per-scope phrase sets with
// table-wide phrase IDs nTerms, nTerms+1, ... in key order.
//
// The open scope's phrases are detected on the open documents' adjacency
// counts. A group scope's phrases are the open scope's plus those detected
// on the adjacency counts over the open documents and the group's own
// documents together (summed). In every scope the open documents are
// rewritten with the open scope's phrases only, so their counts are the
// same everywhere and are counted once; a group's own documents are
// rewritten with the group's phrases. Trigram candidates are therefore
// counted over open documents rewritten with the open bigrams plus the
// group's documents rewritten with the group's bigrams.
func (m *miner) detectPhrases(ctx context.Context) ([]*phraseSet, []phraseDef, error) {
	nTerms := m.sc.nTerms
	nScopes := len(m.sc.scopes)
	sets := make([]*phraseSet, nScopes)
	if m.o.MinPhraseCount < 0 {
		for i := range sets {
			sets[i] = newPhraseSet(nTerms)
		}
		return sets, nil, nil
	}
	total := m.sc.totalDocs()
	reuse := nScopes > 1
	all := func(x, y uint32) bool { return true }

	// Bigrams.
	bigrams := make([][]uint64, nScopes)
	pr := newProgress(m.o.Progress, "bigrams", total)
	open, err := m.adjacency(ctx, m.sc.own[0], newPhraseSet(nTerms), nTerms, all, m.o.MemoryBudget, pr)
	if err != nil {
		return nil, nil, err
	}
	base, err := m.keepBase(ctx, open.runs, reuse)
	if err != nil {
		return nil, nil, err
	}
	open.runs = nil // held by base from here on
	if bigrams[0], err = m.selectPhrases(ctx, open, base, nil); err != nil {
		return nil, nil, err
	}
	for s := 1; s < nScopes; s++ {
		own, err := m.adjacency(ctx, m.sc.own[s], newPhraseSet(nTerms), nTerms, all, m.budget(base), pr)
		if err != nil {
			return nil, nil, err
		}
		kept, err := m.selectPhrases(ctx, open, base, own)
		if err != nil {
			return nil, nil, err
		}
		bigrams[s] = unionKeys(bigrams[0], kept)
	}
	base.release()

	// Trigrams: candidates are (bigram, next token), with the bigrams
	// numbered nTerms+i by their index in the union of all scopes' bigrams,
	// so that the parts' candidate keys agree.
	var union []uint64
	for _, b := range bigrams {
		union = unionKeys(union, b)
	}
	tmpSet := func(s int) *phraseSet {
		ps := newPhraseSet(nTerms)
		for _, k := range bigrams[s] {
			i, _ := slices.BinarySearch(union, k)
			ps.addBigram(uint32(k>>32), uint32(k), uint32(nTerms+i))
		}
		return ps
	}
	size := nTerms + len(union)
	isBigram := func(x, y uint32) bool { return int(x) >= nTerms && int(y) < nTerms }
	trigramKeys := make([][]uint64, nScopes)
	pr = newProgress(m.o.Progress, "trigrams", total)
	if open, err = m.adjacency(ctx, m.sc.own[0], tmpSet(0), size, isBigram, m.o.MemoryBudget, pr); err != nil {
		return nil, nil, err
	}
	if base, err = m.keepBase(ctx, open.runs, reuse); err != nil {
		return nil, nil, err
	}
	open.runs = nil
	if trigramKeys[0], err = m.selectPhrases(ctx, open, base, nil); err != nil {
		return nil, nil, err
	}
	for s := 1; s < nScopes; s++ {
		own, err := m.adjacency(ctx, m.sc.own[s], tmpSet(s), size, isBigram, m.budget(base), pr)
		if err != nil {
			return nil, nil, err
		}
		kept, err := m.selectPhrases(ctx, open, base, own)
		if err != nil {
			return nil, nil, err
		}
		trigramKeys[s] = unionKeys(trigramKeys[0], kept)
	}
	base.release()
	trigrams := make([][][3]uint32, nScopes)
	for s, keys := range trigramKeys {
		for _, k := range keys {
			bg := union[int(k>>32)-nTerms]
			trigrams[s] = append(trigrams[s], [3]uint32{uint32(bg >> 32), uint32(bg), uint32(k)})
		}
	}

	defs, ids := m.phraseDefs(bigrams, trigrams)
	// Table-wide IDs of the union's bigrams (-1: dropped) and of every
	// trigram, looked up once rather than per scope.
	bigramID := make([]int64, len(union))
	for i, k := range union {
		bigramID[i] = -1
		if id, ok := ids[phraseKey(m.c, uint32(k>>32), uint32(k))]; ok {
			bigramID[i] = int64(id)
		}
	}
	trigramID := map[uint64]int64{}
	for _, keys := range trigramKeys {
		for _, k := range keys {
			if _, done := trigramID[k]; done {
				continue
			}
			bg := union[int(k>>32)-nTerms]
			trigramID[k] = -1
			if id, ok := ids[phraseKey(m.c, uint32(bg>>32), uint32(bg), uint32(k))]; ok {
				trigramID[k] = int64(id)
			}
		}
	}
	for s := range sets {
		ps := newPhraseSet(nTerms)
		for _, k := range bigrams[s] {
			i, _ := slices.BinarySearch(union, k)
			if id := bigramID[i]; id >= 0 {
				ps.addBigram(uint32(k>>32), uint32(k), uint32(id))
			}
		}
		for _, k := range trigramKeys[s] {
			bid, tid := bigramID[int(k>>32)-nTerms], trigramID[k]
			if bid >= 0 && tid >= 0 {
				ps.trigram[uint64(bid)<<32|uint64(uint32(k))] = uint32(tid)
			}
		}
		sets[s] = ps
	}
	return sets, defs, nil
}

// phraseDef is a kept phrase: its corpus term parts, key and display.
type phraseDef struct {
	parts        []uint32
	key, display string
}

func phraseKey(c Corpus, parts ...uint32) string {
	s := make([]string, len(parts))
	for i, p := range parts {
		s[i] = c.Term(p)
	}
	return strings.Join(s, " ")
}

// phraseDefs unites the scopes' phrases, drops any whose parts contain a
// space or whose key is already a corpus term, and numbers them in key
// order after the corpus terms.
func (m *miner) phraseDefs(bigrams [][]uint64, trigrams [][][3]uint32) ([]phraseDef, map[string]uint32) {
	byKey := map[string]phraseDef{}
	add := func(parts ...uint32) {
		for _, p := range parts {
			if strings.Contains(m.c.Term(p), " ") {
				return
			}
		}
		key := phraseKey(m.c, parts...)
		if _, dup := byKey[key]; dup || m.sc.spaced[key] {
			return
		}
		disp := make([]string, len(parts))
		for i, p := range parts {
			disp[i] = m.c.Display(p)
		}
		byKey[key] = phraseDef{parts: slices.Clone(parts), key: key, display: strings.Join(disp, " ")}
	}
	seen2, seen3 := map[uint64]bool{}, map[[3]uint32]bool{} // group scopes repeat the open phrases
	for s := range bigrams {
		for _, k := range bigrams[s] {
			if !seen2[k] {
				seen2[k] = true
				add(uint32(k>>32), uint32(k))
			}
		}
		for _, t := range trigrams[s] {
			if !seen3[t] {
				seen3[t] = true
				add(t[0], t[1], t[2])
			}
		}
	}
	defs := make([]phraseDef, 0, len(byKey))
	for _, d := range byKey {
		defs = append(defs, d)
	}
	slices.SortFunc(defs, func(a, b phraseDef) int { return strings.Compare(a.key, b.key) })
	ids := make(map[string]uint32, len(defs))
	for i, d := range defs {
		ids[d.key] = uint32(m.sc.nTerms + i)
	}
	return defs, ids
}

package assoc

import (
	"context"
	"fmt"
	"slices"
	"strings"
)

// miner carries the state of one Mine call.
type miner struct {
	c     Corpus
	o     Options
	sc    *scan
	store *spillStore
	stats mineStats
	// held is the memory the counters of a group scope leave aside: the
	// neighbour lists kept so far plus the candidate heaps of the next
	// ranking (see heldBytes).
	held int64
	defs []phraseDef
	// phraseSurf counts, per scope, how each phrase was written (when the
	// corpus is a Surfacer): phrase ID -> surface words -> occurrences.
	phraseSurf []map[uint32]map[string]uint32
}

// Mine counts term associations in c and returns the table. It reads the
// corpus in several passes: a scan (fingerprint, access scopes), phrase
// detection (bigrams, then trigrams), vocabulary (document frequencies),
// then pair counting and ranking, scope by scope. Each scope is mined from
// its own documents only. The open documents, which belong to every scope,
// are counted once and their counts added to each group's (see base.go and
// the package documentation). On cancellation Mine returns promptly with
// an error wrapping ctx.Err(); spill files are always removed.
func Mine(ctx context.Context, c Corpus, opts Options) (*Table, error) {
	return mine(ctx, c, opts, false)
}

// mine is Mine; with full set (tests only) every group scope keeps all its
// neighbour lists instead of a delta against the open scope. Such a table
// answers every query exactly like the delta one but cannot be written.
func mine(ctx context.Context, c Corpus, opts Options, full bool) (*Table, error) {
	o := opts.resolved()
	sc, err := scanCorpus(ctx, c, o.Progress)
	if err != nil {
		return nil, err
	}
	m := &miner{c: c, o: o, sc: sc, store: newSpillStore(o.TempDir)}
	defer m.store.cleanup()
	sets, defs, err := m.detectPhrases(ctx)
	if err != nil {
		return nil, err
	}
	size := sc.nTerms + len(defs)
	m.defs = defs
	nScopes := len(sc.scopes)
	m.phraseSurf = make([]map[uint32]map[string]uint32, nScopes)
	vocabs := make([]vocab, nScopes)
	pr := newProgress(o.Progress, "vocab", sc.totalDocs())
	open, err := m.countFreqs(ctx, 0, sets[0], size, pr)
	if err != nil {
		return nil, err
	}
	vocabs[0] = m.vocabOf(open, nil)
	for s := 1; s < nScopes; s++ {
		own, err := m.countFreqs(ctx, s, sets[s], size, pr)
		if err != nil {
			return nil, err
		}
		vocabs[s] = m.vocabOf(open, &own)
	}
	open = freqs{}
	m.phraseDisplays()
	t, localOf, err := m.dictionary(vocabs, defs, size)
	if err != nil {
		return nil, err
	}
	nLocal := t.numTerms()
	pr = newProgress(o.Progress, "pairs", sc.totalDocs())
	rank := newProgress(o.Progress, "rank", nScopes)
	// The open part counts every term of the dictionary: a term below MinDF
	// in the open documents may reach it in a group scope. Ranking keeps
	// only the pairs of terms counted in the scope being ranked.
	pcOpen, err := m.countPairs(ctx, 0, sets[0], localOf, nLocal, o.MemoryBudget, pr)
	if err != nil {
		return nil, err
	}
	m.stats.incr += pcOpen.incr
	m.stats.toks += pcOpen.toks
	base, err := m.keepBase(ctx, pcOpen.mem, nScopes > 1)
	if err != nil {
		return nil, err
	}
	pcOpen.mem = nil
	scopeLocal := make([]int32, size)
	for s, v := range vocabs {
		st := &scopeTable{name: sc.scopes[s], docs: uint32(sc.scopeDocs(s)),
			df: make([]uint32, nLocal), tf: make([]uint32, nLocal)}
		for i := range scopeLocal {
			scopeLocal[i] = -1
		}
		for i, id := range v.ids {
			l := localOf[id]
			scopeLocal[id] = l
			st.df[l], st.tf[l] = v.df[i], v.tf[i]
		}
		udf := make([]uint32, nLocal)
		units := pcOpen.units
		var own [][]slot
		if s > 0 {
			pc, err := m.countPairs(ctx, s, sets[s], scopeLocal, nLocal, m.budget(base), pr)
			if err != nil {
				return nil, err
			}
			m.stats.incr += pc.incr
			m.stats.toks += pc.toks
			units += pc.units
			own = pc.mem
			copy(udf, pc.udf)
		}
		for l, n := range pcOpen.udf {
			if st.df[l] > 0 {
				udf[l] += n
			}
		}
		if s > 0 && !full {
			st.base = t.scopes[0] // ranked first; the group keeps a delta
		}
		if err := m.rankScope(ctx, base, own, udf, units, st, s == nScopes-1); err != nil {
			return nil, err
		}
		t.scopes = append(t.scopes, st)
		m.held = heldBytes(t.scopes)
		rank.add(1)
	}
	base.release()
	t.stats = m.stats
	return t, nil
}

// dictionary unites the scopes' vocabularies into the table dictionary in
// key order and returns the table shell and the corpus/phrase-ID to
// table-ID map (-1 where the term is counted in no scope).
func (m *miner) dictionary(vocabs []vocab, defs []phraseDef, size int) (*Table, []int32, error) {
	localOf := make([]int32, size)
	for i := range localOf {
		localOf[i] = -1
	}
	var ids []uint32
	for _, v := range vocabs {
		for _, id := range v.ids {
			if localOf[id] < 0 {
				localOf[id] = 0
				ids = append(ids, id)
			}
		}
	}
	nT := uint32(m.sc.nTerms)
	key := func(id uint32) string {
		if id < nT {
			return m.c.Term(id)
		}
		return defs[id-nT].key
	}
	keys := make([]string, size)
	for _, id := range ids {
		keys[id] = key(id)
	}
	slices.SortFunc(ids, func(a, b uint32) int { return strings.Compare(keys[a], keys[b]) })
	t := &Table{params: m.o.params(), fingerprint: m.sc.fingerprint, nDocs: m.sc.nDocs, corpusTerms: m.sc.nTerms}
	var kb, db strings.Builder
	t.keyOff = make([]uint32, 1, len(ids)+1)
	t.dispOff = make([]uint32, 1, len(ids)+1)
	t.words = make([]uint8, len(ids))
	for l, id := range ids {
		if l > 0 && keys[id] == keys[ids[l-1]] {
			return nil, nil, fmt.Errorf("%w: term %q appears twice in the dictionary", ErrBadCorpus, keys[id])
		}
		localOf[id] = int32(l)
		kb.WriteString(keys[id])
		if id < nT {
			db.WriteString(m.c.Display(id))
			t.words[l] = 1
		} else {
			db.WriteString(defs[id-nT].display)
			t.words[l] = uint8(len(defs[id-nT].parts))
		}
		if kb.Len() > 1<<32-1 || db.Len() > 1<<32-1 {
			return nil, nil, fmt.Errorf("%w: dictionary over 4 GiB", ErrBadCorpus)
		}
		t.keyOff = append(t.keyOff, uint32(kb.Len()))
		t.dispOff = append(t.dispOff, uint32(db.Len()))
	}
	t.keys, t.disp = kb.String(), db.String()
	return t, localOf, nil
}

// phraseDisplays sets each phrase's display to its commonest written form,
// taken from the open documents when the phrase occurs there, else from the
// own documents of the first group scope that has it, so an open display
// never comes from restricted text. (Open documents are rewritten with the
// open phrases only, so a phrase that is not in them has no open forms in
// any scope.)
func (m *miner) phraseDisplays() {
	for i := range m.defs {
		id := uint32(m.sc.nTerms + i)
		for _, counts := range m.phraseSurf {
			forms := counts[id]
			if len(forms) == 0 {
				continue
			}
			best, bestN := "", uint32(0)
			for f, n := range forms {
				if n > bestN || (n == bestN && f < best) {
					best, bestN = f, n
				}
			}
			m.defs[i].display = best
			break
		}
	}
}

// countSurfaces records how the phrases in one rewritten paragraph of a
// part (see scan.own) were written. buf is the rewritten paragraph, which
// began at token a.
func (m *miner) countSurfaces(scope int, sf Surfacer, surf []uint32, buf []uint32, a int) {
	if m.phraseSurf[scope] == nil {
		m.phraseSurf[scope] = map[uint32]map[string]uint32{}
	}
	nT := uint32(m.sc.nTerms)
	pos := a
	for _, t := range buf {
		w := 1
		if t >= nT {
			w = len(m.defs[t-nT].parts)
			if pos+w <= len(surf) {
				words := make([]string, w)
				for k := range words {
					words[k] = sf.Surface(surf[pos+k])
				}
				forms := m.phraseSurf[scope][t]
				if forms == nil {
					forms = map[string]uint32{}
					m.phraseSurf[scope][t] = forms
				}
				forms[strings.Join(words, " ")]++
			}
		}
		pos += w
	}
}

// candBytes is the size of a ranking candidate (cand).
const candBytes = 24

// heldBytes is the memory that ranking a further group scope holds beside
// the pair counts: the scopes' kept neighbour lists and per-term arrays,
// plus the candidate heaps, estimated as the open scope's neighbour
// entries (a group scope has about as many).
func heldBytes(scopes []*scopeTable) int64 {
	var n int64
	for _, st := range scopes {
		n += st.bytes()
	}
	return n + candBytes*int64(len(scopes[0].nb))
}

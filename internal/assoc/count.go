package assoc

import (
	"context"
	"fmt"
	"sync"
)

// vocab is one scope's counted terms: the corpus terms and phrases with
// document frequency >= MinDF there.
type vocab struct {
	ids    []uint32 // corpus or phrase IDs, ascending
	df, tf []uint32 // documents and occurrences, parallel to ids
}

// freqs are one part's document and term frequencies, indexed by corpus or
// phrase ID.
type freqs struct{ df, tf []uint32 }

// countFreqs computes term and document frequencies of part (the open
// documents or a group's own documents, see scan.own) over the tokens
// rewritten by ps, and records phrase surfaces under that part.
func (m *miner) countFreqs(ctx context.Context, part int, ps *phraseSet, size int, pr *progress) (freqs, error) {
	df := make([]uint32, size)
	tf := make([]uint32, size)
	seen := make([]int32, size)
	for i := range seen {
		seen[i] = -1
	}
	var paras []int32
	var buf []uint32
	var gap, gbuf []bool
	sf, hasSurf := m.c.(Surfacer)
	for n, di := range m.sc.own[part] {
		if n&255 == 0 {
			if err := ctx.Err(); err != nil {
				return freqs{}, fmt.Errorf("assoc: vocabulary: %w", err)
			}
		}
		d := m.c.Doc(int(di))
		if err := m.checkTokens(int(di), d.Tokens); err != nil {
			return freqs{}, err
		}
		paras = paragraphs(paras, len(d.Tokens), d.Breaks)
		gap = gapMask(gap, len(d.Tokens), d.Gaps)
		for i := 0; i < len(paras); i += 2 {
			a, b := paras[i], paras[i+1]
			buf, gbuf = ps.replace(buf[:0], d.Tokens[a:b], gap[a:b], gbuf[:0])
			if hasSurf {
				m.countSurfaces(part, sf, sf.DocSurfaces(int(di)), buf, int(a))
			}
			for _, t := range buf {
				tf[t]++
				if seen[t] != di {
					seen[t] = di
					df[t]++
				}
			}
		}
		pr.add(1)
	}
	return freqs{df, tf}, nil
}

// vocabOf returns the terms of base plus own (own nil: base alone) whose
// summed document frequency reaches MinDF.
func (m *miner) vocabOf(base freqs, own *freqs) vocab {
	var v vocab
	for id, n := range base.df {
		tf := base.tf[id]
		if own != nil {
			n += own.df[id]
			tf += own.tf[id]
		}
		if int(n) >= m.o.MinDF {
			v.ids = append(v.ids, uint32(id))
			v.df = append(v.df, n)
			v.tf = append(v.tf, tf)
		}
	}
	return v
}

// pairJob is one document handed to a counting worker: its tokens as table
// IDs (-1 = not counted in this scope) and its passages as flattened
// [start, end) bounds.
type pairJob struct {
	doc   uint32
	toks  []int32
	units []int32
}

// pairCounts is the outcome of counting one scope.
type pairCounts struct {
	udf   []uint32 // passages containing each term
	units int64    // non-empty passages
	mem   [][]slot // the workers' final sorted runs
	incr  int64    // pair increments made (for benchmarks)
	toks  int64    // tokens read
}

type pairWorker struct {
	cnt    *counter
	window int
	udf    []uint32
	stamp  []uint32 // stamp[t] == seq: t is in the current passage's set
	slot   []int32  // position of t in the set, valid when stamped
	seq    uint32
	units  int64
	incr   int64
	set    []int32  // distinct counted terms of the passage
	pos    []int32  // per token: its set position, or -1
	win    []uint32 // window counts, upper triangle of a len(set)^2 matrix
}

// count adds one document: for each passage, every pair of distinct counted
// terms gets one unit and its window co-occurrences, in a single table
// update per pair.
func (w *pairWorker) count(j *pairJob) error {
	for u := 0; u+1 < len(j.units); u += 2 {
		toks := j.toks[j.units[u]:j.units[u+1]]
		w.units++
		w.seq++
		if w.seq == 0 {
			clear(w.stamp)
			w.seq = 1
		}
		set, pos := w.set[:0], w.pos[:0]
		for _, t := range toks {
			if t < 0 {
				pos = append(pos, -1)
				continue
			}
			if w.stamp[t] != w.seq {
				w.stamp[t] = w.seq
				w.slot[t] = int32(len(set))
				set = append(set, t)
			}
			pos = append(pos, w.slot[t])
		}
		n := len(set)
		if need := n * n; len(w.win) < need {
			w.win = make([]uint32, need)
		}
		win := w.win
		for p, a := range pos {
			if a < 0 {
				continue
			}
			for _, b := range pos[p+1 : min(p+w.window+1, len(pos))] {
				if b >= 0 && b != a {
					win[int(min(a, b))*n+int(max(a, b))]++
				}
			}
		}
		for i, a := range set {
			w.udf[a]++
			row := win[i*n : (i+1)*n]
			for k := i + 1; k < n; k++ {
				w.cnt.add(pairKey(uint32(a), uint32(set[k])), j.doc, 1, row[k])
				w.incr += 1 + int64(row[k])
				row[k] = 0
			}
		}
		w.set, w.pos = set, pos
	}
	return w.cnt.endDoc()
}

// countPairs counts passage and window co-occurrences of one part (see
// scan.own) with Options.Workers goroutines, each owning a share of budget.
// localOf maps corpus/phrase IDs to table IDs for the terms counted here.
// Spilled runs are left in the store.
func (m *miner) countPairs(ctx context.Context, part int, ps *phraseSet, localOf []int32, nLocal int,
	budget int64, pr *progress) (*pairCounts, error) {
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	nw := m.o.Workers
	work := make(chan *pairJob, nw)
	free := make(chan *pairJob, 2*nw)
	for range 2 * nw {
		free <- &pairJob{}
	}
	workers := make([]*pairWorker, nw)
	var (
		wg      sync.WaitGroup
		errOnce sync.Once
		werr    error
	)
	for i := range workers {
		w := &pairWorker{cnt: newCounter(budget/int64(nw), m.store), window: m.o.Window,
			udf: make([]uint32, nLocal), stamp: make([]uint32, nLocal), slot: make([]int32, nLocal)}
		workers[i] = w
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range work {
				if ctx.Err() == nil {
					if err := w.count(j); err != nil {
						errOnce.Do(func() { werr = err; cancel() })
					}
				}
				free <- j
			}
		}()
	}
	res := &pairCounts{udf: make([]uint32, nLocal)}
	perr := m.producePairs(ctx, part, ps, localOf, work, free, res, pr)
	close(work)
	wg.Wait()
	if werr != nil {
		return nil, werr
	}
	if perr != nil {
		return nil, perr
	}
	for _, w := range workers {
		for t, n := range w.udf {
			res.udf[t] += n
		}
		res.units += w.units
		res.incr += w.incr
		m.stats.spills += w.cnt.spills
		res.mem = append(res.mem, w.cnt.finish())
	}
	return res, nil
}

// producePairs reads the part's documents, rewrites phrases, maps tokens
// to table IDs, cuts passages and hands documents to the workers.
func (m *miner) producePairs(ctx context.Context, part int, ps *phraseSet, localOf []int32,
	work chan<- *pairJob, free <-chan *pairJob, res *pairCounts, pr *progress) error {
	plen := m.o.PassageLen
	var paras []int32
	var buf []uint32
	var gap, gbuf []bool
	for _, di := range m.sc.own[part] {
		var j *pairJob
		select {
		case <-ctx.Done():
			return fmt.Errorf("assoc: count pairs: %w", ctx.Err())
		case j = <-free:
		}
		d := m.c.Doc(int(di))
		if err := m.checkTokens(int(di), d.Tokens); err != nil {
			return err
		}
		res.toks += int64(len(d.Tokens))
		j.doc, j.toks, j.units = uint32(di), j.toks[:0], j.units[:0]
		paras = paragraphs(paras, len(d.Tokens), d.Breaks)
		gap = gapMask(gap, len(d.Tokens), d.Gaps)
		for i := 0; i < len(paras); i += 2 {
			start := int32(len(j.toks))
			a, b := paras[i], paras[i+1]
			buf, gbuf = ps.replace(buf[:0], d.Tokens[a:b], gap[a:b], gbuf[:0])
			for _, t := range buf {
				j.toks = append(j.toks, localOf[t])
			}
			n := int64(len(buf))
			spans := (n + int64(plen) - 1) / int64(plen)
			for k := int64(0); k < spans; k++ {
				j.units = append(j.units, start+int32(k*n/spans), start+int32((k+1)*n/spans))
			}
		}
		work <- j
		pr.add(1)
	}
	return ctx.Err()
}

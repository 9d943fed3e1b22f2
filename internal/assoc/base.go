package assoc

import (
	"context"
	"os"
	"slices"
)

// Counting the open documents once.
//
// Every count Mine keeps (passages, per-term passage, document and term
// frequencies, pair passage and window counts, supporting documents, and
// the adjacency counts of phrase detection) is a sum over documents. The
// open documents belong to every scope and a group's own documents are
// never open, so a group scope's counts are the open part's counts plus
// the counts over the group's own documents. Mine therefore counts the open
// part once, keeps its sorted runs as baseRuns, and merges them with each
// group's runs, summing equal keys, before ranking or phrase selection.

// baseRuns are the open part's sorted count runs, kept for reuse: run files
// that merges read but do not delete (at most one), and in-memory runs.
type baseRuns struct {
	files []string
	mem   [][]slot
	bytes int64 // memory held by mem
}

// keepBase turns the runs just counted (the store's run files plus mem)
// into baseRuns. With reuse false (no group scope follows) the files stay
// in the store and the one merge that follows consumes them, as for any
// scope. Otherwise, when the part spilled or its memory runs hold more than
// half of Options.MemoryBudget, everything is merged once into a single
// kept file, so that each later merge reads one extra run and the group
// counters keep most of the budget.
func (m *miner) keepBase(ctx context.Context, mem [][]slot, reuse bool) (*baseRuns, error) {
	b := &baseRuns{mem: mem}
	if !reuse {
		return b, nil
	}
	for _, r := range mem {
		b.bytes += int64(cap(r)) * slotBytes
	}
	if !m.store.hasFiles() && b.bytes <= m.o.MemoryBudget/2 {
		return b, nil
	}
	err := m.store.writeFile(func(out func(entry) error) error {
		return mergeAll(ctx, m.store, mem, out)
	})
	if err != nil {
		return nil, err
	}
	b.files, b.mem, b.bytes = m.store.takeFiles(), nil, 0
	return b, nil
}

// merge k-way merges the base runs (kept for the next scope) with the
// store's run files (consumed) and the in-memory runs own.
func (b *baseRuns) merge(ctx context.Context, store *spillStore, own [][]slot, emit func(entry) error) error {
	return mergeKeep(ctx, store, b.files, append(slices.Clip(b.mem), own...), emit)
}

// budget is the memory budget left for counting a group's own documents
// while the base runs are held in memory, less the neighbour lists kept so
// far and the candidate heaps the ranking that follows is expected to need
// (m.held; see rankReserve), but at least an eighth of it.
func (m *miner) budget(b *baseRuns) int64 {
	if b == nil {
		return m.o.MemoryBudget
	}
	return max(m.o.MemoryBudget-b.bytes-m.held, m.o.MemoryBudget/8)
}

// release deletes the kept files and drops the memory runs once no scope
// needs them any more.
func (b *baseRuns) release() {
	for _, f := range b.files {
		os.Remove(f)
	}
	b.files, b.mem, b.bytes = nil, nil, 0
}

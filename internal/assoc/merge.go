package assoc

import (
	"context"
	"fmt"
	"slices"
)

// mergeAll k-way merges the store's run files and the in-memory runs,
// summing the counts of equal keys, and calls emit once per key in
// ascending key order. Run files are consumed (deleted). When there are
// more than mergeFanIn runs, files are first merged in rounds.
func mergeAll(ctx context.Context, store *spillStore, mem [][]slot, emit func(entry) error) error {
	return mergeKeep(ctx, store, nil, mem, emit)
}

// mergeKeep is mergeAll with extra run files that are read but kept (not
// deleted and not merged in rounds), so they can be merged again: the open
// documents' runs, reused by every group scope.
func mergeKeep(ctx context.Context, store *spillStore, kept []string, mem [][]slot, emit func(entry) error) error {
	files := store.takeFiles()
	for len(files)+len(kept)+len(mem) > mergeFanIn && len(files) > 1 {
		k := min(mergeFanIn, len(files))
		group := files[:k:k]
		files = files[k:]
		err := store.writeFile(func(out func(entry) error) error {
			return mergeRuns(ctx, group, nil, nil, out)
		})
		if err != nil {
			return err
		}
		files = append(files, store.takeFiles()...)
	}
	return mergeRuns(ctx, files, kept, mem, emit)
}

type headItem struct {
	e   entry
	src int
}

// mergeRuns merges the given files (deleted afterwards), kept files and
// memory runs in one round.
func mergeRuns(ctx context.Context, files, kept []string, mem [][]slot, emit func(entry) error) (err error) {
	readers := make([]runReader, 0, len(files)+len(kept)+len(mem))
	defer func() {
		for _, r := range readers {
			r.close()
		}
	}()
	for i, f := range slices.Concat(files, kept) {
		r, err := openFileRun(f, i < len(files))
		if err != nil {
			return err
		}
		readers = append(readers, r)
	}
	for _, m := range mem {
		readers = append(readers, &memRun{s: m})
	}
	h := make([]headItem, 0, len(readers))
	for i, r := range readers {
		e, ok, err := r.next()
		if err != nil {
			return err
		}
		if ok {
			h = append(h, headItem{e, i})
		}
	}
	for i := len(h)/2 - 1; i >= 0; i-- {
		siftDown(h, i)
	}
	var cur entry
	have := false
	for n := 0; len(h) > 0; n++ {
		if n&0xffff == 0 {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("assoc: merge: %w", err)
			}
		}
		top := h[0]
		if have && top.e.key == cur.key {
			cur.u += top.e.u
			cur.w += top.e.w
			cur.d += top.e.d
		} else {
			if have {
				if err := emit(cur); err != nil {
					return err
				}
			}
			cur, have = top.e, true
		}
		e, ok, err := readers[top.src].next()
		if err != nil {
			return err
		}
		if ok {
			h[0].e = e
		} else {
			h[0] = h[len(h)-1]
			h = h[:len(h)-1]
		}
		if len(h) > 0 {
			siftDown(h, 0)
		}
	}
	if have {
		return emit(cur)
	}
	return nil
}

func siftDown(h []headItem, i int) {
	for {
		l := 2*i + 1
		if l >= len(h) {
			return
		}
		m := l
		if r := l + 1; r < len(h) && h[r].e.key < h[l].e.key {
			m = r
		}
		if h[i].e.key <= h[m].e.key {
			return
		}
		h[i], h[m] = h[m], h[i]
		i = m
	}
}

package index

import (
	"context"
	"fmt"
	"sync"

	"github.com/blevesearch/bleve/v2"
	"github.com/blevesearch/bleve/v2/search/query"

	"kinword/internal/access"
	"kinword/internal/doc"
	"kinword/internal/text"
)

// Entry is what the index knows of a stored document without reading bleve.
type Entry struct {
	Hash   string
	Source string
}

// Entries returns every indexed document ID with its content hash and
// source, so ingestion can skip unchanged files and remove vanished ones.
func (ix *Index) Entries(ctx context.Context) (map[string]Entry, error) {
	ix.wmu.Lock()
	defer ix.wmu.Unlock()
	out := make(map[string]Entry, len(ix.fwd.docs))
	for id, d := range ix.fwd.docs {
		out[id] = Entry{Hash: d.Hash, Source: d.Source}
	}
	return out, ctx.Err()
}

// analysed is one document run through the pipeline, before term interning.
type analysed struct {
	stems, surfaces []string
	breaks, gaps    []int32
	lang            string
}

func (ix *Index) analyse(d *doc.Document) analysed {
	lang := d.Language
	if lang == "" || !text.ValidLanguage(lang) {
		lang = ix.p.DefaultLanguage()
	}
	a := analysed{lang: lang}
	prev := -1
	ix.p.Analyze(d.Title+"\n\n"+d.Body, lang, func(t text.Token) {
		if t.ParaStart && len(a.stems) > 0 {
			a.breaks = append(a.breaks, int32(len(a.stems)))
		} else if prev >= 0 && t.Pos != prev+1 {
			a.gaps = append(a.gaps, int32(len(a.stems))) // a stopword was removed here
		}
		prev = t.Pos
		a.stems = append(a.stems, t.Stem)
		a.surfaces = append(a.surfaces, t.Surface)
	})
	return a
}

// Put adds or replaces documents (by ID). It writes them to bleve at once;
// the forward store and the searchable snapshot change on Commit.
func (ix *Index) Put(ctx context.Context, docs []doc.Document) error {
	if len(docs) == 0 {
		return nil
	}
	res := make([]analysed, len(docs))
	var wg sync.WaitGroup
	next := make(chan int)
	for w := 0; w < ix.opts.Workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				res[i] = ix.analyse(&docs[i])
			}
		}()
	}
	for i := range docs {
		next <- i
	}
	close(next)
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return err
	}

	ix.wmu.Lock()
	defer ix.wmu.Unlock()
	if err := ix.markDirty(); err != nil {
		return err
	}
	for start := 0; start < len(docs); start += ix.opts.BatchSize {
		end := min(start+ix.opts.BatchSize, len(docs))
		batch := ix.b.NewBatch()
		for i := start; i < end; i++ {
			d := &docs[i]
			if d.ID == "" {
				return fmt.Errorf("index: put: document from %q has no id", d.Source)
			}
			if err := batch.Index(d.ID, bleveDoc(d, res[i].lang)); err != nil {
				return fmt.Errorf("index: put %s: %w", d.ID, err)
			}
		}
		if err := ix.b.Batch(batch); err != nil {
			return fmt.Errorf("index: write batch: %w", err)
		}
	}
	for i := range docs {
		ix.putForward(&docs[i], res[i])
	}
	return nil
}

func (ix *Index) putForward(d *doc.Document, a analysed) {
	f := ix.fwd
	groups := access.NormalizeGroups(d.Groups)
	x := &fwdDoc{ID: d.ID, Source: d.Source, Hash: d.Hash, Lang: a.lang, Dept: d.Department, Groups: groups,
		Tokens: make([]uint32, len(a.stems)), Breaks: a.breaks, Gaps: a.gaps, Surf: make([]uint32, len(a.stems))}
	for i, st := range a.stems {
		x.Tokens[i] = f.intern(st)
		x.Surf[i] = f.internForm(a.surfaces[i])
	}
	scopes := groups
	if len(scopes) == 0 {
		scopes = []string{""}
	}
	for _, sc := range scopes {
		surf := f.surfaces(sc)
		for i, st := range a.stems {
			surf.Add(st, a.surfaces[i])
		}
	}
	f.docs[d.ID] = x
}

// Delete removes documents by ID (unknown IDs are ignored).
func (ix *Index) Delete(ctx context.Context, ids []string) error {
	if len(ids) == 0 {
		return nil
	}
	ix.wmu.Lock()
	defer ix.wmu.Unlock()
	if err := ix.markDirty(); err != nil {
		return err
	}
	batch := ix.b.NewBatch()
	for _, id := range ids {
		batch.Delete(id)
	}
	if err := ix.b.Batch(batch); err != nil {
		return fmt.Errorf("index: delete batch: %w", err)
	}
	for _, id := range ids {
		delete(ix.fwd.docs, id)
	}
	return ctx.Err()
}

func (ix *Index) markDirty() error {
	if ix.dirty {
		return nil
	}
	if err := ix.b.SetInternal(keyDirty, []byte("1")); err != nil {
		return fmt.Errorf("index: mark dirty: %w", err)
	}
	ix.dirty = true
	return nil
}

// Commit makes writes durable and searchable: it saves the forward store,
// records the new generation in bleve, and swaps in a fresh snapshot.
func (ix *Index) Commit(ctx context.Context) error {
	ix.wmu.Lock()
	defer ix.wmu.Unlock()
	if !ix.dirty {
		return nil
	}
	ix.fwd.gen++
	if err := ix.fwd.save(ix.forwardPath()); err != nil {
		ix.fwd.gen--
		return err
	}
	batch := ix.b.NewBatch()
	batch.SetInternal(keyGen, []byte(fmt.Sprint(ix.fwd.gen)))
	batch.DeleteInternal(keyDirty)
	if err := ix.b.Batch(batch); err != nil {
		return fmt.Errorf("index: commit: %w", err)
	}
	ix.dirty = false
	ix.snap.Store(buildSnapshot(ix.fwd))
	return ctx.Err()
}

// rebuildForward re-derives the forward store from bleve's stored fields.
func (ix *Index) rebuildForward(ctx context.Context) (*forward, error) {
	ix.fwd = newForward()
	req := bleve.NewSearchRequestOptions(query.NewMatchAllQuery(), 1000, 0, false)
	req.Fields = []string{"*"}
	req.SortBy([]string{"_id"})
	for {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		res, err := ix.b.SearchInContext(ctx, req)
		if err != nil {
			return nil, fmt.Errorf("index: rebuild forward: %w", err)
		}
		if len(res.Hits) == 0 {
			break
		}
		for _, h := range res.Hits {
			d := storedDoc(h.ID, h.Fields)
			ix.putForward(&d, ix.analyse(&d))
		}
		last := res.Hits[len(res.Hits)-1]
		req.SearchAfter = []string{last.ID}
	}
	return ix.fwd, nil
}

package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"time"

	"kinword/internal/assoc"
	"kinword/internal/index"
	"kinword/internal/progress"
)

func init() {
	register(&command{name: "mine", summary: "mine term associations and phrases from the index into the association table (per access scope)",
		usage: "[--collection DIR] [--budget MiB] [--window W] [--min-df N] [--top-k K] [--data DIR]", run: runMine})
}

// tableFile is the association table's place in the data folder.
func (e *env) tableFile() string { return filepath.Join(e.dataDir, "assoc.kwa") }

// indexCorpus shows an index snapshot to the miner: every document, with its
// groups, so that the miner builds one table per access scope. Display forms
// come from open documents only, so a form seen only in restricted
// documents never reaches the open table.
type indexCorpus struct {
	all  *index.View
	open *index.View
}

func (c indexCorpus) NumDocs() int { return c.all.NumDocs() }
func (c indexCorpus) Doc(i int) assoc.DocTerms {
	toks, br := c.all.Tokens(uint32(i))
	return assoc.DocTerms{Tokens: toks, Breaks: br, Gaps: c.all.Gaps(uint32(i)), Groups: c.all.DocGroups(uint32(i))}
}
func (c indexCorpus) DocSurfaces(i int) []uint32 { return c.all.DocSurfaces(uint32(i)) }
func (c indexCorpus) Surface(id uint32) string   { return c.all.Surface(id) }
func (c indexCorpus) NumTerms() int              { return c.all.NumTerms() }
func (c indexCorpus) Term(id uint32) string      { return c.all.Term(id) }
func (c indexCorpus) Display(id uint32) string   { return c.open.Display(c.all.Term(id)) }

func runMine(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("mine", e.stderr)
	col := fs.String("collection", "", "first ingest a collection folder (docs.jsonl or docs/) into the data folder")
	budget := fs.Int("budget", 1024, "memory budget of the whole mine, MiB; counts beyond it spill to sorted runs on disk (same result)")
	window := fs.Int("window", assoc.DefaultWindow, "co-occurrence window, ± tokens")
	minDF := fs.Int("min-df", assoc.DefaultMinDF, "minimum document frequency of a mined term")
	topK := fs.Int("top-k", assoc.DefaultTopK, "neighbours kept per term and scope")
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	if *budget < 16 {
		return usagef("--budget must be at least 16 MiB")
	}
	dir, err := prepareMine(ctx, e, *col)
	if err != nil {
		return err
	}
	ff, err := index.OpenForward(dir)
	if err != nil {
		return err
	}
	defer ff.Close()
	corpus := &fileCorpus{ff: ff}
	total := int64(*budget) << 20
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	base := int64(ms.HeapAlloc) + 64<<20 // dictionaries, offsets, runtime and slack
	if total-base < 16<<20 {
		return usagef("--budget %d MiB is below what the dictionaries need (%d MiB)", *budget, (base>>20)+16)
	}
	debug.SetMemoryLimit(total)
	bar := progress.New(e.stderr, "mine", 0, progress.Options{Unit: "units", Quiet: e.json})
	phase := ""
	start := time.Now()
	tbl, err := assoc.Mine(ctx, corpus, assoc.Options{
		Window: *window, MinDF: *minDF, TopK: *topK,
		MemoryBudget: total - base, TempDir: e.dataDir,
		Progress: func(p string, done, total int) {
			if p != phase {
				phase = p
				bar.Phase("mine: "+p, total)
			}
			bar.Set(done)
		},
	})
	bar.Finish()
	if err == nil {
		err = corpus.err
	}
	if err != nil {
		return err // the previous table, if any, is untouched
	}
	if err := tbl.Write(e.tableFile()); err != nil {
		return err
	}
	el := time.Since(start).Seconds()
	info, rs := tbl.Info(), tbl.RunStats()
	st, _ := os.Stat(e.tableFile())
	if e.json {
		return e.printJSON(map[string]any{"table": e.tableFile(), "bytes": st.Size(), "seconds": el, "info": info,
			"spills": rs.Spills, "tokens": rs.Tokens, "tokens_per_second": float64(rs.Tokens) / el,
			"pair_increments": rs.PairIncrements, "pairs_per_second": float64(rs.PairIncrements) / el})
	}
	fmt.Fprintf(e.stdout, "mined %d documents in %.1f s: %s (%.1f MiB, %d terms, %d phrases, %d scopes, %d spills)\n",
		ff.NumDocs(), el, e.tableFile(), float64(st.Size())/(1<<20), info.Terms, info.Phrases, len(info.Scopes), rs.Spills)
	return nil
}

// fileCorpus shows the forward file to the miner. The first read error is
// kept and reported after Mine (the Corpus interface has no error return).
type fileCorpus struct {
	ff  *index.ForwardFile
	err error
}

func (c *fileCorpus) NumDocs() int { return c.ff.NumDocs() }
func (c *fileCorpus) Doc(i int) assoc.DocTerms {
	d, err := c.ff.Doc(i)
	if err != nil {
		if c.err == nil {
			c.err = err
		}
		return assoc.DocTerms{}
	}
	return assoc.DocTerms{Tokens: d.Tokens, Breaks: d.Breaks, Gaps: d.Gaps, Groups: d.Groups}
}
func (c *fileCorpus) DocSurfaces(i int) []uint32 {
	d, err := c.ff.Doc(i)
	if err != nil {
		return nil
	}
	return d.Surf
}
func (c *fileCorpus) Surface(id uint32) string { return c.ff.Surface(id) }
func (c *fileCorpus) NumTerms() int            { return c.ff.NumTerms() }
func (c *fileCorpus) Term(id uint32) string    { return c.ff.Term(id) }
func (c *fileCorpus) Display(id uint32) string { return c.ff.OpenDisplay(c.ff.Term(id)) }

// prepareMine ingests a collection first if asked, checks the index is not
// empty, and closes it, so that nothing of the in-memory index stays
// reachable while mining streams the forward file. It returns the index
// folder.
func prepareMine(ctx context.Context, e *env, col string) (string, error) {
	if col == "" {
		// Nothing to ingest: check the forward file directly rather than
		// loading the whole index into memory just to see it is not empty.
		dir := filepath.Join(e.dataDir, "index")
		ff, err := index.OpenForward(dir)
		if errors.Is(err, os.ErrNotExist) {
			return "", fmt.Errorf("mine: no index in %s: ingest documents first (or pass --collection)", e.dataDir)
		}
		if err != nil {
			return "", err
		}
		n := ff.NumDocs()
		ff.Close()
		if n == 0 {
			return "", fmt.Errorf("mine: the index in %s is empty: ingest documents first (or pass --collection)", e.dataDir)
		}
		return dir, nil
	}
	ix, err := e.openIndex(ctx)
	if err != nil {
		return "", err
	}
	defer ix.Close()
	if _, err := ingestCollection(ctx, e, ix, col); err != nil {
		return "", err
	}
	if ix.Len() == 0 {
		return "", fmt.Errorf("mine: the index in %s is empty: ingest documents first (or pass --collection)", e.dataDir)
	}
	return ix.Dir(), ix.Close()
}

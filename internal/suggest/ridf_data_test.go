package suggest

import (
	"bufio"
	"encoding/json"
	"kinword/internal/testenv"
	"os"
	"path/filepath"
	"testing"
)

func collections(t *testing.T) string { return testenv.Collections(t) }

// collStats are document and collection frequencies of a test collection
// analysed by the shared text pipeline.
type collStats struct {
	n      int
	ids    map[string]uint32
	df, cf []int
}

func (c *collStats) N() int             { return c.n }
func (c *collStats) TotalLen() int64    { return 0 }
func (c *collStats) AvgDL() float64     { return 0 }
func (c *collStats) DF(id uint32) int   { return c.df[id] }
func (c *collStats) CF(id uint32) int64 { return int64(c.cf[id]) }

func loadCollection(t *testing.T, path string) *collStats {
	t.Helper()
	fh, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	c := &collStats{ids: map[string]uint32{}}
	sc := bufio.NewScanner(fh)
	sc.Buffer(make([]byte, 1<<20), 1<<24)
	for sc.Scan() {
		var d struct{ Text string }
		if err := json.Unmarshal(sc.Bytes(), &d); err != nil {
			t.Fatal(err)
		}
		c.n++
		seen := map[uint32]bool{}
		for _, s := range pipe.Terms(d.Text, "") {
			id, ok := c.ids[s]
			if !ok {
				id = uint32(len(c.df))
				c.ids[s] = id
				c.df, c.cf = append(c.df, 0), append(c.cf, 0)
			}
			c.cf[id]++
			if !seen[id] {
				seen[id] = true
				c.df[id]++
			}
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return c
}

// TestDefaultMinResidualIDFOnCollections is the data behind
// DefaultMinResidualIDF: on the Cranfield collection (Cleverdon, 1960s;
// 1,400 aeronautics abstracts) and CISI (1,460 information-science
// abstracts), the reporting words of abstracts fall below the default and
// each collection's topical words above it. The word lists are our
// judgement of what is generic and what is topical in those fields.
func TestDefaultMinResidualIDFOnCollections(t *testing.T) {
	dir := collections(t)
	cases := []struct {
		coll             string
		generic, topical []string
	}{
		{"cranfield", []string{"present", "discuss", "result", "describ", "made", "shown", "obtain", "consid", "given", "use"},
			[]string{"flutter", "nozzl", "buckl", "shock", "heat", "wing", "layer", "cylind", "boundari"}},
		{"cisi", []string{"present", "discuss", "result", "describ", "made", "general", "possibl", "well", "suggest"},
			[]string{"librari", "index", "citat", "journal", "document", "retriev", "search", "languag"}},
	}
	for _, c := range cases {
		t.Run(c.coll, func(t *testing.T) {
			st := loadCollection(t, filepath.Join(dir, c.coll, "docs.jsonl"))
			check := func(w string, wantGeneric bool) {
				id, ok := st.ids[w]
				if !ok {
					t.Fatalf("%q not in %s", w, c.coll)
				}
				r := ResidualIDF(st, id)
				if (r < DefaultMinResidualIDF) != wantGeneric || st.df[id] < DefaultResidualIDFMinDF {
					t.Errorf("%s: %q (df %d, cf %d) residual IDF %.3f; generic expected %v", c.coll, w, st.df[id], st.cf[id], r, wantGeneric)
				}
			}
			for _, w := range c.generic {
				check(w, true)
			}
			for _, w := range c.topical {
				check(w, false)
			}
		})
	}
}

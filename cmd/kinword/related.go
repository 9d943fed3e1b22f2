package main

import (
	"context"
	"fmt"
	"strings"
	"text/tabwriter"

	"kinword/internal/access"
	"kinword/internal/assoc"
	"kinword/internal/text"
)

func init() {
	register(&command{name: "related", summary: "list a term's mined neighbours with every measure and the 2x2 counts, as a viewer",
		usage: "TERM [--viewer dept=DEPT,groups=G1+G2] [--measure llr|npmi|pmi|chi2|dice|cond|tscore] [--k N] [--json]", run: runRelated})
}

type relatedNeighbour struct {
	// Kind is "neighbour" (a co-occurring term) or "phrase" (a mined
	// phrase containing the asked word, its natural refinement).
	Kind     string  `json:"kind"`
	Term     string  `json:"term"`
	Display  string  `json:"display"`
	Score    float64 `json:"score"`
	LLR      float64 `json:"llr"`
	PMI      float64 `json:"pmi"`
	NPMI     float64 `json:"npmi"`
	Chi2     float64 `json:"chi2"`
	Dice     float64 `json:"dice"`
	CondProb float64 `json:"cond_prob"`
	TScore   float64 `json:"t_score"`
	K11      int     `json:"k11"`
	K12      int     `json:"k12"`
	K21      int     `json:"k21"`
	K22      int     `json:"k22"`
	Window   int     `json:"window"`
	Docs     int     `json:"docs"`
	Scope    string  `json:"scope"`
}

func runRelated(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("related", e.stderr)
	var viewer viewerFlag
	fs.Var(&viewer, "viewer", "who is asking: dept=DEPT,groups=G1+G2 (default anonymous: open documents only)")
	measure := fs.String("measure", "llr", "ranking measure: llr, npmi, pmi, chi2, dice, cond or tscore")
	k := fs.Int("k", 20, "neighbours to list")
	pos, err := e.parse(fs, c, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("a TERM is required")
	}
	m, err := assoc.ParseMeasure(*measure)
	if err != nil {
		return usagef("%v", err)
	}
	p, err := text.NewPipeline(e.cfg.Language)
	if err != nil {
		return err
	}
	raw := strings.Join(pos, " ")
	key := p.Key(raw, "")
	if key == "" {
		return usagef("%q has no searchable words", raw)
	}
	tbl, err := assoc.Load(e.tableFile())
	if err != nil {
		return fmt.Errorf("related: %w (run kinword mine first)", err)
	}
	out := relatedList(tbl, viewer.v, key, m, *k)
	if e.json {
		if out == nil {
			out = []relatedNeighbour{}
		}
		return e.printJSON(map[string]any{"term": key, "query": raw, "viewer": viewer.v, "measure": *measure, "neighbours": out})
	}
	if len(out) == 0 {
		fmt.Fprintf(e.stdout, "no neighbours of %q for %s\n", raw, describeViewer(viewer.v))
		return nil
	}
	tw := tabwriter.NewWriter(e.stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintf(tw, "related\tkind\tllr\tnpmi\tpmi\tdice\tP(b|a)\tk11\tk12\tk21\tk22\tdocs\tscope\n")
	for _, n := range out {
		if n.Kind == "phrase" {
			fmt.Fprintf(tw, "%s\t%s\t-\t-\t-\t-\t-\t-\t-\t-\t-\t%d\t%s\n", n.Display, n.Kind, n.Docs, n.Scope)
			continue
		}
		fmt.Fprintf(tw, "%s\t%s\t%.1f\t%.3f\t%.2f\t%.3f\t%.3f\t%d\t%d\t%d\t%d\t%d\t%s\n", n.Display, n.Kind, n.LLR, n.NPMI, n.PMI, n.Dice, n.CondProb, n.K11, n.K12, n.K21, n.K22, n.Docs, n.Scope)
	}
	return tw.Flush()
}

// maxPhrasesShown caps the phrases listed before a word's neighbours.
const maxPhrasesShown = 3

// relatedList is a single word's phrases (most documents first, at most
// three) followed by its neighbours; a phrase key gets neighbours only.
func relatedList(tbl *assoc.Table, v access.Viewer, key string, m assoc.Measure, k int) []relatedNeighbour {
	var out []relatedNeighbour
	if !strings.Contains(key, " ") {
		for i, p := range tbl.PhrasesWith(v, key) {
			if i == maxPhrasesShown || len(out) == k {
				break
			}
			out = append(out, relatedNeighbour{Kind: "phrase", Term: p.Key, Display: p.Display, Docs: p.Docs})
		}
	}
	shown := map[string]bool{}
	for _, r := range out {
		shown[r.Term] = true
	}
	for _, n := range tbl.Related(v, key, m, k) {
		if len(out) == k {
			break
		}
		if shown[n.Term] {
			continue
		}
		out = append(out, relatedNeighbour{Kind: "neighbour", Term: n.Term, Display: n.Display, Score: n.Score, LLR: n.LLR, PMI: n.PMI, NPMI: n.NPMI,
			Chi2: n.Chi2, Dice: n.Dice, CondProb: n.CondProb, TScore: n.TScore, K11: n.K11, K12: n.K12, K21: n.K21, K22: n.K22,
			Window: n.Window, Docs: n.Docs, Scope: n.Scope})
	}
	return out
}

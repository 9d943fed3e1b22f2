package main

import (
	"context"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"kinword/internal/access"
	"kinword/internal/demo"
	"kinword/internal/eval"
	"kinword/internal/finder"
	"kinword/internal/prefs"
	"kinword/internal/text"
)

func init() {
	register(&command{name: "simulate", summary: "simulate searchers of each department accepting suggestions (cascade click model) and report how learning raises acceptance",
		usage: "[--sessions N] [--seed S] [--corpus DIR] [--data DIR] [--record] [--json]", run: runSimulate})
}

// simDept is one department's simulated searchers and results.
type simDept struct {
	Department string    `json:"department"`
	Topics     int       `json:"topics"`
	Sessions   int       `json:"sessions"`
	Acceptance float64   `json:"acceptance"` // over the last window
	Oracle     float64   `json:"oracle_acceptance"`
	NDCGBefore float64   `json:"ndcg_before"`
	NDCGAfter  float64   `json:"ndcg_after"`
	Curve      []float64 `json:"curve"` // acceptance per window, in order
	topics     []demo.Topic
	prefer     map[string]map[string]bool // qid -> preferred keys
	win        [][2]int                   // per window: accepted, sessions
	ndcg       [2][]float64               // first and last window: nDCG@10 of accepted searches
}

func runSimulate(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("simulate", e.stderr)
	sessions := fs.Int("sessions", 2000, "simulated searches per department")
	seed := fs.Uint64("seed", 1, "random seed")
	window := fs.Int("window", 200, "sessions per reported window")
	corpus := fs.String("corpus", filepath.Join("testdata", "tarnwick"), "demo corpus with preferences.tsv")
	record := fs.Bool("record", false, "also write the simulated traffic (impressions, accepts, result clicks) into the data folder's event store, spread over the last 30 days")
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	if c.data == "" {
		e.dataDir = filepath.Join(e.cfg.DataDir, "demo")
	}
	j, err := demo.LoadJudged(*corpus)
	if err != nil {
		return err
	}
	p, err := text.NewPipeline(e.cfg.Language)
	if err != nil {
		return err
	}
	f, err := finder.Open(ctx, e.dataDir, p, finder.Options{BM25: e.bm25(), Limits: e.queryLimits(), AcceptWeight: e.cfg.Search.AcceptedWeight})
	if err != nil {
		return fmt.Errorf("simulate: %w (run kinword demo first)", err)
	}
	defer f.Close()
	if f.Status().Documents == 0 {
		return fmt.Errorf("simulate: no documents in %s (run kinword demo first, or give --data)", e.dataDir)
	}
	depts := simDepartments(j, p)
	var rec *simRecorder
	if *record {
		st, err := e.openStore(ctx)
		if err != nil {
			return err
		}
		defer st.Close()
		rec = newSimRecorder(st, j, *seed, time.Now().UTC(), *sessions*len(depts))
	}
	rng := rand.New(rand.NewPCG(*seed, *seed+1))
	var events []prefs.Event
	at := time.Date(2026, 6, 1, 8, 0, 0, 0, time.UTC)
	cascade := prefs.CascadeOptions{}
	for i := 0; i < *sessions; i++ {
		for _, d := range depts {
			t := d.topics[rng.IntN(len(d.topics))]
			sess := fmt.Sprintf("%s-%d", d.Department, i)
			resp, err := f.Search(ctx, finder.Request{Query: t.Text, Viewer: access.Viewer{Department: d.Department}, Impression: sess + "-imp"})
			if err != nil {
				return err
			}
			shown := make([]string, len(resp.Suggestions))
			for k, s := range resp.Suggestions {
				shown[k] = s.Term
			}
			pos := prefs.SimulateSession(rng, shown, d.prefer[t.ID], cascade)
			events = append(events, prefs.SessionEvents(sess, d.Department, f.CanonicalQuery(t.Text), at, shown, pos)...)
			if rec != nil {
				if err := rec.session(ctx, f, d.Department, t, shown, pos); err != nil {
					return err
				}
			}
			w := i / *window
			for len(d.win) <= w {
				d.win = append(d.win, [2]int{})
			}
			d.win[w][1]++
			if pos >= 0 {
				d.win[w][0]++
				if w == 0 || i >= *sessions-*window {
					nd, err := acceptedNDCG(ctx, f, d.Department, t, shown[pos], j.Qrels[t.ID])
					if err != nil {
						return err
					}
					k := 0
					if w > 0 {
						k = 1
					}
					d.ndcg[k] = append(d.ndcg[k], nd)
				}
			}
			at = at.Add(time.Minute)
		}
		if (i+1)%100 == 0 {
			f.SetModel(prefs.Build(events, at, prefs.Options{Seed: *seed}))
		}
	}
	for _, d := range depts {
		d.Sessions = *sessions
		for _, w := range d.win {
			d.Curve = append(d.Curve, float64(w[0])/float64(max(1, w[1])))
		}
		d.Acceptance = d.Curve[len(d.Curve)-1]
		d.Oracle = oracleAcceptance(d, cascade)
		d.NDCGBefore, d.NDCGAfter = mean(d.ndcg[0]), mean(d.ndcg[1])
	}
	amb, err := ambiguousTops(ctx, f, j)
	if err != nil {
		return err
	}
	if rec == nil {
		return reportSimulation(e, depts, amb)
	}
	stored, err := rec.flush(ctx)
	if err != nil {
		return err
	}
	if err := reportSimulation(e, depts, amb); err != nil {
		return err
	}
	// The JSON document on stdout stays as without --record.
	out := e.stdout
	if e.json {
		out = e.stderr
	}
	fmt.Fprintln(out, rec.summary(stored))
	return nil
}

// ambiguousTop is one ambiguous query's first suggestion per asking
// department after learning.
type ambiguousTop struct {
	Topic string            `json:"topic"`
	Query string            `json:"query"`
	Top   map[string]string `json:"top"` // department -> first suggestion's display
	// Elsewhere is what a department that never searched the topic is
	// offered (the first such department by name): the organisation-wide
	// estimate, as all its departments' clicks shape it.
	Elsewhere struct {
		Department  string   `json:"department"`
		Suggestions []string `json:"suggestions"`
	} `json:"elsewhere"`
}

func ambiguousTops(ctx context.Context, f *finder.Finder, j *demo.Judged) ([]ambiguousTop, error) {
	var out []ambiguousTop
	pairs := j.AmbiguousPairs()
	bases := make([]string, 0, len(pairs))
	for b := range pairs {
		bases = append(bases, b)
	}
	sort.Strings(bases)
	for _, b := range bases {
		a := ambiguousTop{Topic: b, Top: map[string]string{}}
		for _, t := range pairs[b] {
			a.Query = t.Text
			resp, err := f.Search(ctx, finder.Request{Query: t.Text, Viewer: access.Viewer{Department: t.Department}, Impression: "report-" + t.ID})
			if err != nil {
				return nil, err
			}
			if len(resp.Suggestions) > 0 {
				a.Top[t.Department] = resp.Suggestions[0].Display
			}
		}
		for _, d := range allDepartments(j) {
			if _, searched := a.Top[d]; searched {
				continue
			}
			resp, err := f.Search(ctx, finder.Request{Query: a.Query, Viewer: access.Viewer{Department: d}, Impression: "report-elsewhere-" + b})
			if err != nil {
				return nil, err
			}
			a.Elsewhere.Department = d
			for _, s := range resp.Suggestions {
				a.Elsewhere.Suggestions = append(a.Elsewhere.Suggestions, s.Display)
			}
			break
		}
		out = append(out, a)
	}
	return out, nil
}

// allDepartments lists the departments of the judged topics, sorted.
func allDepartments(j *demo.Judged) []string {
	seen := map[string]bool{}
	var out []string
	for _, t := range j.Topics {
		if t.Department != "" && !seen[t.Department] {
			seen[t.Department] = true
			out = append(out, t.Department)
		}
	}
	sort.Strings(out)
	return out
}

// simDepartments groups the ambiguous topic sides with preferred terms by
// department; preferred terms are keyed through the pipeline as
// suggestions are.
func simDepartments(j *demo.Judged, p *text.Pipeline) []*simDept {
	by := map[string]*simDept{}
	for _, t := range j.Topics {
		prefsFor := j.Preferences[t.ID]
		if len(prefsFor) == 0 {
			continue
		}
		d := by[t.Department]
		if d == nil {
			d = &simDept{Department: t.Department, prefer: map[string]map[string]bool{}}
			by[t.Department] = d
		}
		d.topics = append(d.topics, t)
		keys := map[string]bool{}
		for _, term := range prefsFor {
			keys[p.Key(term, "")] = true
		}
		d.prefer[t.ID] = keys
	}
	var out []*simDept
	for _, d := range by {
		d.Topics = len(d.topics)
		sort.Slice(d.topics, func(a, b int) bool { return d.topics[a].ID < d.topics[b].ID })
		out = append(out, d)
	}
	sort.Slice(out, func(a, b int) bool { return out[a].Department < out[b].Department })
	return out
}

// oracleAcceptance is the cascade model's acceptance for a list made of
// the topic's preferred terms (up to five), averaged over the topics.
func oracleAcceptance(d *simDept, c prefs.CascadeOptions) float64 {
	sum := 0.0
	for _, t := range d.topics {
		var shown []string
		for k := range d.prefer[t.ID] {
			shown = append(shown, k)
		}
		sort.Strings(shown)
		if len(shown) > 5 {
			shown = shown[:5]
		}
		probs := prefs.CascadeProbabilities(shown, d.prefer[t.ID], c)
		sum += 1 - probs[len(probs)-1]
	}
	return sum / float64(len(d.topics))
}

// acceptedNDCG is nDCG@10 of the search with the accepted term.
func acceptedNDCG(ctx context.Context, f *finder.Finder, dept string, t demo.Topic, term string, judged map[string]int) (float64, error) {
	resp, err := f.Search(ctx, finder.Request{Query: t.Text, Accepted: []string{term}, Viewer: access.Viewer{Department: dept}, WithResults: true})
	if err != nil {
		return 0, err
	}
	ids := make([]string, len(resp.Results))
	for i, r := range resp.Results {
		ids[i] = r.ID
	}
	return eval.NDCGAt(ids, judged, 10), nil
}

func mean(xs []float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	s := 0.0
	for _, x := range xs {
		s += x
	}
	return s / float64(len(xs))
}

func reportSimulation(e *env, depts []*simDept, amb []ambiguousTop) error {
	if e.json {
		return e.printJSON(map[string]any{"departments": depts, "ambiguous": amb})
	}
	fmt.Fprintf(e.stdout, "%-26s %6s %8s %10s %8s %8s %8s  curve\n", "department", "topics", "accept", "oracle", "ratio", "nDCG0", "nDCG1")
	for _, d := range depts {
		var cv []string
		for _, x := range d.Curve {
			cv = append(cv, fmt.Sprintf("%.2f", x))
		}
		fmt.Fprintf(e.stdout, "%-26s %6d %8.3f %10.3f %8.2f %8.3f %8.3f  %s\n", d.Department, d.Topics, d.Acceptance, d.Oracle,
			d.Acceptance/max(d.Oracle, 1e-9), d.NDCGBefore, d.NDCGAfter, strings.Join(cv, " "))
	}
	differ := 0
	fmt.Fprintln(e.stdout, "\nfirst suggestion per department on the ambiguous queries, after learning:")
	for _, a := range amb {
		var parts []string
		seen := map[string]bool{}
		for dept, top := range a.Top {
			parts = append(parts, dept+": "+top)
			seen[top] = true
		}
		sort.Strings(parts)
		if len(seen) > 1 {
			differ++
		}
		fmt.Fprintf(e.stdout, "  %s %q  %s\n", a.Topic, a.Query, strings.Join(parts, "; "))
	}
	fmt.Fprintf(e.stdout, "%d of %d ambiguous queries show different first suggestions to their two departments\n", differ, len(amb))
	return nil
}

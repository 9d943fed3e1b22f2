package gen

import (
	"fmt"
	"maps"
	"net/url"
	"slices"
	"strings"
)

// Generator holds the vocabulary and the per-department word distributions
// for one resolved Options. It is immutable after New and safe for
// concurrent use; each Generate or WriteJSONL call keeps its own state.
type Generator struct {
	opts   Options
	words  []string
	common aliasTable // ranks outside the topical band, shared
	// bandCut is P(band) as a 64-bit threshold: a token comes from the
	// department's band table when a uniform word falls below it.
	bandCut uint64
	depts   []department
	canary  []string // canary term per group index; "" for none
}

// department is one department's share of the model.
type department struct {
	name      string
	urlPrefix string
	band      aliasTable // band ranks, department's topic words boosted
	topic     []int32    // boosted ranks, ascending
	phrases   [][]int32  // fixed recurring phrases (ranks)
	phraseCum []float64  // cumulative pick probabilities of phrases
}

// Shape of the topical skew. The band is a run of mid-frequency ranks that
// is dealt out to the departments; within its own department a band word
// is boosted, elsewhere damped, so that averaged over departments every
// word keeps its Zipf probability.
const (
	maxBoost        = 4.0
	phrasesPerDept  = 4
	phraseTopicPool = 2 // phrases use the more frequent 1/phraseTopicPool of the topic
)

// New resolves opts (filling defaults, validating) and builds the
// vocabulary and distributions. Building the default model takes a few
// tens of milliseconds.
func New(opts Options) (*Generator, error) {
	o, err := opts.resolve()
	if err != nil {
		return nil, err
	}
	reserved := make(map[string]bool, len(o.CanaryTerms))
	for _, t := range o.CanaryTerms {
		reserved[t] = true
	}
	g := &Generator{opts: o, words: buildLexicon(o.Seed, o.VocabSize, reserved)}
	g.canary = make([]string, len(o.Groups))
	for i, grp := range o.Groups {
		g.canary[i] = o.CanaryTerms[grp]
	}
	g.buildDistributions()
	return g, nil
}

// bandBounds returns the topical band [lo, hi) of ranks (0-based).
func bandBounds(vocab, depts int) (lo, hi int) {
	lo = max(2*len(functionWords), vocab/500)
	hi = min(max(lo+64*depts, vocab/16), vocab)
	return lo, hi
}

func (g *Generator) buildDistributions() {
	o := g.opts
	nd := len(o.Departments)
	weights := zipfWeights(o.VocabSize, o.ZipfS)
	lo, hi := bandBounds(o.VocabSize, nd)

	var total, band float64
	var commonVals []int32
	var commonW []float64
	for r, w := range weights {
		total += w
		if r >= lo && r < hi {
			band += w
			continue
		}
		commonVals = append(commonVals, int32(r))
		commonW = append(commonW, w)
	}
	g.common = newAliasTable(commonVals, commonW)
	g.bandCut = fraction64(band / total)

	// Deal the band out in blocks of nd ranks, each block permuted, so
	// every department gets words of every frequency and nearly equal mass.
	var r rng
	r.seed(o.Seed, topicStream)
	owner := make([]int, hi-lo)
	perm := make([]int, nd)
	for i := range perm {
		perm[i] = i
	}
	for b := 0; b < len(owner); b += nd {
		shuffle(&r, perm)
		for j := 0; j < nd && b+j < len(owner); j++ {
			owner[b+j] = perm[j]
		}
	}
	boost := max(1, min(maxBoost, 0.75*float64(nd)))
	damp := 1.0
	if nd > 1 {
		damp = (float64(nd) - boost) / float64(nd-1)
	}

	bandVals := make([]int32, hi-lo)
	for i := range bandVals {
		bandVals[i] = int32(lo + i)
	}
	g.depts = make([]department, nd)
	for d, name := range o.Departments {
		dep := &g.depts[d]
		dep.name = name
		dep.urlPrefix = "https://intranet.tarnwick.example/" + url.PathEscape(name) + "/"
		bw := make([]float64, hi-lo)
		for i := range bw {
			bw[i] = weights[lo+i] * damp
			if owner[i] == d {
				bw[i] = weights[lo+i] * boost
				dep.topic = append(dep.topic, int32(lo+i))
			}
		}
		dep.band = newAliasTable(bandVals, bw)
		dep.phrases, dep.phraseCum = makePhrases(&r, dep.topic)
	}
}

// makePhrases builds the department's fixed phrases of 2 and 3 words from
// its more frequent topic words; phrase k recurs with weight 1/(k+1).
func makePhrases(r *rng, topic []int32) ([][]int32, []float64) {
	pool := slices.Clone(topic[:max(1, len(topic)/phraseTopicPool)])
	shuffle(r, pool)
	phrases := make([][]int32, phrasesPerDept)
	cum := make([]float64, phrasesPerDept)
	next, sum := 0, 0.0
	for k := range phrases {
		n := 2 + k%2
		for range n {
			phrases[k] = append(phrases[k], pool[next%len(pool)])
			next++
		}
		sum += 1 / float64(k+1)
		cum[k] = sum
	}
	for k := range cum {
		cum[k] /= sum
	}
	return phrases, cum
}

// shuffle is a Fisher-Yates shuffle (Knuth 1997, Algorithm P).
func shuffle[T any](r *rng, s []T) {
	for i := len(s) - 1; i > 0; i-- {
		j := r.intn(i + 1)
		s[i], s[j] = s[j], s[i]
	}
}

// Options returns the resolved options (defaults filled in).
func (g *Generator) Options() Options {
	o := g.opts
	o.Departments = slices.Clone(o.Departments)
	o.Groups = slices.Clone(o.Groups)
	o.CanaryTerms = maps.Clone(o.CanaryTerms)
	return o
}

// Vocabulary returns the words in rank order (index 0 is rank 1, the most
// frequent); the function words come first.
func (g *Generator) Vocabulary() []string { return slices.Clone(g.words) }

// TopicWords returns the words boosted in department's documents, most
// frequent first, or an error wrapping ErrUnknownDepartment.
func (g *Generator) TopicWords(department string) ([]string, error) {
	d, err := g.department(department)
	if err != nil {
		return nil, err
	}
	out := make([]string, len(d.topic))
	for i, r := range d.topic {
		out[i] = g.words[r]
	}
	return out, nil
}

// Phrases returns the department's recurring phrases (words joined by a
// space), most frequent first.
func (g *Generator) Phrases(department string) ([]string, error) {
	d, err := g.department(department)
	if err != nil {
		return nil, err
	}
	out := make([]string, len(d.phrases))
	for i, p := range d.phrases {
		parts := make([]string, len(p))
		for j, r := range p {
			parts[j] = g.words[r]
		}
		out[i] = strings.Join(parts, " ")
	}
	return out, nil
}

func (g *Generator) department(name string) (*department, error) {
	for i := range g.depts {
		if g.depts[i].name == name {
			return &g.depts[i], nil
		}
	}
	return nil, fmt.Errorf("%w %q", ErrUnknownDepartment, name)
}

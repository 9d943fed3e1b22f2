package suggest

import (
	"fmt"
	"math"
	"strings"

	"kinword/internal/prf"
	"kinword/internal/rank"
)

// Defaults used when an Options field is zero.
const (
	DefaultModel             = "rm3"
	DefaultAutoModel         = "blend"
	DefaultK                 = 5
	DefaultFeedbackTerms     = 50
	DefaultFeedbackWeight    = 0.2
	DefaultAssocWeight       = 0.1
	DefaultCoverageWeight    = 0
	DefaultPhraseWeight      = 0
	DefaultOfferWeight       = 1
	DefaultMaxDFShare        = 0.2
	DefaultMinDF             = 2
	DefaultMinLetters        = 3
	DefaultMinResidualIDF    = 0.2
	DefaultResidualIDFMinDF  = 10
	DefaultLambda            = 0.7
	DefaultStrongShare       = 0.5
	DefaultMinShare          = 0.2
	DefaultNeighboursPerTerm = 20
	DefaultPhrasesPerTerm    = 5
	DefaultStrongCandidates  = 8
	DefaultAutoTerms         = 10
	DefaultExpandWeight      = 0.3
	// DefaultBlendMu and DefaultBlendTolerance are the blend's μ (tokens)
	// and EM tolerance here, where prf's are 1000 and 1e-8: μ 300 is what
	// the evaluation's cross-validation uses (near the judged collections'
	// abstract lengths; intranet pages are as short or shorter), and 1e-6
	// stops the EM far sooner on the same terms (common practice).
	DefaultBlendMu        = 300
	DefaultBlendTolerance = 1e-6
)

// Options tune an Engine. Every zero value means the documented default;
// for the weights a negative value means 0 (the part is switched off), and
// for the thresholds it switches the filter or rule off, as each field
// says.
type Options struct {
	// Model is the feedback model behind suggestions: "rm3" (RM3's
	// relevance model RM1, the default), "mixture" (Zhai & Lafferty's
	// θ_F), "blend" (the three models pooled, prf.Blend) or "rocchio".
	Model string
	// AutoModel is the feedback model of the automatic mode (AutoExpand),
	// one of the same names. Default "blend" (RM1, θ_F and Rocchio's
	// vector pooled in equal shares): against RM3 alone, with 2-fold
	// cross-validated parameters (median over three splits), it raised
	// automatic-expansion MAP on Cranfield from 0.3604 to 0.3616 and on
	// CISI from 0.2404 to 0.2523. As the suggestion model it lowered the
	// good share of the top five from 0.36 to 0.35 (Cranfield) and 0.34 to
	// 0.32 (CISI; one added term at the accepted weight), as Rocchio alone
	// did, so suggestions stay on RM3.
	AutoModel string
	// RM3, Mixture, Blend and Rocchio configure the models (see internal/prf).
	// Their FeedbackDocs default to prf's 10; their FeedbackTerms default
	// here to DefaultFeedbackTerms (50) rather than prf's 20, because the
	// filters drop many of a model's strongest terms; Blend's Mu and
	// Tolerance to DefaultBlendMu and DefaultBlendTolerance.
	RM3     prf.RM3Options
	Mixture prf.MixtureOptions
	Blend   prf.BlendOptions
	Rocchio prf.RocchioOptions

	// The combined score is
	//   FeedbackWeight·feedback + AssocWeight·association +
	//   CoverageWeight·coverage + PhraseWeight·phrase + OfferWeight·offer,
	// each part in [0, 1] (see Evidence.Parts and run.score). Defaults
	// 0.2, 0.1, 0, 0, 1: the offer weight (Robertson 1990: in many
	// feedback documents, few others) leads, the feedback model and the
	// association table break near-ties, and coverage and the phrase bonus
	// are off (offer already counts the feedback documents). Chosen from
	// data by the suggestion-quality measure of Cao, Nie, Gao & Robertson
	// (SIGIR 2008), one term added at the accepted weight, top five per
	// topic, on all topics of Cranfield and CISI (no held-out topics):
	// with the earlier defaults (0.5, 0.3, 0.2, 0.1, no offer part) the
	// good/bad shares were 0.21/0.23 (Cranfield) and 0.21/0.29 (CISI);
	// with these, 0.36/0.26 and 0.34/0.30. Ranking by coverage alone
	// already beat the feedback-model weight alone on both, and the phrase
	// bonus and a larger feedback weight lowered the good share on both.
	// Weights are 0 when zero is the default; a negative value also means
	// 0.
	FeedbackWeight float64
	AssocWeight    float64
	CoverageWeight float64
	PhraseWeight   float64
	OfferWeight    float64

	// MaxDFShare drops terms in more than this share of readable documents
	// (DF/N). Default 0.2; negative: off.
	MaxDFShare float64
	// MinDF drops terms in fewer readable documents. Default 2; negative
	// means 1 (a term no readable document has is always dropped).
	MinDF int
	// MinLetters drops single words with fewer letters. Default 3;
	// negative: off.
	MinLetters int
	// MinResidualIDF drops generic words: a single word whose residual IDF
	// (ResidualIDF) is below it, in bits. Default 0.2, chosen from data.
	// On Cranfield (1,400 abstracts) and CISI (1,460 abstracts) the
	// reporting words present, discuss, describ, made score 0.03-0.13 and
	// result 0.13 and 0.14; on the Tarnwick demo intranet (287 open
	// documents) describ 0.02, make 0.07, includ 0.10, follow 0.15, with
	// result just above at 0.20. Topical words score well above (Cranfield
	// flutter 1.97, nozzl 1.52, shock 1.27; CISI citat 1.09, index 1.03,
	// librari 0.87; Tarnwick leakag 1.21, permit 1.17, valv 1.01). Between
	// 0.2 and 0.3 generic and topical words mix (Cranfield general, form
	// and momentum, adiabat), so a higher value costs topical words; even
	// at 0.2 a few topical words of abstracts, used once each, fall below
	// (Cranfield fourier, schlieren). Negative: off.
	MinResidualIDF float64
	// ResidualIDFMinDF exempts words in fewer readable documents from the
	// residual-IDF test: with few documents a topical word used once per
	// document cannot be told from a generic one. On the Tarnwick demo the
	// words of DF 3-9 below 0.2 include switchgear, corros, standpip,
	// potabl, firmwar and payslip, while those of DF 10-19 below it are
	// mostly generic (straight, sure, involv, given, typic). Default 10; a
	// negative value tests every word.
	ResidualIDFMinDF int

	// Lambda is MMR's λ: each pick maximises λ·score − (1−λ)·(max
	// similarity to the suggestions already chosen), scores scaled so the
	// best is 1. Default 0.7; negative means 0 (diversity alone).
	Lambda float64
	// StrongShare: a phrase and one of its own parts are both offered only
	// when both score at least this share of the best score (and the part
	// also occurs in a feedback document without the phrase). Default 0.5;
	// negative means 0 (MMR still penalises the pair).
	StrongShare float64
	// MinShare: candidates scoring below this share of the best score are
	// never offered, however few suggestions that leaves. Default 0.2;
	// negative means 0 (fill K whatever the scores).
	MinShare float64
	// K is the number of suggestions when a Request asks for 0. Default 5.
	K int
	// NeighboursPerTerm is the number of association neighbours read per
	// query term. Default 20.
	NeighboursPerTerm int
	// PhrasesPerTerm is the number of mined phrases read per query word and
	// per strong candidate (most documents first). Default 5.
	PhrasesPerTerm int
	// StrongCandidates is the number of best single-word candidates whose
	// mined phrases are looked up. Default 8.
	StrongCandidates int
	// AutoTerms is the number of expansion terms AutoExpand adds.
	// Default 10.
	AutoTerms int
	// BM25 holds the BM25 parameters of the search (k1, b) for Rocchio's
	// document term weights, in the rocchio model and in the blend, where
	// their own BM25 fields are zero. Zero: k1 1.2, b 0.75.
	BM25 rank.BM25
	// Language selects the stopword list (a Snowball language name; ""
	// means English).
	Language string
}

// resolve fills in defaults and validates.
func (o Options) resolve() (Options, error) {
	for _, m := range []struct {
		p   *string
		def string
	}{{&o.Model, DefaultModel}, {&o.AutoModel, DefaultAutoModel}} {
		*m.p = strings.ToLower(strings.TrimSpace(*m.p))
		if *m.p == "" {
			*m.p = m.def
		}
		switch *m.p {
		case "rm3", "mixture", "blend", "rocchio":
		default:
			return o, fmt.Errorf("%w %q (want rm3, mixture, blend or rocchio)", ErrUnknownModel, *m.p)
		}
	}
	for _, f := range []struct {
		p   *float64
		def float64
	}{
		{&o.FeedbackWeight, DefaultFeedbackWeight}, {&o.AssocWeight, DefaultAssocWeight},
		{&o.CoverageWeight, DefaultCoverageWeight}, {&o.PhraseWeight, DefaultPhraseWeight},
		{&o.OfferWeight, DefaultOfferWeight},
		{&o.Lambda, DefaultLambda}, {&o.StrongShare, DefaultStrongShare}, {&o.MinShare, DefaultMinShare},
	} {
		switch {
		case math.IsNaN(*f.p) || math.IsInf(*f.p, 0):
			return o, fmt.Errorf("%w: %g is not a finite number", ErrBadOptions, *f.p)
		case *f.p == 0:
			*f.p = f.def
		case *f.p < 0:
			*f.p = 0
		}
	}
	if o.Lambda > 1 || o.StrongShare > 1 || o.MinShare > 1 {
		return o, fmt.Errorf("%w: Lambda %g, StrongShare %g and MinShare %g must be in [0, 1]",
			ErrBadOptions, o.Lambda, o.StrongShare, o.MinShare)
	}
	for _, f := range []struct {
		p        *float64
		def, off float64
	}{
		{&o.MaxDFShare, DefaultMaxDFShare, math.Inf(1)},
		{&o.MinResidualIDF, DefaultMinResidualIDF, math.Inf(-1)},
	} {
		switch {
		case math.IsNaN(*f.p):
			return o, fmt.Errorf("%w: threshold is NaN", ErrBadOptions)
		case *f.p == 0:
			*f.p = f.def
		case *f.p < 0:
			*f.p = f.off
		}
	}
	for _, f := range []struct {
		p   *int
		def int
	}{
		{&o.MinLetters, DefaultMinLetters},
		{&o.ResidualIDFMinDF, DefaultResidualIDFMinDF}, {&o.K, DefaultK},
		{&o.NeighboursPerTerm, DefaultNeighboursPerTerm}, {&o.PhrasesPerTerm, DefaultPhrasesPerTerm},
		{&o.StrongCandidates, DefaultStrongCandidates}, {&o.AutoTerms, DefaultAutoTerms},
	} {
		switch {
		case *f.p == 0:
			*f.p = f.def
		case *f.p < 0:
			*f.p = 0
		}
	}
	switch {
	case o.MinDF == 0:
		o.MinDF = DefaultMinDF
	case o.MinDF < 0:
		o.MinDF = 1
	}
	if o.RM3.FeedbackTerms == 0 {
		o.RM3.FeedbackTerms = DefaultFeedbackTerms
	}
	if o.Mixture.FeedbackTerms == 0 {
		o.Mixture.FeedbackTerms = DefaultFeedbackTerms
	}
	if o.Blend.FeedbackTerms == 0 {
		o.Blend.FeedbackTerms = DefaultFeedbackTerms
	}
	if o.Blend.Mu == 0 {
		o.Blend.Mu = DefaultBlendMu
	}
	if o.Blend.Tolerance == 0 {
		o.Blend.Tolerance = DefaultBlendTolerance
	}
	if o.Rocchio.FeedbackTerms == 0 {
		o.Rocchio.FeedbackTerms = DefaultFeedbackTerms
	}
	if o.Rocchio.BM25 == (rank.BM25{}) {
		o.Rocchio.BM25 = o.BM25
	}
	if o.Blend.BM25 == (rank.BM25{}) {
		o.Blend.BM25 = o.BM25
	}
	return o, nil
}

// buildModel constructs the feedback models (Model for suggestions,
// AutoModel for AutoExpand).
func (e *Engine) buildModel() error {
	var err error
	if e.sugg, err = e.setup(e.opt.Model); err != nil {
		return err
	}
	if e.auto, err = e.setup(e.opt.AutoModel); err != nil {
		return err
	}
	return nil
}

// setup constructs one feedback model and records the numbers AutoExpand
// and coverage need: the original-query coefficient and the number of
// feedback documents, resolved as prf resolves them (zero means the
// default, negative means 0).
func (e *Engine) setup(name string) (modelSetup, error) {
	frac := func(v, def float64) float64 {
		if v == 0 {
			return def
		}
		return max(v, 0)
	}
	docs := func(n int) int {
		if n == 0 {
			return prf.DefaultFeedbackDocs
		}
		return n
	}
	s := modelSetup{name: name}
	var err error
	switch o := e.opt; name {
	case "rm3":
		s.model, err = prf.NewRM3(o.RM3)
		s.origCoef, s.fbDocs = frac(o.RM3.OrigWeight, prf.DefaultOrigWeight), docs(o.RM3.FeedbackDocs)
	case "mixture":
		s.model, err = prf.NewMixture(o.Mixture)
		s.origCoef, s.fbDocs = frac(o.Mixture.OrigWeight, prf.DefaultOrigWeight), docs(o.Mixture.FeedbackDocs)
	case "blend":
		s.model, err = prf.NewBlend(o.Blend)
		s.origCoef, s.fbDocs = frac(o.Blend.OrigWeight, prf.DefaultOrigWeight), docs(o.Blend.FeedbackDocs)
	case "rocchio":
		s.model, err = prf.NewRocchio(o.Rocchio)
		s.origCoef, s.fbDocs = frac(o.Rocchio.Alpha, prf.DefaultAlpha), docs(o.Rocchio.FeedbackDocs)
	}
	if err != nil {
		return s, fmt.Errorf("suggest: %w", err)
	}
	return s, nil
}

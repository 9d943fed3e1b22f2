package text

// englishStopwords is Kinword's own English stopword list. It was written for
// this project from the closed classes of English grammar: articles and
// determiners, personal, possessive, reflexive, relative and interrogative
// pronouns, auxiliary and modal verbs in all their inflections (with the
// common contractions), prepositions, conjunctions, and a few discourse
// adverbs and quantifiers ("also", "however", "very"). Content words are never
// listed here, however frequent they are in a collection: collection-specific
// generic words are found from the data by later stages, not by this list.
var englishStopwords = words(`
a an the this that these those such
i me my mine myself we us our ours ourselves you your yours yourself yourselves
he him his himself she her hers herself it its itself they them their theirs themselves
one ones oneself who whom whose which what whatever whoever whichever
am is are was were be been being
have has had having do does did doing done
will would shall should can could may might must ought
isn't aren't wasn't weren't haven't hasn't hadn't don't doesn't didn't
won't wouldn't shan't shouldn't can't cannot couldn't mustn't mightn't needn't
i'm i've i'll i'd you're you've you'll you'd he's he'll he'd she's she'll she'd
it's it'll we're we've we'll we'd they're they've they'll they'd
that's there's here's what's who's let's where's how's when's why's
of at by for with about against between into through during before after
above below to from up down in out on off over under again further
upon onto within without along across among amongst around behind beneath beside
besides beyond despite except inside outside near past per since toward towards
until till unto via amid throughout like unlike
and but or nor so yet either neither both whether if then else than because
as while although though unless whereas whereby wherein whereupon
once here there when where why how
all any each every few more most other some such no not only own same
too very just also even ever never always often sometimes however therefore
thus hence moreover furthermore nevertheless nonetheless meanwhile otherwise
indeed rather quite almost already still perhaps maybe instead
much many several various enough less least
another anybody anyone anything anywhere everybody everyone everything everywhere
nobody none nothing nowhere somebody someone something somewhere
again ago else etc eg ie
`)

func words(s string) map[string]struct{} {
	m := make(map[string]struct{})
	for _, w := range Words(s) {
		m[w] = struct{}{}
	}
	return m
}

// Stopwords is the set of stopwords for a language. Only English has a list;
// other languages index every word (their Snowball stemmers still apply).
type Stopwords map[string]struct{}

// StopwordsFor returns the stopword set for a Snowball language name.
func StopwordsFor(lang string) Stopwords {
	if lang == "" || lang == English {
		return englishStopwords
	}
	return nil
}

// Has reports whether the folded word w is a stopword.
func (s Stopwords) Has(w string) bool {
	_, ok := s[w]
	return ok
}

// EnglishStopwords returns a sorted copy of the English list, for display.
func EnglishStopwords() []string {
	out := make([]string, 0, len(englishStopwords))
	for w := range englishStopwords {
		out = append(out, w)
	}
	sortStrings(out)
	return out
}

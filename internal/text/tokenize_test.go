package text

import (
	"fmt"
	"reflect"
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"
)

func TestTokenize(t *testing.T) {
	// Expected splits follow the rules documented on Tokenize (our own
	// design; the compound handling is common practice in search engines).
	cases := []struct {
		name, in string
		want     []string
	}{
		{"plain words", "Burst pipe on Mill Lane", []string{"burst", "pipe", "on", "mill", "lane"}},
		{"single-letter compound joins", "Send an e-mail or X-ray", []string{"send", "an", "email", "or", "xray"}},
		{"apostrophe inside", "at six o'clock, don't", []string{"at", "six", "o'clock", "don't"}},
		{"typographic apostrophe", "the crew\u2019s van", []string{"the", "crew's", "van"}},
		{"trailing apostrophe dropped", "the workers' union", []string{"the", "workers", "union"}},
		{"numbers", "In 2024 we laid 3.5 km, 1,200 staff", []string{"in", "2024", "we", "laid", "3.5", "km", "1,200", "staff"}},
		{"code with digits stays whole", "ISO-9001 audit, COVID-19", []string{"iso-9001", "audit", "covid-19"}},
		{"word compound splits", "boundary-layer flow", []string{"boundary", "layer", "flow"}},
		{"sentence period is not a joiner", "end.Next", []string{"end", "next"}},
		{"unicode folding", "Stra\u00dfe \uFB01le \uFF21BC", []string{"strasse", "file", "abc"}},
		{"accents kept", "caf\u00e9 d\u00e9j\u00e0", []string{"caf\u00e9", "d\u00e9j\u00e0"}},
		{"empty", "  --  ", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := Words(c.in); !reflect.DeepEqual(got, c.want) {
				t.Errorf("Words(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

func TestTokenizeSpansAndParagraphs(t *testing.T) {
	in := "Main break.\n\nValve isolation-procedure here"
	var spans []Span
	var words []string
	Tokenize(in, func(sp Span, f string) { spans = append(spans, sp); words = append(words, f) })
	for i, sp := range spans {
		if got := Fold(in[sp.Start:sp.End]); got != words[i] && !strings.Contains(in[sp.Start:sp.End], "-") {
			t.Errorf("span %d %q does not cover its token %q", i, in[sp.Start:sp.End], words[i])
		}
		if sp.Pos != i {
			t.Errorf("span %d has Pos %d", i, sp.Pos)
		}
	}
	wantPara := []bool{true, false, true, false, false, false}
	for i, sp := range spans {
		if sp.ParaStart != wantPara[i] {
			t.Errorf("token %q ParaStart = %v, want %v", words[i], sp.ParaStart, wantPara[i])
		}
	}
	if in[spans[4].Start:spans[4].End] != "procedure" {
		t.Errorf("split compound part span = %q", in[spans[4].Start:spans[4].End])
	}
}

func TestPipelineAnalyze(t *testing.T) {
	p, err := NewPipeline("")
	if err != nil {
		t.Fatal(err)
	}
	// Stems from the Snowball English algorithm (snowballstem.org), checked
	// against the reference vocabulary by TestSnowballReferenceVocabulary.
	cases := []struct {
		name, in string
		want     []string
	}{
		{"stopwords dropped, stems kept", "The reimbursement of travelling expenses", []string{"reimburs", "travel", "expens"}},
		{"phrase key", "Main Breaks", []string{"main", "break"}},
		{"all stopwords", "it is what it is", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := p.Terms(c.in, ""); !reflect.DeepEqual(got, c.want) {
				t.Errorf("Terms(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
	if got := p.Key("Annual  LEAVE", ""); got != "annual leav" {
		t.Errorf("Key = %q", got)
	}
	var toks []Token
	p.Analyze("rate of return", "", func(tk Token) { toks = append(toks, tk) })
	if len(toks) != 2 || toks[0].Pos != 0 || toks[1].Pos != 2 {
		t.Errorf("positions across a stopword: %+v", toks)
	}
}

func TestPipelineLanguages(t *testing.T) {
	p, _ := NewPipeline("")
	// French Snowball stemmer: "continuellement" -> "continuel" (Snowball
	// French reference vocabulary, from memory).
	if got := p.Stem("continuellement", "french"); got != "continuel" {
		t.Errorf("french stem = %q", got)
	}
	if _, err := NewPipeline("klingon"); err == nil {
		t.Error("unsupported language accepted")
	}
	// An unknown per-document language falls back to the default.
	if got := p.Stem("pipes", "klingon"); got != "pipe" {
		t.Errorf("fallback stem = %q", got)
	}
}

func TestSurfaces(t *testing.T) {
	s := NewSurfaces()
	for _, w := range []string{"breaks", "break", "break", "broken"} {
		s.Add("break", w)
	}
	s.Add("main", "main")
	if got := s.Display("break"); got != "break" {
		t.Errorf("Display = %q", got)
	}
	if got := s.Display("main break"); got != "main break" {
		t.Errorf("phrase Display = %q", got)
	}
	if got := s.Display("unseen"); got != "unseen" {
		t.Errorf("unseen Display = %q", got)
	}
	s2 := NewSurfaces()
	s2.AddN("break", "breaks", 5)
	s.Merge(s2)
	if got := s.Display("break"); got != "breaks" {
		t.Errorf("after merge Display = %q", got)
	}
}

func FuzzTokenize(f *testing.F) {
	for _, s := range []string{"e-mail o'clock 2024 ISO-9001", "a--b ''x'' 3..4 ,,", "\u00df\uFB01\u2019s", "\xff\xfe bad utf8", "x-1-y-", ""} {
		f.Add(s)
	}
	p, _ := NewPipeline("")
	f.Fuzz(func(t *testing.T, s string) {
		last := -1
		Tokenize(s, func(sp Span, folded string) {
			if sp.Start < 0 || sp.End > len(s) || sp.Start >= sp.End {
				t.Fatalf("bad span %+v for len %d", sp, len(s))
			}
			if sp.Pos != last+1 {
				t.Fatalf("positions not consecutive: %d after %d", sp.Pos, last)
			}
			last = sp.Pos
			if folded == "" || !utf8.ValidString(folded) && utf8.ValidString(s) {
				t.Fatalf("bad folded token %q", folded)
			}
		})
		p.Analyze(s, "", func(tk Token) {
			if tk.Stem == "" && tk.Surface != "" && utf8.RuneCountInString(tk.Surface) > 3 {
				t.Fatalf("empty stem for %q", tk.Surface)
			}
		})
	})
}

var benchText = strings.Repeat("The network controller isolated the valve after a main break on the trunk main; crews reinstated the carriageway by 18:00 and flushed the district metered area. ", 20)

func BenchmarkAnalyze(b *testing.B) {
	p, _ := NewPipeline("")
	n := 0
	p.Analyze(benchText, "", func(Token) { n++ })
	b.SetBytes(int64(len(benchText)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		p.Analyze(benchText, "", func(Token) {})
	}
	b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "tokens/s")
}

func BenchmarkStemUncached(b *testing.B) {
	words := Words(benchText)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		st, _ := NewStemmer(English)
		for _, w := range words[:20] {
			st.Stem(w)
		}
	}
}

// TestStemmerConcurrentMemo: the copy-on-write memo gives the same stems
// under concurrent use as a fresh stemmer gives serially (run with -race).
func TestStemmerConcurrentMemo(t *testing.T) {
	words := Words(strings.Repeat(benchText, 3) + " reimbursement travelling expenses onboarding induction leakage")
	ref, _ := NewStemmer(English)
	want := make([]string, len(words))
	for i, w := range words {
		want[i] = ref.Stem(w)
	}
	st, _ := NewStemmer(English)
	done := make(chan bool)
	for g := 0; g < 4; g++ {
		go func() {
			for i, w := range words {
				if got := st.Stem(w); got != want[i] {
					t.Errorf("Stem(%q) = %q, want %q", w, got, want[i])
				}
			}
			done <- true
		}()
	}
	for g := 0; g < 4; g++ {
		<-done
	}
}

// TestWordRuneASCIIFastPath: the ASCII shortcut in isWordRune agrees with
// the reference library (Go's unicode package tables) on the Unicode
// definition of a word rune (letters, digits, Mn, Mc), every ASCII rune.
func TestWordRuneASCIIFastPath(t *testing.T) {
	for r := rune(0); r < utf8.RuneSelf; r++ {
		want := unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.Is(unicode.Mn, r) || unicode.Is(unicode.Mc, r)
		if got := isWordRune(r); got != want {
			t.Errorf("isWordRune(%q) = %v, want %v", r, got, want)
		}
	}
}

// TestScanMatchesAnalyze: Scan reports every token; those with a stem are
// exactly Analyze's tokens (same spans, positions and stems), in order.
func TestScanMatchesAnalyze(t *testing.T) {
	p, _ := NewPipeline("")
	for _, s := range []string{benchText, "", "the of", "E-mail x-ray ISO-9001 boundary\u2010layer o'clock 3.5 1,200 Straße", strings.Repeat("a", MaxTokenBytes+1) + " pipe"} {
		var want, got []Token
		p.Analyze(s, "", func(tk Token) { want = append(want, Token{Stem: tk.Stem, Start: tk.Start, End: tk.End, Pos: tk.Pos}) })
		n := 0
		p.Scan(s, "", func(sp Span, _, stem string) {
			if sp.Pos != n {
				t.Fatalf("%q: Scan position %d, want %d", s, sp.Pos, n)
			}
			n++
			if stem != "" {
				got = append(got, Token{Stem: stem, Start: sp.Start, End: sp.End, Pos: sp.Pos})
			}
		})
		if len(Words(s)) != n {
			t.Errorf("%q: Scan reported %d tokens, Tokenize %d", s, n, len(Words(s)))
		}
		if fmt.Sprint(got) != fmt.Sprint(want) {
			t.Errorf("%q: Scan stems %v, Analyze %v", s, got, want)
		}
	}
}

package assoc

import (
	"errors"
	"math"
	"testing"
)

// Published worked examples. Every value was first recomputed from the
// published inputs (python3, double precision) and is asserted to the
// precision stated in the case.
func TestMeasuresPublished(t *testing.T) {
	const nMS = 14307668 // Manning & Schutze 1999, ch. 5: tokens in their NYT corpus
	newCompanies := NewContingency(8, 15828, 4675, nMS)
	cases := []struct {
		name   string
		source string
		got    float64
		want   float64
		tol    float64
	}{
		{"t-score new companies", "Manning & Schutze 1999, sec. 5.3.1 (t = 0.999932)",
			newCompanies.TScore(), 0.999932, 5e-7},
		{"chi-square new companies", "Manning & Schutze 1999, sec. 5.3.3, Table 5.8 (book prints 1.55; recomputed 1.5489)",
			newCompanies.Chi2(), 1.5489, 5e-5},
		{"PMI c12=20 c1=42 c2=20", "Manning & Schutze 1999, sec. 5.4 (18.38 bits)",
			NewContingency(20, 42, 20, nMS).PMI(), 18.38, 5e-3},
		{"G2 k11=110", "Dunning 1993, Computational Linguistics 19(1), bigram table; 270.72 recomputed from the published counts",
			NewContingency(110, 2552, 221, 31777).G2(), 270.72, 5e-3},
		{"G2 k11=8", "Dunning 1993, bigram table; 95.29 recomputed from the published counts",
			NewContingency(8, 13, 32, 31777).G2(), 95.29, 5e-3},
		{"expected MI export/poultry", "Manning, Raghavan & Schutze 2008, IIR sec. 13.5.1 (book prints ~0.0001105)",
			Contingency{49, 27652, 141, 774106}.ExpectedMI(), 0.00011054, 5e-9},
		{"chi-square export/poultry", "Manning, Raghavan & Schutze 2008, IIR sec. 13.5.2 (book prints ~284)",
			Contingency{49, 27652, 141, 774106}.Chi2(), 284.29, 5e-3},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if math.Abs(tc.got-tc.want) > tc.tol {
				t.Errorf("%s: got %.8g, want %.8g ± %g", tc.source, tc.got, tc.want, tc.tol)
			}
		})
	}
}

// Values that follow from the definitions: NPMI's fixed points -1, 0, 1 are
// those given by Bouma 2009 (sec. 2.2); the sign of SignedG2 is our
// convention (common practice).
func TestMeasuresDefinitions(t *testing.T) {
	cases := []struct {
		name string
		c    Contingency
		m    Measure
		want float64
	}{
		{"NPMI perfect co-occurrence is 1", NewContingency(5, 5, 5, 20), MeasureNPMI, 1},
		{"NPMI never together is -1", NewContingency(0, 5, 5, 20), MeasureNPMI, -1},
		{"NPMI independence is 0", NewContingency(5, 10, 10, 20), MeasureNPMI, 0},
		{"PMI independence is 0", NewContingency(5, 10, 10, 20), MeasurePMI, 0},
		{"Dice of identical sets is 1", NewContingency(7, 7, 7, 30), MeasureDice, 1},
		{"cond prob is k11 over row", NewContingency(3, 12, 5, 100), MeasureCondProb, 0.25},
		{"signed G2 is negative under repulsion", NewContingency(1, 50, 50, 100), MeasureLLR,
			-NewContingency(1, 50, 50, 100).G2()},
		{"chi2 equals N phi^2", Contingency{10, 0, 0, 10}, MeasureChi2, 20},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.c.Score(tc.m); math.Abs(got-tc.want) > 1e-12 {
				t.Errorf("got %v, want %v", got, tc.want)
			}
		})
	}
}

// G2 = 2 N I, with I the expected mutual information in nats: both are the
// same divergence of the 2x2 table from independence (a standard identity,
// stated from memory).
func TestG2IsScaledExpectedMI(t *testing.T) {
	for _, c := range []Contingency{{49, 27652, 141, 774106}, NewContingency(110, 2552, 221, 31777)} {
		if g, e := c.G2(), 2*c.N()*math.Ln2*c.ExpectedMI(); math.Abs(g-e) > 1e-9*g {
			t.Errorf("%+v: G2 %v, 2N ln2 EMI %v", c, g, e)
		}
	}
}

func TestParseMeasure(t *testing.T) {
	cases := []struct {
		in   string
		want Measure
		err  error
	}{
		{"llr", MeasureLLR, nil}, {"", MeasureLLR, nil}, {"NPMI", MeasureNPMI, nil}, {"pmi", MeasurePMI, nil},
		{"chi2", MeasureChi2, nil}, {"dice", MeasureDice, nil}, {"cond", MeasureCondProb, nil},
		{" tscore ", MeasureTScore, nil}, {"cosine", 0, ErrUnknownMeasure},
	}
	for _, tc := range cases {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParseMeasure(tc.in)
			if !errors.Is(err, tc.err) || got != tc.want {
				t.Fatalf("ParseMeasure(%q) = %v, %v; want %v, %v", tc.in, got, err, tc.want, tc.err)
			}
			if err == nil {
				if back, _ := ParseMeasure(got.String()); back != got {
					t.Errorf("round trip %v -> %q -> %v", got, got.String(), back)
				}
			}
		})
	}
}

func FuzzParseMeasure(f *testing.F) {
	for _, n := range measureNames {
		f.Add(n)
	}
	f.Add("Chi2 ")
	f.Fuzz(func(t *testing.T, s string) {
		m, err := ParseMeasure(s)
		if err != nil {
			if !errors.Is(err, ErrUnknownMeasure) {
				t.Fatalf("error %v is not ErrUnknownMeasure", err)
			}
			return
		}
		if back, err := ParseMeasure(m.String()); err != nil || back != m {
			t.Fatalf("%q -> %v -> %q -> %v, %v", s, m, m.String(), back, err)
		}
	})
}

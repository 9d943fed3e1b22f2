package assoc

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// Contingency is the 2x2 table of a term pair (a, b) over N units:
// K11 units contain both, K12 contain a without b, K21 contain b without a,
// K22 contain neither.
type Contingency struct {
	K11, K12, K21, K22 float64
}

// NewContingency builds the table from the joint count k11, the marginal
// counts na (units with a) and nb (units with b) and the number of units n.
func NewContingency(k11, na, nb, n int64) Contingency {
	return Contingency{
		K11: float64(k11),
		K12: float64(na - k11),
		K21: float64(nb - k11),
		K22: float64(n - na - nb + k11),
	}
}

// N is the number of units.
func (c Contingency) N() float64 { return c.K11 + c.K12 + c.K21 + c.K22 }

// xlogx-style term k*ln(k*n/(r*col)) with 0*ln 0 = 0.
func llrTerm(k, r, col, n float64) float64 {
	if k <= 0 || r <= 0 || col <= 0 {
		return 0
	}
	return k * math.Log(k*n/(r*col))
}

// G2 is Dunning's log-likelihood ratio statistic -2 log lambda for the
// table (Dunning 1993), always >= 0.
func (c Contingency) G2() float64 {
	n := c.N()
	r1, r2 := c.K11+c.K12, c.K21+c.K22
	c1, c2 := c.K11+c.K21, c.K12+c.K22
	g := 2 * (llrTerm(c.K11, r1, c1, n) + llrTerm(c.K12, r1, c2, n) +
		llrTerm(c.K21, r2, c1, n) + llrTerm(c.K22, r2, c2, n))
	if g < 0 { // rounding on independent pairs
		g = 0
	}
	return g
}

// SignedG2 is G2, negated when the pair occurs together less often than
// chance predicts, so that ranking by it prefers attraction over repulsion
// (common practice).
func (c Contingency) SignedG2() float64 {
	g := c.G2()
	if c.K11*c.N() < (c.K11+c.K12)*(c.K11+c.K21) {
		return -g
	}
	return g
}

// PMI is pointwise mutual information log2(P(a,b) / (P(a) P(b))) in bits;
// -Inf when K11 is zero.
func (c Contingency) PMI() float64 {
	return math.Log2(c.K11 * c.N() / ((c.K11 + c.K12) * (c.K11 + c.K21)))
}

// NPMI is normalised PMI, PMI / -log P(a,b), in [-1, 1] (Bouma 2009);
// 1 when the two terms occur in every unit, -1 when they never co-occur.
func (c Contingency) NPMI() float64 {
	if c.K11 <= 0 {
		return -1
	}
	p11 := c.K11 / c.N()
	if p11 >= 1 {
		return 1
	}
	return math.Log(c.K11*c.N()/((c.K11+c.K12)*(c.K11+c.K21))) / -math.Log(p11)
}

// Chi2 is Pearson's chi-square statistic of the 2x2 table without continuity
// correction; 0 when a margin is empty.
func (c Contingency) Chi2() float64 {
	den := (c.K11 + c.K12) * (c.K21 + c.K22) * (c.K11 + c.K21) * (c.K12 + c.K22)
	if den == 0 {
		return 0
	}
	d := c.K11*c.K22 - c.K12*c.K21
	return c.N() * d * d / den
}

// Dice is the Dice coefficient 2 K11 / ((K11+K12) + (K11+K21)).
func (c Contingency) Dice() float64 {
	den := 2*c.K11 + c.K12 + c.K21
	if den == 0 {
		return 0
	}
	return 2 * c.K11 / den
}

// CondProb is P(b|a) = K11 / (K11+K12), the chance that a unit holding a
// also holds b.
func (c Contingency) CondProb() float64 {
	if c.K11+c.K12 == 0 {
		return 0
	}
	return c.K11 / (c.K11 + c.K12)
}

// TScore is the t statistic of Manning & Schutze (1999, sec. 5.3.1):
// (K11 - E11) / sqrt(K11) with E11 = (K11+K12)(K11+K21)/N, the sample
// variance approximated by the mean.
func (c Contingency) TScore() float64 {
	if c.K11 <= 0 {
		return 0
	}
	e := (c.K11 + c.K12) * (c.K11 + c.K21) / c.N()
	return (c.K11 - e) / math.Sqrt(c.K11)
}

// ExpectedMI is the (expected) mutual information of the two binary
// indicator variables in bits: sum over the four cells of
// P(cell) log2(P(cell) / (P(row) P(col))) (Manning, Raghavan & Schutze 2008,
// eq. 13.17).
func (c Contingency) ExpectedMI() float64 {
	n := c.N()
	if n == 0 {
		return 0
	}
	r1, r2 := c.K11+c.K12, c.K21+c.K22
	c1, c2 := c.K11+c.K21, c.K12+c.K22
	return (llrTerm(c.K11, r1, c1, n) + llrTerm(c.K12, r1, c2, n) +
		llrTerm(c.K21, r2, c1, n) + llrTerm(c.K22, r2, c2, n)) / (n * math.Ln2)
}

// Measure names an association measure used for ranking.
type Measure uint8

// The measures. The zero value, MeasureLLR, is the default.
const (
	MeasureLLR      Measure = iota // signed Dunning G2
	MeasurePMI                     // pointwise mutual information, bits
	MeasureNPMI                    // normalised PMI
	MeasureChi2                    // chi-square, 2x2, no continuity correction
	MeasureDice                    // Dice coefficient
	MeasureCondProb                // P(neighbour | term)
	MeasureTScore                  // t-score
	numMeasures
)

var measureNames = [numMeasures]string{"llr", "pmi", "npmi", "chi2", "dice", "cond", "tscore"}

// ErrUnknownMeasure is returned by ParseMeasure for an unknown name.
var ErrUnknownMeasure = errors.New("assoc: unknown measure")

// String returns the measure's short name as ParseMeasure reads it.
func (m Measure) String() string {
	if m < numMeasures {
		return measureNames[m]
	}
	return fmt.Sprintf("measure(%d)", uint8(m))
}

// ParseMeasure reads "llr", "pmi", "npmi", "chi2", "dice", "cond" or
// "tscore" (case-insensitive); "" gives MeasureLLR.
func ParseMeasure(s string) (Measure, error) {
	s = strings.ToLower(strings.TrimSpace(s))
	if s == "" {
		return MeasureLLR, nil
	}
	for i, name := range measureNames {
		if s == name {
			return Measure(i), nil
		}
	}
	return 0, fmt.Errorf("%w %q (want one of %s)", ErrUnknownMeasure, s, strings.Join(measureNames[:], ", "))
}

// Score returns measure m of the table; NaN results (degenerate tables)
// become -Inf so that they rank last.
func (c Contingency) Score(m Measure) float64 {
	var v float64
	switch m {
	case MeasurePMI:
		v = c.PMI()
	case MeasureNPMI:
		v = c.NPMI()
	case MeasureChi2:
		v = c.Chi2()
	case MeasureDice:
		v = c.Dice()
	case MeasureCondProb:
		v = c.CondProb()
	case MeasureTScore:
		v = c.TScore()
	default:
		v = c.SignedG2()
	}
	if math.IsNaN(v) {
		return math.Inf(-1)
	}
	return v
}

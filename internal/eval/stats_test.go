package eval

import (
	"math"
	"testing"
)

// Robustness index RI = (N+ - N-) / N over all topics: Sakai, Manabe &
// Koyama (2005, ACM TALIP 4(2)) and Collins-Thompson (2009, CIKM); from
// memory. Counts below are hand-worked.
func TestCompare(t *testing.T) {
	tests := []struct {
		name              string
		base, run         []float64
		threshold         float64
		helped, hurt      int
		robustness        float64
		useDefaultCompare bool
	}{
		{"mixed", []float64{0.2, 0.5, 0.3, 0.1}, []float64{0.4, 0.5, 0.1, 0.3}, DefaultThreshold, 2, 1, 0.25, true},
		{"all hurt", []float64{1, 1}, []float64{0, 0.5}, DefaultThreshold, 0, 2, -1, true},
		{"float noise is a tie", []float64{0.1 + 0.2}, []float64{0.3}, DefaultThreshold, 0, 0, 0, true},
		{"threshold filters small changes", []float64{0.2, 0.2, 0.2}, []float64{0.25, 0.35, 0.0}, 0.1, 1, 1, 0, false},
		{"empty", nil, nil, DefaultThreshold, 0, 0, 0, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			h, u, ri := CompareThreshold(tc.base, tc.run, tc.threshold)
			if tc.useDefaultCompare {
				h, u, ri = Compare(tc.base, tc.run)
			}
			if h != tc.helped || u != tc.hurt || math.Abs(ri-tc.robustness) > 1e-12 {
				t.Errorf("got helped=%d hurt=%d RI=%v, want %d %d %v", h, u, ri, tc.helped, tc.hurt, tc.robustness)
			}
		})
	}
}

func TestComparePanicsOnLengthMismatch(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("Compare with mismatched lengths did not panic")
		}
	}()
	Compare([]float64{1}, nil)
}

// exactRandomizationP enumerates all 2^n sign assignments of the paired
// differences: the exact two-sided permutation p-value the Monte-Carlo test
// of Smucker, Allan & Carterette (2007) estimates. Written independently of
// RandomizationTest (means, not sums; bit loop per mask).
func exactRandomizationP(a, b []float64) float64 {
	n := len(a)
	mean := func(mask int) float64 {
		s := 0.0
		for i := 0; i < n; i++ {
			d := b[i] - a[i]
			if mask>>i&1 == 1 {
				d = -d
			}
			s += d
		}
		return s / float64(n)
	}
	obs := math.Abs(mean(0))
	count := 0
	for mask := 0; mask < 1<<n; mask++ {
		if math.Abs(mean(mask)) >= obs-1e-12 {
			count++
		}
	}
	return float64(count) / float64(int(1)<<n)
}

func TestRandomizationTestMatchesExactEnumeration(t *testing.T) {
	a := []float64{0.30, 0.45, 0.12, 0.60, 0.25, 0.50, 0.33, 0.41, 0.20, 0.55}
	diff := []float64{0.05, -0.02, 0.08, 0.01, -0.04, 0.06, 0.03, -0.01, 0.07, 0.02}
	b := make([]float64, len(a))
	for i := range a {
		b[i] = a[i] + diff[i]
	}
	exact := exactRandomizationP(a, b)
	if exact <= 0.01 || exact >= 0.99 {
		t.Fatalf("exact p = %v: pick a vector with a p-value away from 0 and 1", exact)
	}
	const trials = 200_000
	got := RandomizationTest(a, b, trials, 42)
	// Monte-Carlo standard error sqrt(p(1-p)/trials) <= 0.0012; allow 5 SE.
	if math.Abs(got-exact) > 0.006 {
		t.Errorf("p = %.4f, exact enumeration of 1024 sign flips gives %.4f", got, exact)
	}
	if again := RandomizationTest(a, b, trials, 42); again != got {
		t.Errorf("same seed gave %v then %v", got, again)
	}
	if swapped := RandomizationTest(b, a, trials, 42); math.Abs(swapped-got) > 0.006 {
		t.Errorf("two-sided test not symmetric: %v vs %v", got, swapped)
	}
	t.Logf("exact p = %.4f, randomization p = %.4f", exact, got)
}

func TestRandomizationTestExtremes(t *testing.T) {
	same := []float64{0.1, 0.5, 0.9, 0.3, 0.7}
	if p := RandomizationTest(same, same, 1000, 1); p != 1 {
		t.Errorf("identical vectors: p = %v, want 1", p)
	}
	if p := RandomizationTest(nil, nil, 1000, 1); p != 1 {
		t.Errorf("empty vectors: p = %v, want 1", p)
	}
	// 30 topics all improved by 0.08..0.12: the exact p is 2/2^30.
	base := make([]float64, 30)
	better := make([]float64, 30)
	for i := range base {
		base[i] = 0.2 + 0.02*float64(i%7)
		better[i] = base[i] + 0.08 + 0.01*float64(i%5)
	}
	if p := RandomizationTest(base, better, 0, 7); p > 0.001 {
		t.Errorf("consistent large improvement: p = %v, want <= 0.001", p)
	}
}

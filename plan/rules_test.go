package plan

import (
	"math"
	"testing"
)

// Closed forms at c = 0 (common practice, no source): Hoeffding needs
// n ≥ ln(1/α)/(2·ceiling²); Chebyshev–Cantelli n ≥ (1−ceiling)(1−α)/(α·ceiling);
// kl at zero errors is the exact zero-failure rule.
func TestRulesAtZeroErrors(t *testing.T) {
	const ceil, alpha = 0.02, 0.05
	f := func(keeps func(c, n int) bool) int {
		n, ok := family{keeps: keeps, limit: MaxSampleSize}.smallestN(0)
		if !ok {
			t.Fatal("no n")
		}
		return n
	}
	if got, want := f(hoeffdingKeeps(ceil, alpha)), int(math.Ceil(math.Log(1/alpha)/(2*ceil*ceil))); got != want {
		t.Errorf("hoeffding n0 = %d, want %d", got, want)
	}
	if got, want := f(chebyshevKeeps(ceil, alpha)), int(math.Ceil((1-ceil)*(1-alpha)/(alpha*ceil))); got != want {
		t.Errorf("chebyshev n0 = %d, want %d", got, want)
	}
	if got, want := f(klKeeps(ceil, alpha)), f(exactBinomialKeeps(ceil, alpha)); got != want {
		t.Errorf("kl n0 = %d, exact zero-failure n0 = %d", got, want)
	}
}

// smallestN agrees with a plain scan over n on small cases.
func TestSmallestNAgainstScan(t *testing.T) {
	for _, ceil := range []float64{0.05, 0.1, 0.3} {
		keeps := exactBinomialKeeps(ceil, 0.05)
		fam := family{keeps: keeps, limit: 5000}
		for c := 0; c < 15; c++ {
			got, ok := fam.smallestN(c)
			want := c + 1
			for ; want <= 5000 && !keeps(c, want); want++ {
			}
			if !ok || got != want {
				t.Errorf("ceiling %v, c %d: smallestN = %d (%v), scan %d", ceil, c, got, ok, want)
			}
		}
	}
	if _, ok := (family{keeps: exactBinomialKeeps(0.001, 0.05), limit: 100}).smallestN(0); ok {
		t.Error("smallestN found an n above the limit")
	}
}

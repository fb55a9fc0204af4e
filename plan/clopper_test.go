package plan

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Published Clopper–Pearson (exact) two-sided 95% intervals, rounded to 4
// decimals: Newcombe, "Two-sided confidence intervals for the single
// proportion: comparison of seven methods", Statistics in Medicine 17
// (1998) 857–872, Table I, exact method (quoted from memory). Tolerance:
// 5e-5 absolute (half a unit in the 4th decimal).
func TestClopperPearsonPublished(t *testing.T) {
	for _, tc := range []struct {
		x, n   int
		lo, hi float64
	}{
		{15, 148, 0.0578, 0.1617},
		{0, 20, 0, 0.1684},
		{1, 29, 0.0009, 0.1776},
		{29, 29, 0.8806, 1},
	} {
		lo, hi := ClopperPearsonInterval(tc.x, tc.n, 0.95)
		if math.Abs(lo-tc.lo) > 5e-5 || math.Abs(hi-tc.hi) > 5e-5 {
			t.Errorf("ClopperPearsonInterval(%d, %d, 0.95) = (%.5f, %.5f), published (%.4f, %.4f)", tc.x, tc.n, lo, hi, tc.lo, tc.hi)
		}
	}
}

// Rule of three: after 0 events in n trials the one-sided 95% upper bound
// is about 3/n (Hanley & Lippman-Hand, "If nothing goes wrong, is
// everything all right?", JAMA 249 (1983) 1743–1745). The exact bound is
// 1 − 0.05^(1/n); the rule is within 2% of it for n ≥ 100 (−ln 0.05 =
// 2.996), which is the tolerance here.
func TestRuleOfThree(t *testing.T) {
	for _, n := range []int{100, 300, 1000, 10000} {
		got := ClopperPearsonUpper(0, n, 0.95)
		if exact := 1 - math.Pow(0.05, 1/float64(n)); relErr(got, exact) > 1e-12 {
			t.Errorf("ClopperPearsonUpper(0, %d, 0.95) = %v, closed form 1 − 0.05^(1/n) = %v", n, got, exact)
		}
		if relErr(got, 3/float64(n)) > 0.02 {
			t.Errorf("ClopperPearsonUpper(0, %d, 0.95) = %v, rule of three %v", n, got, 3/float64(n))
		}
	}
}

// Reference: scipy.stats.beta.ppf (scipy 1.10): the one-sided upper bound is
// beta.ppf(C, x+1, n−x), the lower bound beta.ppf(1−C, x, n−x+1).
// Tolerance: relative 1e-9.
func TestClopperPearsonAgainstScipy(t *testing.T) {
	type cpCase struct {
		X    int     `json:"x"`
		N    int     `json:"n"`
		Conf float64 `json:"conf"`
	}
	type cpRef struct {
		Lo float64 `json:"lo"`
		Hi float64 `json:"hi"`
	}
	rng := rand.New(rand.NewPCG(7, 8))
	var cases []cpCase
	confs := []float64{0.8, 0.9, 0.95, 0.99, 0.999, 0.99999}
	for i := 0; i < 400; i++ {
		n := 1 + rng.IntN(50)
		if i%2 == 1 {
			n = 1 + rng.IntN(200000)
		}
		x := rng.IntN(n + 1)
		if i%4 < 2 {
			x = rng.IntN(min(n+1, 30))
		}
		cases = append(cases, cpCase{X: x, N: n, Conf: confs[rng.IntN(len(confs))]})
	}
	var refs []cpRef
	runScipy(t, `
import json, sys
from scipy.stats import beta
out = []
for c in json.load(sys.stdin):
    x, n, C = c["x"], c["n"], c["conf"]
    lo = 0.0 if x == 0 else float(beta.ppf(1 - C, x, n - x + 1))
    hi = 1.0 if x == n else float(beta.ppf(C, x + 1, n - x))
    out.append({"lo": lo, "hi": hi})
json.dump(out, sys.stdout)
`, cases, &refs)
	for i, c := range cases {
		if got := ClopperPearsonUpper(c.X, c.N, c.Conf); relErr(got, refs[i].Hi) > 1e-9 {
			t.Errorf("ClopperPearsonUpper(%d, %d, %v) = %.17g, scipy %.17g", c.X, c.N, c.Conf, got, refs[i].Hi)
		}
		if got := ClopperPearsonLower(c.X, c.N, c.Conf); relErr(got, refs[i].Lo) > 1e-9 {
			t.Errorf("ClopperPearsonLower(%d, %d, %v) = %.17g, scipy %.17g", c.X, c.N, c.Conf, got, refs[i].Lo)
		}
	}
}

func TestClopperPearsonDomain(t *testing.T) {
	for _, v := range []float64{
		ClopperPearsonUpper(3, 2, 0.95), ClopperPearsonUpper(0, 0, 0.95),
		ClopperPearsonLower(1, 10, 1), ClopperPearsonUpper(1, 10, 0),
	} {
		if !math.IsNaN(v) {
			t.Errorf("out-of-domain bound = %v, want NaN", v)
		}
	}
	if got := ClopperPearsonUpper(10, 10, 0.95); got != 1 {
		t.Errorf("upper bound at x = n = %v, want 1", got)
	}
	if got := ClopperPearsonLower(0, 10, 0.95); got != 0 {
		t.Errorf("lower bound at x = 0 = %v, want 0", got)
	}
}

// D1 and D0 snap products within 1e-9 of an integer (issue 2's rule).
func TestLotErrors(t *testing.T) {
	for _, tc := range []struct {
		n        int64
		ceil, p0 float64
		d1, d0   int64
	}{
		{1000, 0.02, 0.01, 20, 10},
		{1000, 0.0205, 0.0105, 21, 10},
		{3, 0.1, 0.1, 1, 0},
		{100, 0.07, 0.07, 7, 7},   // 0.07·100 = 7.000000000000001 in floating point
		{100, 0.29, 0.29, 29, 29}, // 0.29·100 = 28.999999999999996
	} {
		if got := BadLotErrors(tc.n, tc.ceil); got != tc.d1 {
			t.Errorf("BadLotErrors(%d, %v) = %d, want %d", tc.n, tc.ceil, got, tc.d1)
		}
		if got := GoodLotErrors(tc.n, tc.p0); got != tc.d0 {
			t.Errorf("GoodLotErrors(%d, %v) = %d, want %d", tc.n, tc.p0, got, tc.d0)
		}
	}
	if got, want := HypergeometricPValueAtLeast(0, 10, 100, 0.1), HypergeometricCDF(0, 100, 10, 10); got != want {
		t.Errorf("HypergeometricPValueAtLeast = %v, want %v", got, want)
	}
	if got, want := BinomialPValueAtLeast(2, 50, 0.1), BinomialCDF(2, 50, 0.1); got != want {
		t.Errorf("BinomialPValueAtLeast = %v, want %v", got, want)
	}
}

// TestHypergeometricUpperAgainstScipy: D_U found by a full scan over D with
// scipy.stats.hypergeom.cdf; exact (both give D/N for the same integer D).
func TestHypergeometricUpperAgainstScipy(t *testing.T) {
	type hc struct {
		X, N int
		Lot  int64
		Conf float64
	}
	cases := []hc{{0, 50, 1000, 0.95}, {3, 120, 500, 0.95}, {10, 200, 5000, 0.99}, {5, 5, 40, 0.9}, {0, 1, 10, 0.95}}
	var want []float64
	runScipy(t, `
import json, sys, numpy as np
from scipy.stats import hypergeom
out = []
for c in json.load(sys.stdin):
    x, n, N, conf = c["X"], c["N"], c["Lot"], c["Conf"]
    D = np.arange(x, N - (n - x) + 1)
    ok = D[hypergeom.cdf(x, N, D, n) > 1 - conf]
    out.append(float(ok.max()) / N)
print(json.dumps(out))`, cases, &want)
	for i, c := range cases {
		if got := HypergeometricUpper(c.X, c.N, c.Lot, c.Conf); got != want[i] {
			t.Errorf("%+v: %v, scipy scan %v", c, got, want[i])
		}
	}
}

// TestHypergeometricUpperDomain: NaN outside 0 ≤ x ≤ n ≤ N, n ≥ 1,
// 0 < confidence < 1 (the documented domain).
func TestHypergeometricUpperDomain(t *testing.T) {
	for _, c := range []struct {
		x, n int
		N    int64
		conf float64
	}{{-1, 5, 10, 0.9}, {6, 5, 10, 0.9}, {0, 0, 10, 0.9}, {0, 11, 10, 0.9}, {0, 5, 10, 1}, {0, 5, 10, 0}} {
		if got := HypergeometricUpper(c.x, c.n, c.N, c.conf); !math.IsNaN(got) {
			t.Errorf("%+v: %v, want NaN", c, got)
		}
	}
}

package sequential

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// fixedPlan finds the smallest fixed binomial plan (n, c) with
// P(X ≤ c | n, p1) ≤ alpha and P(X > c | n, p0) ≤ beta by a scan over n
// (test helper; the product's search lives in package plan). Tails come
// from gonum's regularized incomplete beta, an independent route from this
// package's dynamic programmes.
func fixedPlan(t testing.TB, p0, p1, alpha, beta float64) (int, int) {
	t.Helper()
	for n := 1; n < 1_000_000; n++ {
		b1 := distuv.Binomial{N: float64(n), P: p1}
		// largest c with CDF(c | p1) ≤ alpha
		lo, hi := -1, n-1
		for lo < hi {
			mid := (lo + hi + 1) / 2
			if b1.CDF(float64(mid)) <= alpha {
				lo = mid
			} else {
				hi = mid - 1
			}
		}
		if lo < 0 {
			continue
		}
		b0 := distuv.Binomial{N: float64(n), P: p0}
		if 1-b0.CDF(float64(lo)) <= beta {
			return n, lo
		}
	}
	t.Fatalf("no fixed plan for p0 %v p1 %v", p0, p1)
	return 0, 0
}

func TestFixedHelperKnownPlan(t *testing.T) {
	// issue 2 states n = 1271, c = 17 for ceiling 0.02, p0 0.01,
	// confidence 0.95, producer's risk 0.10 (cross-checked there against
	// scipy.stats.binom).
	n, c := fixedPlan(t, 0.01, 0.02, 0.05, 0.10)
	if n != 1271 || c != 17 {
		t.Fatalf("fixed plan = (%d, %d), want (1271, 17)", n, c)
	}
	_ = math.Abs
}

// finalCDF returns P(errors among the first T ≤ c) for c = 0 … cmax under
// m, exactly, by a dynamic programme whose last state absorbs every count
// above cmax.
func finalCDF(m Model, T, cmax int) []float64 {
	p := make([]float64, cmax+2)
	p[0] = 1
	binom, isBinom := m.(Binomial)
	for t := 0; t < T; t++ {
		top := min(t, cmax)
		// the absorbing state cmax+1 stays absorbed
		for e := top; e >= 0; e-- {
			q := 0.0
			if isBinom {
				q = binom.P
			} else {
				q = m.NextError(t, e)
			}
			v := p[e]
			p[e] = v * (1 - q)
			p[e+1] += v * q
		}
	}
	cdf := make([]float64, cmax+1)
	run := 0.0
	for c := 0; c <= cmax; c++ {
		run += p[c]
		cdf[c] = run
	}
	return cdf
}

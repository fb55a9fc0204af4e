package verdict

import (
	"math"

	"probity/plan"
)

// HypergeometricUpper is the exact one-sided upper confidence bound on the
// error rate of a finite lot of N decisions after x errors in a sample of n
// drawn without replacement: D_U / N, where
//
//	D_U = max{ D : P(X ≤ x | N, D, n) > α },   α = 1 − confidence,
//
// the largest lot error count not rejected by the exact test (the
// Clopper–Pearson test inversion applied to the hypergeometric; from
// memory, no single source). P(X ≤ x | D) falls as D grows,
// so D_U is found by bisection over x ≤ D ≤ N − (n − x). NaN outside
// 0 ≤ x ≤ n ≤ N or 0 < confidence < 1.
func HypergeometricUpper(x, n int, N int64, confidence float64) float64 {
	if n < 1 || x < 0 || x > n || int64(n) > N || !(confidence > 0 && confidence < 1) {
		return math.NaN()
	}
	alpha := 1 - confidence
	lo := int64(x)                // P(X ≤ x | D = x) = 1 > α
	hi := N - int64(n) + int64(x) // the largest D that allows only x errors
	if plan.HypergeometricCDF(x, N, hi, n) > alpha {
		return float64(hi) / float64(N)
	}
	// Invariant: CDF(lo) > α ≥ CDF(hi).
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if plan.HypergeometricCDF(x, N, mid, n) > alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return float64(lo) / float64(N)
}

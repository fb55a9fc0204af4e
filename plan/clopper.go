package plan

import (
	"math"
)

// ClopperPearsonUpper returns the one-sided exact upper confidence bound on
// a binomial proportion after x events in n trials (Clopper & Pearson,
// Biometrika 26, 1934): the p at which P(X ≤ x | n, p) = 1 − confidence,
// equivalently the confidence quantile of Beta(x+1, n−x). It is 1 when
// x = n and NaN when 0 ≤ x ≤ n, n ≥ 1 or 0 < confidence < 1 does not hold.
func ClopperPearsonUpper(x, n int, confidence float64) float64 {
	if !cpDomain(x, n, confidence) {
		return math.NaN()
	}
	if x == n {
		return 1
	}
	alpha := 1 - confidence
	// BinomialCDF(x, n, p) falls from 1 to 0 as p goes from 0 to 1.
	return solveDecreasing(func(p float64) float64 { return BinomialCDF(x, n, p) }, alpha)
}

// ClopperPearsonLower returns the one-sided exact lower confidence bound:
// the p at which P(X ≥ x | n, p) = 1 − confidence, equivalently the
// (1 − confidence) quantile of Beta(x, n−x+1). It is 0 when x = 0 and NaN
// outside the domain of ClopperPearsonUpper.
func ClopperPearsonLower(x, n int, confidence float64) float64 {
	if !cpDomain(x, n, confidence) {
		return math.NaN()
	}
	if x == 0 {
		return 0
	}
	alpha := 1 - confidence
	// P(X ≥ x) = BinomialSF(x−1, n, p) rises with p; its complement falls.
	return solveIncreasing(func(p float64) float64 { return BinomialSF(x-1, n, p) }, alpha)
}

// ClopperPearsonInterval returns the two-sided exact interval with
// (1 − confidence)/2 in each tail.
func ClopperPearsonInterval(x, n int, confidence float64) (lo, hi float64) {
	if !cpDomain(x, n, confidence) {
		return math.NaN(), math.NaN()
	}
	one := 1 - (1-confidence)/2
	return ClopperPearsonLower(x, n, one), ClopperPearsonUpper(x, n, one)
}

// BinomialPValueAtLeast is the exact p-value of H0: error ≥ ceiling against
// H1: error < ceiling after x errors in n labels:
//
//	p = P(X ≤ x | n, ceiling),  X ~ Bin(n, ceiling).
//
// A candidate is accepted at risk α when p ≤ α. NaN outside 0 ≤ ceiling ≤ 1
// or n < 0.
func BinomialPValueAtLeast(x, n int, ceiling float64) float64 {
	return BinomialCDF(x, n, ceiling)
}

// HypergeometricPValueAtLeast is the finite-lot analogue of
// BinomialPValueAtLeast: the p-value of H0: the lot of population decisions
// holds at least D1 = ⌈ceiling·population⌉ errors (see BadLotErrors) after x
// errors in a sample of n drawn without replacement:
//
//	p = P(X ≤ x | population, D1, n).
//
// NaN when n > population or ceiling is outside (0, 1].
func HypergeometricPValueAtLeast(x, n int, population int64, ceiling float64) float64 {
	if !(ceiling > 0 && ceiling <= 1) || population < 1 {
		return math.NaN()
	}
	return HypergeometricCDF(x, population, BadLotErrors(population, ceiling), n)
}

// BadLotErrors is D1 = ⌈ceiling·N⌉, the fewest errors a lot of N decisions
// holds when its error rate is at or above the ceiling. A product within
// 1e-9 of an integer is taken as that integer, so that 0.02·1000 is 20 and
// not 21 through rounding.
func BadLotErrors(population int64, ceiling float64) int64 {
	return int64(math.Ceil(snapInteger(ceiling * float64(population))))
}

// GoodLotErrors is D0 = ⌊p0·N⌋, the errors of a lot at the anticipated
// error p0 (the producer's point), with the same 1e-9 snapping as
// BadLotErrors.
func GoodLotErrors(population int64, anticipated float64) int64 {
	return int64(math.Floor(snapInteger(anticipated * float64(population))))
}

func snapInteger(v float64) float64 {
	if r := math.Round(v); math.Abs(v-r) <= 1e-9 {
		return r
	}
	return v
}

func cpDomain(x, n int, confidence float64) bool {
	return n >= 1 && x >= 0 && x <= n && confidence > 0 && confidence < 1
}

// solveDecreasing finds p in (0, 1) with f(p) = target for a continuous f
// falling from f(0) ≥ target to f(1) ≤ target, by bisection to full
// double precision (at most ~1100 halvings, in practice ~60).
func solveDecreasing(f func(float64) float64, target float64) float64 {
	lo, hi := 0.0, 1.0
	for i := 0; i < 2000; i++ {
		mid := mean(lo, hi)
		if mid <= lo || mid >= hi {
			break
		}
		if f(mid) > target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return closer(f, target, lo, hi)
}

// solveIncreasing finds p with f(p) = target for f rising from f(0) ≤ target
// to f(1) ≥ target.
func solveIncreasing(f func(float64) float64, target float64) float64 {
	return solveDecreasing(func(p float64) float64 { return -f(p) }, -target)
}

// mean halves an interval; below 1e-300 it halves geometrically so tiny
// roots are found to full relative precision.
func mean(lo, hi float64) float64 {
	if lo > 0 && hi/lo > 4 {
		return math.Sqrt(lo) * math.Sqrt(hi)
	}
	if lo == 0 && hi > 1e-300 {
		return hi / 4
	}
	return lo + (hi-lo)/2
}

func closer(f func(float64) float64, target, lo, hi float64) float64 {
	if math.Abs(f(lo)-target) < math.Abs(f(hi)-target) {
		return lo
	}
	return hi
}

// HypergeometricUpper is the exact one-sided upper confidence bound on the
// error rate of a finite lot of N decisions after x errors in a sample of n
// drawn without replacement: D_U / N, where
//
//	D_U = max{ D : P(X ≤ x | N, D, n) > α },   α = 1 − confidence,
//
// the largest lot error count not rejected by the exact test (the
// Clopper–Pearson test inversion applied to the hypergeometric; from
// memory, no single source). NaN outside 0 ≤ x ≤ n ≤ N, n ≥ 1 or
// 0 < confidence < 1.
func HypergeometricUpper(x, n int, N int64, confidence float64) float64 {
	if n < 1 || x < 0 || x > n || int64(n) > N || !(confidence > 0 && confidence < 1) {
		return math.NaN()
	}
	return float64(hypergeometricUpperErrors(x, n, N, 1-confidence)) / float64(N)
}

// hypergeometricUpperErrors is D_U = max{D : P(X ≤ x | N, D, n) > α} for
// 0 ≤ x ≤ n ≤ N and 0 < α < 1. P(X ≤ x | D) falls as D grows, so D_U is
// found by bisection over x ≤ D ≤ N − (n − x), the largest D that allows
// only x errors (at D = x the probability is 1). D_U + 1 is the fewest
// errors the lot can hold for the test to reject, the lowest lot error
// count x errors in n certify (Budget).
func hypergeometricUpperErrors(x, n int, N int64, alpha float64) int64 {
	lo := int64(x)                // P(X ≤ x | D = x) = 1 > α
	hi := N - int64(n) + int64(x) // the largest D that allows only x errors
	if HypergeometricCDF(x, N, hi, n) > alpha {
		return hi
	}
	// Invariant: CDF(lo) > α ≥ CDF(hi).
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if HypergeometricCDF(x, N, mid, n) > alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

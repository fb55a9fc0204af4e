package stratified

import (
	"math"

	"probity/plan"
)

// fisherCost (kept in the tests for the power comparison, see
// power_test.go) is w·(−ln p(d)) for one stratum, p(d) = P(X ≤ x | N_h, d, n_h)
// the exact hypergeometric p-value of "the stratum holds d errors" after x
// errors in n_h. −ln p(d) is convex in d: p(d) is the survival function at
// d of the position of the (x+1)-th sampled item in a random ordering of
// the stratum (a negative hypergeometric law), whose probabilities are
// log-concave in d (a product of two log-concave binomial coefficients),
// and the survival function of a log-concave law is log-concave (Bagnoli &
// Bergstrom, Economic Theory 26, 2005, for the discrete case). A stratum
// with no labeled item has p ≡ 1.
type fisherCost struct {
	s Stratum
	x int
	w float64
	// cap limits the range to d ≤ cap (a nondecreasing cost never needs
	// more errors in one stratum than the total tested).
	cap int64
}

func (c fisherCost) bounds() (int64, int64) {
	return 0, min(maxErrors(c.s, c.x), c.cap)
}

func (c fisherCost) at(d int64) float64 {
	if c.s.Sample == 0 || d <= int64(c.x) {
		return 0
	}
	p := plan.HypergeometricCDF(c.x, c.s.Population, d, c.s.Sample)
	return -c.w * math.Log(p)
}

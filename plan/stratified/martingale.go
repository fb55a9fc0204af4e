package stratified

import (
	"math"

	"probity/plan"
)

// mixtureCost is ln M(d) for one stratum: the prior–posterior ratio
// martingale for sampling without replacement (Waudby-Smith & Ramdas,
// "Confidence sequences for sampling without replacement", NeurIPS 2020),
// the likelihood of the labels seen so far under a beta-binomial prior on
// the stratum's error count over their likelihood when the stratum holds
// exactly d errors:
//
//	M(d) = B(a+x, b+n−x)/B(a, b) · C(n, x) / P(X = x | N_h, d, n),
//
// with x errors in the first n labeled items. Under d, M is a nonnegative
// martingale with mean 1 in n, whatever the order. −ln P(X = x | d) is
// convex in d (C(d, x)·C(N_h−d, n−x) is log-concave in d), so ln M(d) is.
// Counts d outside x ≤ d ≤ N_h − (n − x) are impossible.
type mixtureCost struct {
	s    Stratum
	x    int
	a, b float64
}

func (c mixtureCost) bounds() (int64, int64) {
	return int64(c.x), maxErrors(c.s, c.x)
}

func (c mixtureCost) at(d int64) float64 {
	n, x := c.s.Sample, c.x
	if n == 0 {
		return 0
	}
	mix := lbeta(c.a+float64(x), c.b+float64(n-x)) - lbeta(c.a, c.b) + lchoose(n, x)
	return mix - math.Log(plan.HypergeometricPMF(x, c.s.Population, d, n))
}

// lgamma is ln Γ(x) for x > 0.
func lgamma(x float64) float64 {
	v, _ := math.Lgamma(x)
	return v
}

func lbeta(a, b float64) float64 { return lgamma(a) + lgamma(b) - lgamma(a+b) }

func lchoose(n, k int) float64 {
	return lgamma(float64(n+1)) - lgamma(float64(k+1)) - lgamma(float64(n-k+1))
}

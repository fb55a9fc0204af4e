package plan

import "math"

// BernoulliKL is the relative entropy (Kullback–Leibler divergence) of
// Bernoulli(q) from Bernoulli(p), in nats:
//
//	kl(q‖p) = q ln(q/p) + (1−q) ln((1−q)/(1−p)),   0 ≤ q ≤ 1, 0 < p < 1,
//
// with 0·ln 0 = 0 (T. M. Cover & J. A. Thomas, Elements of Information
// Theory, 2nd ed., §2.3). It is the exponent of the Chernoff bound
// P(p̂ ≤ q) ≤ exp(−n·kl(q‖p)) for q < p (Hoeffding, JASA 58, 1963, eq.
// 2.1), behind both the kl sizing rule and the Chernoff bound of a
// judgement. The second term is computed as (1−q)(log1p(−q) − log1p(−p)),
// which keeps its accuracy when q and p are small.
func BernoulliKL(q, p float64) float64 {
	var s float64
	if q > 0 {
		s += q * math.Log(q/p)
	}
	if q < 1 {
		s += (1 - q) * (math.Log1p(-q) - math.Log1p(-p))
	}
	return s
}

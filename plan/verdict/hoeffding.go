package verdict

import (
	"math"

	"probity/plan"
)

// WeightedHoeffdingUpper is a rigorous one-sided upper bound for the
// stratified estimate: p̂ = Σ_i c_i Z_i with Z_i ∈ {0, 1} and c_i = W_h/n_h,
// so Hoeffding's inequality (Hoeffding, JASA 58, 1963, Theorem 2; it holds
// for sampling without replacement within a stratum, §6 there) gives
//
//	P(p̂ ≤ p − t) ≤ exp(−2 t² / Σ_h W_h²/n_h),
//	upper = min(1, p̂ + √(ln(1/α) · Σ_h W_h²/n_h / 2)),   α = 1 − confidence.
//
// For a self-weighting sample Σ W_h²/n_h = 1/n and this is the plain
// Hoeffding bound p̂ + √(ln(1/α)/(2n)). NaN outside 0 < confidence < 1.
func WeightedHoeffdingUpper(e Estimate, confidence float64) float64 {
	if !(confidence > 0 && confidence < 1) || !(e.SumW2n > 0) {
		return math.NaN()
	}
	return math.Min(1, e.Rate+math.Sqrt(math.Log(1/(1-confidence))*e.SumW2n/2))
}

// WeightedHoeffdingPValue is the p-value of H0: error ≥ ceiling from the
// same inequality: exp(−2 (ceiling − p̂)² / Σ W_h²/n_h) when p̂ < ceiling,
// else 1.
func WeightedHoeffdingPValue(e Estimate, ceiling float64) float64 {
	if e.Rate >= ceiling {
		return 1
	}
	d := ceiling - e.Rate
	return math.Exp(-2 * d * d / e.SumW2n)
}

// ChernoffUpper is the Chernoff relative-entropy (KL) upper bound for x
// errors in n (Chernoff, Ann. Math. Statist. 23, 1952; the form
// P(p̂ ≤ p − t) ≤ exp(−n KL(p̂ ‖ p)) for p̂ < p): the largest q ≥ p̂ with
//
//	n · KL(p̂ ‖ q) ≤ ln(1/α),   α = 1 − confidence,
//
// with KL = plan.BernoulliKL, found by bisection (KL(p̂ ‖ q) rises in q
// on [p̂, 1)). NaN outside 0 ≤ x ≤ n, n ≥ 1, 0 < confidence < 1.
func ChernoffUpper(x, n int, confidence float64) float64 {
	if n < 1 || x < 0 || x > n || !(confidence > 0 && confidence < 1) {
		return math.NaN()
	}
	p := float64(x) / float64(n)
	if x == n {
		return 1
	}
	target := math.Log(1/(1-confidence)) / float64(n)
	lo, hi := p, 1.0
	for i := 0; i < 200 && hi-lo > 1e-16; i++ {
		mid := lo + (hi-lo)/2
		if plan.BernoulliKL(p, mid) <= target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// ChernoffPValue is exp(−n KL(p̂ ‖ ceiling)) when p̂ < ceiling, else 1.
func ChernoffPValue(x, n int, ceiling float64) float64 {
	p := float64(x) / float64(n)
	if p >= ceiling {
		return 1
	}
	return math.Exp(-float64(n) * plan.BernoulliKL(p, ceiling))
}

package plan

import "math"

// The rows of a plan's comparison (RuleSize.Rule): the sample size each
// rule needs for the same risks.
const (
	RuleExactBinomial       = "exact-binomial"
	RuleExactHypergeometric = "exact-hypergeometric"
	RuleHoeffding           = "hoeffding"
	RuleKL                  = "kl"
	RuleChebyshev           = "chebyshev"
)

// exactBinomialKeeps: accept at ≤ c of n keeps the consumer's risk when
//
//	P(X ≤ c | n, ceiling) ≤ α,   X ~ Bin(n, ceiling)
//
// (the exact binomial test; the acceptance probability falls as the true
// error grows, so the ceiling is the worst case of every error ≥ ceiling).
func exactBinomialKeeps(ceiling, alpha float64) func(c, n int) bool {
	return func(c, n int) bool { return BinomialCDF(c, n, ceiling) <= alpha }
}

// exactHypergeometricKeeps: for a lot of N decisions holding D1 errors,
//
//	P(X ≤ c | N, D1, n) ≤ α,   X hypergeometric,
//
// which for fixed c falls as n grows.
func exactHypergeometricKeeps(population, d1 int64, alpha float64) func(c, n int) bool {
	return func(c, n int) bool { return HypergeometricCDF(c, population, d1, n) <= alpha }
}

// hoeffdingKeeps: Hoeffding's inequality (W. Hoeffding, JASA 58, 1963, Thm
// 1 and §6 for sampling without replacement) gives P(p̂ ≤ p − t) ≤
// exp(−2nt²) for every true error p, so the rule
//
//	accept when c/n + sqrt(ln(1/α)/(2n)) ≤ ceiling
//
// accepts a model at or above the ceiling with probability at most α.
func hoeffdingKeeps(ceiling, alpha float64) func(c, n int) bool {
	l := math.Log(1 / alpha)
	return func(c, n int) bool {
		fn := float64(n)
		return float64(c)/fn+math.Sqrt(l/(2*fn)) <= ceiling
	}
}

// klKeeps: the Chernoff bound in relative-entropy form (Chernoff, Ann. Math.
// Stat. 23, 1952; Hoeffding 1963, eq. 2.1) gives P(p̂ ≤ q) ≤ exp(−n·kl(q‖p))
// for q < p, with kl(q‖p) = q ln(q/p) + (1−q) ln((1−q)/(1−p)), so
//
//	accept when c/n < ceiling and n·kl(c/n ‖ ceiling) ≥ ln(1/α).
//
// At c = 0 it coincides with the exact binomial zero-failure rule.
func klKeeps(ceiling, alpha float64) func(c, n int) bool {
	l := math.Log(1 / alpha)
	return func(c, n int) bool {
		q := float64(c) / float64(n)
		return q < ceiling && float64(n)*BernoulliKL(q, ceiling) >= l
	}
}

// chebyshevKeeps: the one-sided Chebyshev (Cantelli) inequality P(p̂ − p ≤
// −t) ≤ v/(v + t²) with v = p(1−p)/n, taken at p = ceiling, gives
//
//	accept when c/n + sqrt(ceiling(1−ceiling)(1−α)/(α n)) ≤ ceiling.
//
// It is shown for comparison only (it uses the variance at the ceiling).
func chebyshevKeeps(ceiling, alpha float64) func(c, n int) bool {
	v := ceiling * (1 - ceiling) * (1 - alpha) / alpha
	return func(c, n int) bool {
		fn := float64(n)
		return float64(c)/fn+math.Sqrt(v/fn) <= ceiling
	}
}

package stratified

import (
	"fmt"
	"math/big"

	"probity/plan"
)

// SimpleRandomShortcut reports whether an acceptance rule (n, c) sized for
// a simple random sample keeps its consumer's risk α = 1 − confidence when
// it judges this stratified design by the total number of errors, and if
// not, why not.
//
// It qualifies exactly when
//
//   - the allocation is exactly proportional: n_h·N = n·N_h for every
//     stratum (so every stratum is sampled, and Σ n_h = n),
//   - c ≤ n·D*/N − 1, D* = ⌈ceiling·N⌉, and
//   - P(Bin(n, D*/N) ≤ c) ≤ α.
//
// Then for any errors d_h with Σ d_h ≥ D* the total S is a sum of n
// independent Bernoulli trials (each stratum's hypergeometric count is
// one: Vatutin & Mikhailov 1982) with mean μ = (n/N)·Σ d_h ≥ n·D*/N, and
// Hoeffding (1956, Theorem 4) gives P(S ≤ c) ≤ P(Bin(n, μ/n) ≤ c) ≤
// P(Bin(n, D*/N) ≤ c) ≤ α, since c ≤ μ − 1. The binomial rule of a plan
// (P(Bin(n, ceiling) ≤ c) ≤ α) meets the third condition because D*/N ≥
// ceiling. Rounding a proportional share, leaving a stratum empty or giving
// a minimum per stratum breaks the first: the errors can then sit where
// fewer items per decision were drawn. The theorem compares with the
// binomial, so the larger acceptance number a finite lot's hypergeometric
// law allows usually fails the third. Designs that do not qualify are
// judged by CountRule.
func SimpleRandomShortcut(d Design, n, c int, ceiling, confidence float64) (bool, string) {
	if err := d.Validate(); err != nil {
		return false, err.Error()
	}
	if !(ceiling > 0 && ceiling < 1) || !(confidence > 0 && confidence < 1) {
		return false, fmt.Sprintf("ceiling %v and confidence %v must be between 0 and 1", ceiling, confidence)
	}
	N := d.Population()
	if d.SampleSize() != n {
		return false, fmt.Sprintf("the strata hold %d labeled items, not the plan's n = %d", d.SampleSize(), n)
	}
	bn, bN := big.NewInt(int64(n)), big.NewInt(N)
	for _, s := range d.Strata {
		lhs := new(big.Int).Mul(big.NewInt(int64(s.Sample)), bN)
		rhs := new(big.Int).Mul(bn, big.NewInt(s.Population))
		if lhs.Cmp(rhs) != 0 {
			share := new(big.Rat).SetFrac(rhs, bN)
			f, _ := share.Float64()
			return false, fmt.Sprintf("stratum %q has %d items where exact proportion needs %.6g (n·N_h/N): the allocation is not self-weighting", s.Label, s.Sample, f)
		}
	}
	dstar := d.BadLotErrors(ceiling)
	// c ≤ n·D*/N − 1  ⇔  (c+1)·N ≤ n·D*
	lhs := new(big.Int).Mul(big.NewInt(int64(c)+1), bN)
	rhs := new(big.Int).Mul(bn, big.NewInt(dstar))
	if lhs.Cmp(rhs) > 0 {
		m, _ := new(big.Rat).SetFrac(rhs, bN).Float64()
		return false, fmt.Sprintf("the rule allows c = %d errors but the binomial comparison needs c ≤ n·D*/N − 1 = %.4g", c, m-1)
	}
	if p := plan.BinomialCDF(c, n, float64(dstar)/float64(N)); p > 1-confidence {
		return false, fmt.Sprintf("the rule allows c = %d errors but P(Bin(%d, D*/N) ≤ %d) = %.4g exceeds the risk %.4g", c, n, c, p, 1-confidence)
	}
	return true, "exactly proportional allocation: the total count is bounded by the binomial rule (Hoeffding 1956, Theorem 4)"
}

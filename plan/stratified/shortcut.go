package stratified

import (
	"fmt"
	"math/big"
)

// SimpleRandomShortcut reports whether a binomial acceptance rule (n, c),
// sized for a simple random sample of n — c chosen so that
// P(Bin(n, ceiling) ≤ c) ≤ α — keeps its consumer's risk when it judges this
// stratified design by the total number of errors, and if not, why not.
//
// It qualifies exactly when
//
//   - the allocation is exactly proportional: n_h·N = n·N_h for every
//     stratum (so every stratum is sampled, and Σ n_h = n), and
//   - c ≤ n·D*/N − 1, D* = ⌈ceiling·N⌉.
//
// Then for any errors d_h with Σ d_h ≥ D* the total S is a sum of n
// independent Bernoulli trials (each stratum's hypergeometric count is
// one: Vatutin & Mikhailov 1982) with mean μ = (n/N)·Σ d_h ≥ n·D*/N ≥
// n·ceiling, and Hoeffding (1956, Theorem 4) gives P(S ≤ c) ≤
// P(Bin(n, μ/n) ≤ c) ≤ P(Bin(n, ceiling) ≤ c) ≤ α for c ≤ μ − 1. Rounding a
// proportional share, leaving a stratum empty or giving a minimum per
// stratum breaks the first condition: the errors can then sit where fewer
// items per decision were drawn, and the count is no longer binomial-
// bounded. The theorem compares with the binomial, so an acceptance number
// computed from the hypergeometric law of a finite lot (larger than the
// binomial one) is not covered either; such designs are judged by
// CountRule.
func SimpleRandomShortcut(d Design, n, c int, ceiling float64) (bool, string) {
	if err := d.Validate(); err != nil {
		return false, err.Error()
	}
	if !(ceiling > 0 && ceiling < 1) {
		return false, fmt.Sprintf("ceiling %v is not between 0 and 1", ceiling)
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
	return true, "exactly proportional allocation: the total count is bounded by the binomial rule (Hoeffding 1956, Theorem 4)"
}

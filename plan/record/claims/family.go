package claims

import (
	"sort"

	"probity/plan"
)

// Family decides which claims of a family of K are accepted from their
// p-values under the plan's multiplicity with family risk δ: Bonferroni
// (p_i ≤ δ/K), Holm (step-down over the p-values in increasing order, the
// step s at δ/(K − s), the first failure rejecting every later one; ties
// keep the declared order) or fixed-sequence (in declared order at δ until
// the first rejection). Each is monotone: lowering any p-value never turns
// an acceptance into a rejection, which is what lets progress decide a
// claim from the p-values at the extremes of its remaining labels.
func Family(m plan.Multiplicity, delta float64, p []float64) []bool {
	K := len(p)
	out := make([]bool, K)
	switch m {
	case plan.Holm:
		order := make([]int, K)
		for i := range order {
			order[i] = i
		}
		sort.SliceStable(order, func(a, b int) bool { return p[order[a]] < p[order[b]] })
		for step, i := range order {
			if p[i] > delta/float64(K-step) {
				break
			}
			out[i] = true
		}
	case plan.FixedSequence:
		for i := range p {
			if p[i] > delta {
				break
			}
			out[i] = true
		}
	default:
		for i := range p {
			out[i] = p[i] <= delta/float64(K)
		}
	}
	return out
}

package stratified

import (
	"fmt"
	"math"

	"probity/plan"
)

// AcceptProbability is the exact chance that the rule accepts when
// stratum h holds errors[h] errors: P(S ≤ c) for S the sum of the
// independent hypergeometric counts X_h ~ Hyp(N_h, errors[h], k_h), by
// convolution of their probabilities (only the values 0 … c matter).
func (r *CountRule) AcceptProbability(errors []int64) (float64, error) {
	if len(errors) != len(r.Design.Strata) {
		return math.NaN(), fmt.Errorf("%w: %d error counts for %d strata", ErrDesign, len(errors), len(r.Design.Strata))
	}
	for h, s := range r.Design.Strata {
		if errors[h] < 0 || errors[h] > s.Population {
			return math.NaN(), fmt.Errorf("%w: stratum %q cannot hold %d errors in %d decisions", ErrDesign, s.Label, errors[h], s.Population)
		}
	}
	c := r.Accept
	if c < 0 {
		return 0, nil
	}
	dist := []float64{1} // P(S_so_far = s), s = 0 … min(c, Σ k)
	for h, s := range r.Design.Strata {
		k := r.Counted[h]
		if k == 0 {
			continue
		}
		top := min(k, c)
		pmf := make([]float64, top+1)
		for x := 0; x <= top; x++ {
			pmf[x] = plan.HypergeometricPMF(x, s.Population, errors[h], k)
		}
		// the probabilities that did not underflow
		lo, hi := 0, top
		for lo < hi && pmf[lo] == 0 {
			lo++
		}
		for hi > lo && pmf[hi] == 0 {
			hi--
		}
		next := make([]float64, min(len(dist)+top, c+1))
		for i, a := range dist {
			if a == 0 {
				continue
			}
			for x := lo; x <= hi && i+x < len(next); x++ {
				next[i+x] += a * pmf[x]
			}
		}
		dist = next
	}
	var p float64
	for _, v := range dist {
		p += v
	}
	return math.Min(p, 1), nil
}

package claims

import (
	"probity/plan/measure"
)

// AcceptanceNumber is what a claim's design accepts at level α, fixed
// before any label: the most events among its counted items (for a ratio,
// on its numerator's side, with its denominator's side within c_B) at
// which plan/measure's judgement (ClaimDesign.Judge) still accepts; −1
// when none does. The judgement's p-value grows with the events, so the
// largest accepting count is found by bisection.
func AcceptanceNumber(pop measure.Population, cd measure.ClaimDesign, alpha float64) (int, error) {
	counted := 0
	for h, k := range cd.Counted {
		if k > 0 && cd.Measure.OnNumerator(pop.Candidates[cd.Candidate].Positive[h]) {
			counted += k
		}
	}
	accepts := func(s int) (bool, error) {
		smp := make(measure.Sample, len(pop.Strata))
		left := s
		for h, k := range cd.Counted {
			pos := pop.Candidates[cd.Candidate].Positive[h]
			for range k {
				// an event is the class the candidate does not predict
				l := measure.Label{Positive: pos}
				if left > 0 && cd.Measure.OnNumerator(pos) {
					l.Positive, left = !pos, left-1
				}
				smp[h] = append(smp[h], l)
			}
		}
		v, err := cd.Judge(pop, smp, alpha)
		return v.Accepted, err
	}
	lo, hi := -1, counted+1 // accepts(lo) (or −1), not accepts(hi) (virtual)
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		ok, err := accepts(mid)
		if err != nil {
			return 0, err
		}
		if ok {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo, nil
}

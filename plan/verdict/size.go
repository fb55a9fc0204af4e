package verdict

import (
	"errors"
	"fmt"

	"probity/plan"
)

// ErrDesignTooLarge is returned when no sample within the limit gives the
// stratified count rule the producer's risk the plan allows.
var ErrDesignTooLarge = errors.New("no sample within the limit meets the producer's risk under the stratified count rule")

// SizeStratified is the smallest sample n, found by search, for which the
// stratified count rule on the planned design — strata of sizes
// strata[h].Population, n allocated by allocate — accepts a candidate with
// the anticipated error rates (rates, or the plan's p0 in every stratum)
// with probability at least 1 − producer's risk, at the plan's
// per-candidate risk; without an anticipated error, the smallest n for
// which some count passes (the zero-failure plan). It returns n, the
// design at n and the rule there.
//
// The chance of acceptance is not monotone in n (rounding changes the
// allocation and the counted sub-sample): the search doubles from start
// until a feasible n, bisects, then scans the tenth below the bisection's
// answer (at least 50 sizes, in about 200 strides, refined to single
// sizes below the smallest feasible one) for a smaller feasible n. The
// result is feasible; it is the smallest only within that scan.
func SizeStratified(p *plan.File, strata []Stratum, rates []float64, allocate func(n int) ([]int, error), start, limit int) (int, Design, *Applied, error) {
	level := p.Inputs.PerCandidateRisk()
	zeroFailure := p.Inputs.Anticipated == nil && rates == nil
	try := func(n int) (bool, Design, *Applied, error) {
		nh, err := allocate(n)
		if err != nil {
			return false, Design{}, nil, err
		}
		d := Design{Strata: append([]Stratum(nil), strata...)}
		for h := range d.Strata {
			d.Strata[h].Sample = nh[h]
		}
		if err := d.validate(); err != nil {
			return false, d, nil, err
		}
		a := &Applied{Design: d.stratified()}
		for _, s := range d.Strata {
			if s.Sample == 0 {
				a.Unknown = append(a.Unknown, s.Label)
			}
		}
		if err := a.count(p, d, rates, level); err != nil {
			return false, d, nil, err
		}
		if zeroFailure {
			return a.Count.Accept >= 0, d, a, nil
		}
		return a.ProducerRisk <= p.Inputs.ProducerRisk, d, a, nil
	}
	lo, hi := 0, max(start, 1)
	for {
		ok, _, _, err := try(hi)
		if err != nil {
			return 0, Design{}, nil, err
		}
		if ok {
			break
		}
		if hi >= limit {
			return 0, Design{}, nil, fmt.Errorf("%w (%d labels)", ErrDesignTooLarge, limit)
		}
		lo, hi = hi, min(2*hi, limit)
	}
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		ok, _, _, err := try(mid)
		if err != nil {
			return 0, Design{}, nil, err
		}
		if ok {
			hi = mid
		} else {
			lo = mid
		}
	}
	// The scan: the last tenth below (at least 50 sizes) in at most about
	// 200 strides, then every size within a stride below the smallest
	// feasible one found.
	best := hi
	span := max(50, hi/10)
	stride := max(1, span/200)
	for n := hi - stride; n >= max(1, hi-span); n -= stride {
		ok, _, _, err := try(n)
		if err != nil {
			return 0, Design{}, nil, err
		}
		if ok {
			best = n
		}
	}
	for n := best - 1; n > max(0, best-stride); n-- {
		ok, _, _, err := try(n)
		if err != nil {
			return 0, Design{}, nil, err
		}
		if ok {
			best = n
		}
	}
	_, d, a, err := try(best)
	return best, d, a, err
}

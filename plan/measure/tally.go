package measure

import (
	"fmt"
	"math"

	"probity/plan"
	"probity/plan/stratified"
)

// tally is the exact test of "a group of strata holds at least D events"
// from the events S among a counted sub-sample of each stratum (the first
// k_h of its labeled items in key order, a simple random sample of its N_h
// decisions). With one stratum it is the hypergeometric test, S ~ Hyp(N,
// D, k), whose p-value P(S ≤ s | D) is exact. With several it is the
// count rule of plan/stratified: Hoeffding's binomial bound at the least
// favourable spread of D events over the strata, which keeps its risk for
// every spread (Hoeffding 1956, Theorem 4; see stratified.CountRule).
// Either way the p-value p(s, D) does not decrease in s and does not
// increase in D, and P(p(S, D) ≤ α) ≤ α for every population holding at
// least D events.
type tally struct {
	N     []int64 // member strata sizes
	k     []int   // counted items per member
	total int64   // Σ N
	size  int     // Σ k
	rule  *stratified.CountRule
}

// newTally builds the tally of the strata with sizes N and counted items k.
func newTally(N []int64, k []int) (*tally, error) {
	if len(N) != len(k) || len(N) == 0 {
		return nil, fmt.Errorf("%w: %d counted sizes for %d strata", ErrPopulation, len(k), len(N))
	}
	t := &tally{N: N, k: k}
	for i := range N {
		if k[i] < 0 || int64(k[i]) > N[i] {
			return nil, fmt.Errorf("%w: %d counted items in a stratum of %d", ErrPopulation, k[i], N[i])
		}
		t.total += N[i]
		t.size += k[i]
	}
	if len(N) > 1 {
		d := stratified.Design{Strata: make([]stratified.Stratum, len(N))}
		for i := range N {
			d.Strata[i] = stratified.Stratum{Label: fmt.Sprint(i), Population: N[i], Sample: k[i]}
		}
		// The rule's own ceiling and confidence are not used: the tally
		// asks it about any count D at any level (PValueAt). The smallest
		// ceiling keeps the construction from searching an acceptance
		// number it will not use.
		r, err := stratified.NewCountRule(d, nil, math.SmallestNonzeroFloat64, 0.5)
		if err != nil {
			return nil, err
		}
		t.rule = r
	}
	return t, nil
}

// pValue is p(s, D), the p-value of "the group holds at least D events"
// after s events among the counted items: 1 for D ≤ 0, 0 for D above the
// group's size.
func (t *tally) pValue(s int, D int64) float64 {
	switch {
	case D <= 0:
		return 1
	case D > t.total:
		return 0
	case t.rule != nil:
		return t.rule.PValueAt(s, D)
	}
	return plan.HypergeometricCDF(s, t.N[0], D, t.k[0])
}

// acceptAt is the acceptance number of the test of D at level α: the
// largest s with p(s, D) ≤ α (the group is then shown to hold fewer than D
// events), −1 when no count passes; every count passes when D exceeds the
// group. hint is a guess (the answer at a nearby design), from which the
// search steps; it costs a few tail evaluations when the guess is close.
func (t *tally) acceptAt(D int64, alpha float64, hint int) int {
	if D > t.total {
		return t.size
	}
	if D <= 0 {
		return -1
	}
	c := min(max(hint, -1), t.size)
	if c >= 0 && t.pValue(c, D) > alpha {
		// gallop down to a count that passes (or −1), then bisect
		hi, step := c, 1
		for {
			lo := max(hi-step, -1)
			if lo < 0 || t.pValue(lo, D) <= alpha {
				return t.bisect(D, alpha, lo, hi)
			}
			hi, step = lo, step*2
		}
	}
	// p(c, D) ≤ α (or c = −1): gallop up to a count that fails
	step := 1
	for c < t.size {
		next := min(c+step, t.size)
		if t.pValue(next, D) > alpha {
			return t.bisect(D, alpha, c, next)
		}
		c, step = next, step*2
	}
	return c
}

// bisect is the largest s in [lo, hi) with p(s, D) ≤ α, given p(lo) ≤ α
// (or lo = −1) and p(hi) > α.
func (t *tally) bisect(D int64, alpha float64, lo, hi int) int {
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if t.pValue(mid, D) <= alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// upper is D_U, the largest number of events the group may hold that the
// test at level α does not reject after s counted events: the one-sided
// upper confidence bound (test inversion; P(D > D_U) ≤ α for every true
// D). It is the group's size when nothing is rejected.
func (t *tally) upper(s int, alpha float64) int64 { return t.upperScaled(s, alpha, 1) }

// upperScaled is the largest D with w·p(s, D) > α (p(s, D) does not
// increase in D, and w·p(s, 0) = w > α is required), the upper bound at
// level α/w computed with the same arithmetic as the product w·p that a
// ratio's acceptance compares with α.
func (t *tally) upperScaled(s int, alpha, w float64) int64 {
	lo, hi := int64(0), t.total // w·p(lo) > α
	if t.rule == nil {
		lo = int64(s) // the stratum holds at least the s events seen
		hi = t.total - int64(t.k[0]-s)
	}
	if t.pValue(s, hi)*w > alpha {
		return hi
	}
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if t.pValue(s, mid)*w > alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// cdf is P(S ≤ c) exactly when member i holds events[i] events (the
// independent hypergeometric counts of the members, convolved).
func (t *tally) cdf(events []int64, c int) float64 { return t.cdfs(events, c)(c) }

// cdfs returns c ↦ P(S ≤ c) for every c ≤ top, from one convolution of
// the members' laws (or the hypergeometric tail for one stratum).
func (t *tally) cdfs(events []int64, top int) func(c int) float64 {
	if t.rule == nil || top < 0 || top >= t.size {
		return func(c int) float64 {
			switch {
			case c < 0:
				return 0
			case c >= t.size:
				return 1
			}
			return plan.HypergeometricCDF(c, t.N[0], events[0], t.k[0])
		}
	}
	dist, err := t.rule.CountDistribution(events, top)
	if err != nil {
		panic(err) // the events were validated with the composition
	}
	cum := make([]float64, len(dist))
	var p float64
	for i, v := range dist {
		p += v
		cum[i] = math.Min(p, 1)
	}
	return func(c int) float64 {
		switch {
		case c < 0:
			return 0
		case c >= t.size:
			return 1
		case c >= len(cum):
			if len(cum) == 0 {
				return 0 // every count exceeds top
			}
			return cum[len(cum)-1]
		}
		return cum[c]
	}
}

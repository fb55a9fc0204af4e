package measure

import (
	"fmt"
	"math"
	"math/bits"

	"probity/plan"
)

// ClaimDesign is how one claim will be judged, fixed before any label: the
// labeled items it counts and, for a ratio, its planned floor.
type ClaimDesign struct {
	Claim
	// Counted[h] is the number of labeled items of stratum h the claim
	// counts — the first Counted[h] of the stratum in key order, a simple
	// random sample of its decisions — and 0 outside the claim's strata.
	// Within each side of the claim the counted items are proportional to
	// the strata sizes (ProportionalCounts), as the count rule wants them.
	Counted []int
	// Floor is b₀ for a ratio (fnr, fpr): the fewest decisions of the
	// ratio's other part (true positives for fnr, true negatives for fpr)
	// the judgement must show; 0 for a proportion.
	Floor int64
}

// claimRule is a ClaimDesign made ready to judge: its sides' tallies and
// the counts its tests are at.
type claimRule struct {
	ClaimDesign
	a, b   side
	ta, tb *tally // tb is nil for a proportion
	// aStar is the count of the a side's test: D* = ⌈ceiling·N_a⌉ for a
	// proportion, the least A with A/(A + b₀) ≥ ceiling for a ratio.
	aStar int64
	// cStar is the count of the b side's test (ratios): N_b − b₀ + 1, so
	// that rejecting "C ≥ c*" shows B = N_b − C ≥ b₀.
	cStar int64
}

// rule builds the claim's tests on the population.
func (cd ClaimDesign) rule(p Population) (*claimRule, error) {
	if err := p.checkClaim(cd.Claim); err != nil {
		return nil, err
	}
	if len(cd.Counted) != len(p.Strata) {
		return nil, fmt.Errorf("%w: %s counts items in %d of %d strata", ErrPopulation, cd.name(p), len(cd.Counted), len(p.Strata))
	}
	r := &claimRule{ClaimDesign: cd}
	r.a, r.b = cd.sides(p)
	if len(r.a.strata) == 0 {
		return nil, fmt.Errorf("%w: %s has no strata to count (the candidate predicts one side only)", ErrPopulation, cd.name(p))
	}
	var err error
	if r.ta, err = sideTally(p, r.a, cd.Counted); err != nil {
		return nil, err
	}
	Na := r.a.population(p)
	if !cd.Measure.Ratio() {
		r.aStar = plan.BadLotErrors(Na, cd.Ceiling)
		return r, nil
	}
	if len(r.b.strata) == 0 {
		return nil, fmt.Errorf("%w: %s has no strata for its denominator (the candidate predicts one side only)", ErrPopulation, cd.name(p))
	}
	Nb := r.b.population(p)
	if cd.Floor < 1 || cd.Floor > Nb {
		return nil, fmt.Errorf("%w: %s has floor %d outside 1 … %d", ErrPopulation, cd.name(p), cd.Floor, Nb)
	}
	if r.tb, err = sideTally(p, r.b, cd.Counted); err != nil {
		return nil, err
	}
	r.aStar = ratioBadCount(cd.Floor, cd.Ceiling)
	r.cStar = Nb - cd.Floor + 1
	return r, nil
}

// sideTally is the tally of a side at the counted items of its strata.
func sideTally(p Population, sd side, counted []int) (*tally, error) {
	N := make([]int64, len(sd.strata))
	k := make([]int, len(sd.strata))
	for i, h := range sd.strata {
		N[i], k[i] = p.Strata[h].Population, counted[h]
	}
	return newTally(N, k)
}

// ratioBadCount is a* = min{a ≥ 0 : a/(a + b) ≥ θ} = ⌈θ·b/(1 − θ)⌉ for
// b ≥ 1, the fewest events A that put the ratio A/(A + b) at or above the
// ceiling θ. A product within 1e-9 of an integer is taken as that integer
// (as plan.BadLotErrors does), so that a ceiling typed as 0.2 means 1/5.
func ratioBadCount(b int64, theta float64) int64 {
	v := theta * float64(b) / (1 - theta)
	if r := math.Round(v); math.Abs(v-r) <= 1e-9 {
		return int64(r)
	}
	return int64(math.Ceil(v))
}

// accepts returns the acceptance numbers at level α: the a side passes
// when its counted events are at most ca, the b side (ratios) when its
// counted complement events are at most cb.
func (r *claimRule) accepts(alpha float64) (ca, cb int) {
	ca = r.ta.acceptAt(r.aStar, alpha, 0)
	if r.tb != nil {
		cb = r.tb.acceptAt(r.cStar, alpha, 0)
	}
	return ca, cb
}

// acceptProbability is the exact chance that the claim is accepted at
// level α when the population is c: P(S_a ≤ ca) for a proportion, and
// P(S_a ≤ ca)·P(S_b ≤ cb) for a ratio (its sides are sampled
// independently).
func (r *claimRule) acceptProbability(p Population, c Composition, alpha float64) float64 {
	ca, cb := r.accepts(alpha)
	pr := r.ta.cdf(r.a.counts(p, c), ca)
	if r.tb != nil {
		pr *= r.tb.cdf(r.b.counts(p, c), cb)
	}
	return pr
}

// AcceptProbability is the exact chance that the claim is accepted at
// level α when the population's composition is c: for a proportion the
// law of its count (hypergeometric, or the convolution over its strata),
// for a ratio the product of its two sides' chances of passing (they are
// sampled independently).
func (cd ClaimDesign) AcceptProbability(p Population, c Composition, alpha float64) (float64, error) {
	if err := p.Validate(); err != nil {
		return 0, err
	}
	if err := c.Validate(p); err != nil {
		return 0, err
	}
	if !(alpha > 0 && alpha < 1) {
		return 0, fmt.Errorf("%w: level %v is not between 0 and 1", ErrPopulation, alpha)
	}
	r, err := cd.rule(p)
	if err != nil {
		return 0, err
	}
	return r.acceptProbability(p, c, alpha), nil
}

// ProportionalCounts is the counted sub-sample of m items spread over the
// given strata in proportion to their sizes, rounding up: k_h = ⌈m·N_h/N_G⌉
// (exact integer arithmetic), which never puts fewer than m/N_G items per
// decision in any stratum (the least favourable spread of the count rule
// gains nothing from rounding). For a single stratum it is m. m is at
// most N_G.
func ProportionalCounts(p Population, strata []int, m int) []int {
	out := make([]int, len(p.Strata))
	proportional(p, strata, m, out)
	return out
}

// proportional writes ⌈m·N_h/N_G⌉ into out[h] for the strata h.
func proportional(p Population, strata []int, m int, out []int) {
	var NG uint64
	for _, h := range strata {
		NG += uint64(p.Strata[h].Population)
	}
	for _, h := range strata {
		hi, lo := bits.Mul64(uint64(m), uint64(p.Strata[h].Population))
		lo, carry := bits.Add64(lo, NG-1, 0)
		q, _ := bits.Div64(hi+carry, lo, NG)
		out[h] = int(q)
	}
}

package measure

import (
	"fmt"
	"math"
	"math/bits"

	"probity/plan"
)

// ClaimDesign is how one claim will be judged, fixed before any label: the
// labeled items it counts and, for a ratio, its floor and the acceptance
// number of its denominator's side.
type ClaimDesign struct {
	Claim
	// Counted[h] is the number of labeled items of stratum h the claim
	// counts — the first Counted[h] of the stratum in key order, a simple
	// random sample of its decisions — and 0 outside the claim's strata.
	// Within each side of the claim the counted items are proportional to
	// the strata sizes (ProportionalCounts), as the count rule wants them.
	Counted []int
	// Floor is b₀ for a ratio (fnr, fpr): the denominator's other part B
	// (true positives for fnr, true negatives for fpr) at or above which
	// the numerator's test alone keeps the risk; 0 for a proportion.
	Floor int64
	// BAccept is c_B for a ratio: the most complement events (false
	// positives for fnr, false negatives for fpr) among the counted items
	// of the denominator's side that still pass; 0 for a proportion.
	BAccept int
}

// claimRule is a ClaimDesign made ready to judge: its sides' tallies and
// the counts its tests are at.
type claimRule struct {
	ClaimDesign
	a, b   side
	ta, tb *tally // tb is nil for a proportion
	// aStar is the count of the a side's test: D* = ⌈ceiling·N_a⌉ for a
	// proportion, a*(b₀) — the least A with A/(A + b₀) ≥ ceiling — for a
	// ratio.
	aStar int64
	// Ratios: the denominator parts below the floor in intervals
	// [lat[j+1], lat[j] − 1] (see floorLattice); on interval j the
	// numerator is at least aLat[j] = a*(lat[j+1]) and the complement
	// events at least cLat[j] = N_b − lat[j] + 1, which the b side passes
	// with probability at most w[j].
	lat          []int64
	aLat, cLat   []int64
	w            []float64
	nb           int64 // N_b
	unacceptable bool  // BAccept < 0: no sample passes
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
	r.nb = r.b.population(p)
	if cd.Floor < 1 || cd.Floor > r.nb {
		return nil, fmt.Errorf("%w: %s has floor %d outside 1 … %d", ErrPopulation, cd.name(p), cd.Floor, r.nb)
	}
	if r.tb, err = sideTally(p, r.b, cd.Counted); err != nil {
		return nil, err
	}
	if cd.BAccept > r.tb.size {
		return nil, fmt.Errorf("%w: %s accepts %d complement events among %d counted items", ErrPopulation, cd.name(p), cd.BAccept, r.tb.size)
	}
	r.unacceptable = cd.BAccept < 0
	r.aStar = ratioBadCount(cd.Floor, cd.Ceiling)
	r.lat = floorLattice(cd.Floor)
	r.aLat, r.cLat = r.latticeCounts()
	r.w = make([]float64, len(r.aLat))
	for j := range r.w {
		r.w[j] = r.tb.pValue(cd.BAccept, r.cLat[j])
	}
	return r, nil
}

// latticeCounts are aLat and cLat for the rule's lattice.
func (r *claimRule) latticeCounts() (aLat, cLat []int64) {
	n := len(r.lat) - 1
	aLat, cLat = make([]int64, n), make([]int64, n)
	for j := 0; j < n; j++ {
		aLat[j] = ratioBadCount(r.lat[j+1], r.Ceiling)
		cLat[j] = r.nb - r.lat[j] + 1
	}
	return aLat, cLat
}

// floorLattice cuts the denominator parts below the floor, 0 … b₀ − 1,
// into intervals [L_{j+1}, L_j − 1] with L_0 = b₀ > L_1 > … > L_J = 0:
// single values for the six nearest the floor, then widths growing by a
// fifth, so that a few dozen intervals cover any b₀ (46 for b₀ = 10⁴, 96
// for 10⁸). The lattice depends on b₀ alone and is fixed with it before
// labeling.
func floorLattice(b0 int64) []int64 {
	L := []int64{b0}
	for d := int64(1); b0-d > 0; d = max(d+1, int64(math.Ceil(1.2*float64(d)))) {
		L = append(L, b0-d)
	}
	return append(L, 0)
}

// size is the most the ratio's acceptance region with numerator
// acceptance number c can accept a population at or above the ceiling
// (see ClaimDesign.Judge): max(p_a(c, a*(b₀)), max_j p_a(c, aLat[j])·w[j]).
func (r *claimRule) size(c int) float64 {
	s := r.ta.pValue(c, r.aStar)
	for j, a := range r.aLat {
		if r.w[j] > 0 {
			s = math.Max(s, r.ta.pValue(c, a)*r.w[j])
		}
	}
	return s
}

// acceptA is the ratio's numerator acceptance number at level α: the
// largest c with size(c) ≤ α, −1 when none (size grows with c).
func (r *claimRule) acceptA(alpha float64) int {
	lo, hi := -1, r.ta.size+1 // size(lo) ≤ α (or −1); size(hi) > α (virtual)
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if r.size(mid) <= alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
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
// b ≥ 1 (0 for b = 0, where every A counts as at or above the ceiling),
// the fewest events A that put the ratio A/(A + b) at or above the
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
	if r.tb == nil {
		return r.ta.acceptAt(r.aStar, alpha, 0), 0
	}
	if r.unacceptable {
		return -1, -1
	}
	return r.acceptA(alpha), r.BAccept
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

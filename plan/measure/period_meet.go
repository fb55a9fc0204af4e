package measure

import (
	"fmt"
	"math"
)

// meetOnStrata is the claim designed on the cells, d, carried to the
// period's strata: each side counts its cells' sub-sample of ma (and mb)
// items spread proportionally over the side's strata (ProportionalCounts),
// with d's floor and c_B. Its exact power at the anticipated composition
// is computed; when it is below the target the claim counts more.
//
// The sizes are searched exactly: among the sub-samples m'_a ≥ ma of the
// numerator's side (and, for a ratio, m'_b ≥ mb of the denominator's),
// the pair that adds the fewest labels to the sample (sub-samples within
// it cost none) and reaches the target at its most powerful c_B. Every
// pair is considered in the box m'_a ≤ 2·ma + 100, m'_b ≤ 2·mb + 100
// (within the sides' sizes), in order of the labels it adds, except those
// a bound rules out: a pair adding at least the best labels found so far,
// or an m'_a whose numerator test alone, as if the denominator's side
// were certain to pass, is below the target (the numerator's acceptance
// number is never above the one at the floor alone, a*(b₀), see
// ClaimDesign.Judge). c_B, for each pair, is climbed from its
// neighbour's to the nearest most powerful value. When no pair reaches
// the target, the most powerful design found is kept. It returns the
// design and its power.
func (pr Problem) meetOnStrata(d ClaimDesign, ma, mb int, sample []int, alpha, target float64) (ClaimDesign, float64, error) {
	a, b := d.sides(pr.Population)
	ratio := d.Measure.Ratio()
	at := func(ma, mb, cb int) ClaimDesign {
		out := ClaimDesign{Claim: d.Claim, Counted: ProportionalCounts(pr.Population, a.strata, ma), Floor: d.Floor, BAccept: cb}
		if ratio {
			proportional(pr.Population, b.strata, mb, out.Counted)
		}
		return out
	}
	var failed error
	power := func(cd ClaimDesign) float64 {
		p, err := cd.AcceptProbability(pr.Population, pr.Anticipated, alpha)
		if err != nil && failed == nil {
			failed = err
		}
		return p
	}
	start := at(ma, mb, d.BAccept)
	pw := power(start)
	if failed != nil || pw >= target {
		return start, pw, failed
	}
	best, bestPower := start, pw
	topA := min(int(a.population(pr.Population)), 2*ma+100)
	costA := make([]int, topA+1)
	for m := ma; m <= topA; m++ {
		costA[m] = marginal(sample, ProportionalCounts(pr.Population, a.strata, m))
	}
	if !ratio {
		// the labels added grow with m: the first m that reaches the
		// target is the cheapest
		for m := ma + 1; m <= topA && failed == nil; m++ {
			cd := at(m, 0, 0)
			if p := power(cd); p >= target {
				return cd, p, failed
			} else if p > bestPower {
				best, bestPower = cd, p
			}
		}
		return best, bestPower, failed
	}
	ev, err := newRatioPower(pr, d, alpha)
	if err != nil {
		return ClaimDesign{}, 0, err
	}
	topB := min(int(b.population(pr.Population)), 2*mb+100)
	minA := math.MaxInt
	for m := ma; m <= topA; m++ {
		if ev.boundA(m) >= target {
			minA = min(minA, costA[m])
		}
	}
	// most is the pair's most powerful c_B found by climbing from each of
	// the starts, and its power
	most := func(m1, m2 int, starts ...int) (int, float64) {
		bestCB, bestP := -1, -1.0
		for _, s := range starts {
			cb := min(max(s, 0), m2)
			p := ev.power(m1, m2, cb)
			for _, step := range []int{1, -1} {
				for c := cb + step; c >= 0 && c <= m2; c += step {
					q := ev.power(m1, m2, c)
					if q <= p {
						break
					}
					cb, p = c, q
				}
			}
			if p > bestP {
				bestCB, bestP = cb, p
			}
		}
		return bestCB, bestP
	}
	bestCost := math.MaxInt
	found := false
	var fm1, fm2, fcb int
	bm1, bm2, bcb, bp := ma, mb, d.BAccept, -1.0
	rowCB := d.BAccept
	for m2 := mb; m2 <= topB && minA < math.MaxInt; m2++ {
		cB := marginal(sample, ProportionalCounts(pr.Population, b.strata, m2))
		if cB+minA >= bestCost {
			break // the labels added grow with m'_b
		}
		cb, first := rowCB, true
		for m1 := ma; m1 <= topA; m1++ {
			if cB+costA[m1] >= bestCost {
				break
			}
			if ev.boundA(m1) < target {
				continue
			}
			var p float64
			cb, p = most(m1, m2, cb, d.BAccept)
			if first {
				rowCB, first = cb, false
			}
			if p > bp {
				bm1, bm2, bcb, bp = m1, m2, cb, p
			}
			if p >= target {
				bestCost, found = cB+costA[m1], true
				fm1, fm2, fcb = m1, m2, cb
				break
			}
		}
	}
	if ev.err != nil {
		return ClaimDesign{}, 0, ev.err
	}
	if !found {
		if bp < 0 {
			// no m'_a can reach the target: the most powerful found along
			// the numerator's side at the design's c_B
			for m := ma + 1; m <= topA; m++ {
				if p := ev.power(m, mb, d.BAccept); p > bp {
					bm1, bm2, bcb, bp = m, mb, d.BAccept, p
				}
			}
		}
		fm1, fm2, fcb = bm1, bm2, bcb
	}
	// the power reported is AcceptProbability's, the one home of the
	// claim's law (ratioPower is its arithmetic, cached for the search)
	cd := at(fm1, fm2, fcb)
	if pw := power(cd); failed == nil && pw > bestPower {
		return cd, pw, nil
	}
	return best, bestPower, failed
}

// ratioPower is the exact power of a ratio claim at the anticipated
// composition for sub-samples m_a, m_b of its sides and a c_B — the
// arithmetic of ClaimDesign.AcceptProbability, with each side's tallies,
// tails and laws cached across the pairs of meetOnStrata's search.
type ratioPower struct {
	pr         Problem
	d          ClaimDesign
	a, b       side
	alpha      float64
	aStar      int64
	aLat, cLat []int64
	evA, evB   []int64
	sideA      map[int]*numerSide
	sideB      map[int]*denomSide
	err        error
}

// numerSide is the numerator's side at one sub-sample: its tally, the
// acceptance number at the floor alone (c₀), its tails p_a(c, D) at the
// lattice's counts (column 0 for a*(b₀)) for c ≤ c₀, filled as asked, and
// its law P(S_a ≤ c).
type numerSide struct {
	t   *tally
	c0  int
	pv  [][]float64 // pv[c][j], NaN until computed
	cum func(int) float64
}

// denomSide is the denominator's side at one sub-sample: its tally, its
// law P(S_b ≤ c) and the weights w_j(c_B) per c_B, filled as asked.
type denomSide struct {
	t   *tally
	cum func(int) float64
	w   map[int][]float64
}

func newRatioPower(pr Problem, d ClaimDesign, alpha float64) (*ratioPower, error) {
	p := pr.Population
	ev := &ratioPower{pr: pr, d: d, alpha: alpha, sideA: map[int]*numerSide{}, sideB: map[int]*denomSide{}}
	ev.a, ev.b = d.sides(p)
	nb := ev.b.population(p)
	if d.Floor < 1 || d.Floor > nb {
		return nil, fmt.Errorf("%w: %s has floor %d outside 1 … %d", ErrPopulation, d.name(p), d.Floor, nb)
	}
	r := &claimRule{ClaimDesign: d, nb: nb, lat: floorLattice(d.Floor)}
	ev.aLat, ev.cLat = r.latticeCounts()
	ev.aStar = ratioBadCount(d.Floor, d.Ceiling)
	ev.evA, ev.evB = ev.a.counts(p, pr.Anticipated), ev.b.counts(p, pr.Anticipated)
	return ev, nil
}

func (ev *ratioPower) numer(m int) *numerSide {
	if s, ok := ev.sideA[m]; ok {
		return s
	}
	t, err := sideTally(ev.pr.Population, ev.a, ProportionalCounts(ev.pr.Population, ev.a.strata, m))
	if err != nil {
		ev.err = err
		t, _ = newTally([]int64{1}, []int{0})
	}
	s := &numerSide{t: t, c0: t.acceptAt(ev.aStar, ev.alpha, 0)}
	s.pv = make([][]float64, s.c0+1)
	for c := range s.pv {
		s.pv[c] = make([]float64, len(ev.aLat)+1)
		for j := range s.pv[c] {
			s.pv[c][j] = math.NaN()
		}
	}
	s.cum = t.cdfs(ev.evA, min(s.c0, t.size-1)) // cdfs wants top below the size for several strata
	ev.sideA[m] = s
	return s
}

func (ev *ratioPower) denom(m int) *denomSide {
	if s, ok := ev.sideB[m]; ok {
		return s
	}
	t, err := sideTally(ev.pr.Population, ev.b, ProportionalCounts(ev.pr.Population, ev.b.strata, m))
	if err != nil {
		ev.err = err
		t, _ = newTally([]int64{1}, []int{0})
	}
	s := &denomSide{t: t, cum: t.cdfs(ev.evB, max(t.size-1, 0)), w: map[int][]float64{}}
	ev.sideB[m] = s
	return s
}

// tail is p_a(c, D_j) at sub-sample m (j = 0: a*(b₀); j ≥ 1: aLat[j−1]).
func (ev *ratioPower) tail(s *numerSide, c, j int) float64 {
	if v := s.pv[c][j]; !math.IsNaN(v) {
		return v
	}
	D := ev.aStar
	if j > 0 {
		D = ev.aLat[j-1]
	}
	v := s.t.pValue(c, D)
	s.pv[c][j] = v
	return v
}

// boundA is P(S_a ≤ c₀) at sub-sample m: no pair with this m_a is more
// powerful (c_A ≤ c₀ whatever the other side).
func (ev *ratioPower) boundA(m int) float64 {
	s := ev.numer(m)
	return s.cum(s.c0)
}

// power is P(S_a ≤ c_A)·P(S_b ≤ c_B) with c_A the largest count whose
// size is at most α (claimRule.size and acceptA).
func (ev *ratioPower) power(ma, mb, cb int) float64 {
	A, B := ev.numer(ma), ev.denom(mb)
	if cb > B.t.size {
		return 0
	}
	w, ok := B.w[cb]
	if !ok {
		w = make([]float64, len(ev.cLat))
		for j, c := range ev.cLat {
			w[j] = B.t.pValue(cb, c)
		}
		B.w[cb] = w
	}
	size := func(c int) float64 {
		s := ev.tail(A, c, 0)
		for j := range ev.aLat {
			if w[j] > 0 {
				s = math.Max(s, ev.tail(A, c, j+1)*w[j])
			}
		}
		return s
	}
	lo, hi := -1, A.c0+1
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if size(mid) <= ev.alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return A.cum(lo) * B.cum(cb)
}

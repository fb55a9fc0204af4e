package measure

import (
	"errors"
	"fmt"
	"math"
	"math/bits"
	"sort"

	"probity/plan"
)

// Problem is what a plan must meet: the population (strata and
// candidates), the family of claims, what the plan anticipates, and the
// risks.
type Problem struct {
	Population
	// Claims is the family, in declared order (the testing order under
	// fixed-sequence).
	Claims []Claim
	// Anticipated is the composition the producer's risk is computed at.
	Anticipated Composition
	// Confidence is 1 − δ: every claim whose measure is at or above its
	// ceiling is accepted with probability at most δ family-wise.
	Confidence float64
	// Multiplicity shares δ over the claims (plan.Multiplicity; unset
	// sizes as Bonferroni, as the plan package does).
	Multiplicity plan.Multiplicity
	// ProducerRisk is β: each claim is rejected with probability at most
	// β when the population is as anticipated.
	ProducerRisk float64
	// MinPerStratum labels at least this many items in every stratum
	// (capped at N_h), so that every stratum's rate has labels.
	MinPerStratum int

	// family, when set, is the size of the family δ is shared over, when
	// the problem sizes only some of its claims (the others are judged
	// too, on what the design labels).
	family int
	// cache, when set, keeps each claim's curves across searches of the
	// same population and composition.
	cache map[cacheKey]*claimPlan
}

// cacheKey names a claim's curves: they depend on the claim and its level
// alone once the population and the composition are fixed.
type cacheKey struct {
	Claim
	alpha float64
}

// Design is a labeled sample and how each claim is judged on it.
type Design struct {
	// Sample[h] is n_h, the items of stratum h to label.
	Sample []int
	// Total is Σ n_h.
	Total int
	// Level is α, the per-claim risk the design is sized at.
	Level float64
	// Claims are the claims' designs in the problem's order, each with its
	// exact producer's risk.
	Claims []PlannedClaim
}

// PlannedClaim is a claim's design with its exact risk of rejection at
// the anticipated composition.
type PlannedClaim struct {
	ClaimDesign
	ProducerRisk float64
}

// Plan is the result of Search.
type Plan struct {
	// Design is the smallest design that meets every claim.
	Design Design
	// Uniform is the smallest sample allocated in proportion to the strata
	// (what a simple random sample of the log amounts to) that meets every
	// claim by the same rules; Design is never larger.
	Uniform Design
	// Saving is Uniform.Total / Design.Total.
	Saving float64
}

// ErrInfeasible is wrapped when no design meets a claim: its anticipated
// value is not below the ceiling, or even labeling every decision of its
// strata cannot meet the producer's risk.
var ErrInfeasible = errors.New("no design meets the claim")

// floorMargins are the planned floors of a ratio as shares below the
// anticipated denominator part: b₀ = ⌊(1 − q)·B₀⌋. The search takes the
// best of them for each design.
var floorMargins = []float64{0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.4}

// intersectionUnion restricts the ratios' denominator side to the plain
// intersection–union test at the floor (acceptance number at level α, not
// calibrated to the numerator): a hook for the tests that measure what
// the calibration buys.
var intersectionUnion = false

// Validate checks the problem's inputs.
func (pr Problem) Validate() error {
	if err := pr.Population.Validate(); err != nil {
		return err
	}
	if len(pr.Claims) == 0 {
		return fmt.Errorf("%w: no claims", ErrPopulation)
	}
	for _, c := range pr.Claims {
		if err := pr.checkClaim(c); err != nil {
			return err
		}
	}
	if err := pr.Anticipated.Validate(pr.Population); err != nil {
		return err
	}
	if !(pr.Confidence > 0 && pr.Confidence < 1) {
		return fmt.Errorf("%w: confidence %v is not between 0 and 1", ErrPopulation, pr.Confidence)
	}
	if !(pr.ProducerRisk > 0 && pr.ProducerRisk < 1) {
		return fmt.Errorf("%w: producer's risk %v is not between 0 and 1", ErrPopulation, pr.ProducerRisk)
	}
	if pr.MinPerStratum < 0 {
		return fmt.Errorf("%w: minimum %d per stratum", ErrPopulation, pr.MinPerStratum)
	}
	return nil
}

// Level is α, each claim's share of the family-wise risk δ = 1 −
// Confidence under the multiplicity rule.
func (pr Problem) Level() float64 {
	k := len(pr.Claims)
	if pr.family > 0 {
		k = pr.family
	}
	return pr.Multiplicity.PerCandidateRisk(1-pr.Confidence, k)
}

// claimPlan is the search's view of one claim: its sides, its curves and
// its frontier.
type claimPlan struct {
	Claim
	a, b side
	// proportion: one curve; ratio: per floor, the numerator's curve
	// and, per record of it, the denominator side's calibrated curve
	curve  *curve
	floors []int64
	ca     []*curve
	cb     []map[int]*curve
	alpha  float64
	eb     []int64 // anticipated complement events of the b side
	// points are the frontier: counted vectors (over all strata) that meet
	// the producer's risk, none dominated by another given the base.
	points []point
}

// point is one way of meeting a claim: its counted items per stratum and
// (ratios) its floor and denominator acceptance number.
type point struct {
	counted []int
	floor   int64
	bAccept int
	power   float64
}

// Search finds the smallest total number of labels, and their allocation
// over the strata, such that every claim keeps its consumer's risk (by
// construction of its test, at the level the multiplicity rule gives it)
// and its producer's risk (computed exactly at the anticipated
// composition), and the smallest proportional allocation that does the
// same.
//
// The designs searched: each claim counts, on each of its sides, a
// sub-sample proportional to the sizes of the side's strata
// (ProportionalCounts; for a side of one stratum, any number of its
// items), and a ratio takes its floor from a fixed list of margins below
// the anticipated denominator part. A stratum's labels are the most any
// claim counts there. Over these designs the search is exact: each side's
// power is scanned over every sub-sample size (curve), a proportion's
// requirement is its first sub-sample reaching 1 − β, a ratio's are the
// pairs whose powers multiply to at least 1 − β (its frontier), and the
// ratios' choices are combined by branch and bound over their frontiers.
// With strata of one stratum per side — a label-column candidate's
// predicted classes — every allocation is a design of this kind.
func Search(pr Problem) (*Plan, error) {
	if err := pr.Validate(); err != nil {
		return nil, err
	}
	alpha := pr.Level()
	target := 1 - pr.ProducerRisk
	H := len(pr.Strata)
	base := make([]int, H)
	for h, s := range pr.Strata {
		base[h] = int(min(int64(pr.MinPerStratum), s.Population))
	}
	plans := make([]*claimPlan, len(pr.Claims))
	var ratios []*claimPlan
	for i, c := range pr.Claims {
		cp, err := pr.claimPlan(c, alpha)
		if err != nil {
			return nil, err
		}
		plans[i] = cp
		if cp.curve != nil {
			r, ok := cp.curve.first(target, int(cp.curve.scan.total))
			if !ok {
				return nil, cp.infeasible(pr, "even labeling every decision of its strata")
			}
			k := ProportionalCounts(pr.Population, cp.a.strata, r.m)
			cp.points = []point{{counted: k, power: r.power}}
			raise(base, k)
		} else {
			ratios = append(ratios, cp)
		}
	}
	// An incumbent: each ratio with its numerator at power √(1 − β) and
	// the denominator side's first record completing it, given the base.
	// Its total bounds every sub-sample an optimal design can count. The
	// floors are tried in the order their numerators reach √(1 − β) at the
	// probes m = 64·2^i, and each is scanned only as far as could still
	// beat the best point so far (a point counting m items on a side adds
	// at least m − Σ cur labels): a floor whose numerator barely reaches
	// the power would otherwise be scanned to the end of its side.
	cur := append([]int(nil), base...)
	half := math.Sqrt(target)
	for _, cp := range ratios {
		best, bestCost := point{}, math.MaxInt
		for _, f := range cp.floorOrder(half) {
			limit := int(cp.ca[f].scan.total)
			if bestCost < math.MaxInt {
				limit = min(limit, bestCost+sum(cur))
			}
			ra, okA := cp.ca[f].first(half, limit)
			if !okA {
				continue
			}
			cb := cp.bCurve(pr.Population, f, ra)
			limitB := int(cb.scan.total)
			if bestCost < math.MaxInt {
				limitB = min(limitB, bestCost+sum(cur))
			}
			rb, okB := cb.first(target/ra.power, limitB)
			if !okB {
				continue
			}
			pt := cp.point(pr.Population, f, ra, rb)
			if c := marginal(cur, pt.counted); c < bestCost {
				best, bestCost = pt, c
			}
		}
		if best.counted == nil {
			return nil, cp.infeasible(pr, "at any of its planned floors")
		}
		raise(cur, best.counted)
	}
	limit := sum(cur)
	for _, cp := range ratios {
		cp.frontier(pr.Population, target, limit, base)
		if len(cp.points) == 0 {
			return nil, cp.infeasible(pr, "within the search's bound") // cannot happen: the incumbent's point is on it
		}
	}
	sample := combine(base, ratios, limit)
	design := pr.design(plans, sample, alpha, target)
	uniform, err := pr.uniform(plans, alpha, target)
	if err != nil {
		return nil, err
	}
	if uniform.Total < design.Total { // cannot happen over an exact search; kept as the brief's guarantee
		design = uniform
	}
	return &Plan{Design: design, Uniform: uniform, Saving: float64(uniform.Total) / float64(design.Total)}, nil
}

// claimPlan is the claim's curves, from the problem's cache when it has
// one (curves extend as a search asks; what was scanned stays valid).
func (pr Problem) claimPlan(c Claim, alpha float64) (*claimPlan, error) {
	if pr.cache == nil {
		return newClaimPlan(pr, c, alpha)
	}
	k := cacheKey{c, alpha}
	if cp, ok := pr.cache[k]; ok {
		return cp, nil
	}
	cp, err := newClaimPlan(pr, c, alpha)
	if err != nil {
		return nil, err
	}
	pr.cache[k] = cp
	return cp, nil
}

// newClaimPlan sets up a claim's curves.
func newClaimPlan(pr Problem, c Claim, alpha float64) (*claimPlan, error) {
	cp := &claimPlan{Claim: c}
	cp.a, cp.b = c.sides(pr.Population)
	if len(cp.a.strata) == 0 || (c.Measure.Ratio() && len(cp.b.strata) == 0) {
		return nil, fmt.Errorf("%w: %s: the candidate predicts one side only, so the measure has no strata", ErrInfeasible, c.name(pr.Population))
	}
	ea := cp.a.counts(pr.Population, pr.Anticipated)
	var A int64
	for _, e := range ea {
		A += e
	}
	Na := cp.a.population(pr.Population)
	if !c.Measure.Ratio() {
		D := plan.BadLotErrors(Na, c.Ceiling)
		if A >= D {
			return nil, fmt.Errorf("%w: %s is anticipated at %.4g, not below its ceiling %v", ErrInfeasible, c.name(pr.Population), float64(A)/float64(Na), c.Ceiling)
		}
		cp.curve = newSideScan(pr.Population, cp.a, ea).curve(test{D, alpha})
		return cp, nil
	}
	ec := cp.b.counts(pr.Population, pr.Anticipated)
	Nb := cp.b.population(pr.Population)
	B := Nb
	for _, e := range ec {
		B -= e
	}
	if B < 1 || A >= ratioBadCount(B, c.Ceiling) {
		v := 1.0
		if A+B > 0 {
			v = float64(A) / float64(A+B)
		}
		return nil, fmt.Errorf("%w: %s is anticipated at %.4g, not below its ceiling %v", ErrInfeasible, c.name(pr.Population), v, c.Ceiling)
	}
	cp.alpha, cp.eb = alpha, ec
	sa := newSideScan(pr.Population, cp.a, ea)
	seen := map[int64]bool{}
	for _, q := range floorMargins {
		b0 := int64(math.Floor((1 - q) * float64(B)))
		if b0 < 1 || seen[b0] || A >= ratioBadCount(b0, c.Ceiling) {
			continue // a floor at which the anticipated A already fails
		}
		seen[b0] = true
		cp.floors = append(cp.floors, b0)
		cp.ca = append(cp.ca, sa.curve(test{ratioBadCount(b0, c.Ceiling), alpha}))
		cp.cb = append(cp.cb, map[int]*curve{})
		if len(cp.a.strata) == 1 {
			sa = newSideScan(pr.Population, cp.a, ea)
		}
	}
	if len(cp.floors) == 0 {
		return nil, fmt.Errorf("%w: %s is anticipated too close to its ceiling %v for any planned floor", ErrInfeasible, c.name(pr.Population), c.Ceiling)
	}
	return cp, nil
}

func (cp *claimPlan) infeasible(pr Problem, why string) error {
	return fmt.Errorf("%w: %s cannot reach a producer's risk of %v %s", ErrInfeasible, cp.name(pr.Population), pr.ProducerRisk, why)
}

// floorOrder lists the ratio's floors by the first probe m = 64·2^i at
// which the numerator's power reaches the target (floors that reach it at
// no probe last, in their own order).
func (cp *claimPlan) floorOrder(target float64) []int {
	at := make([]int, len(cp.floors))
	order := make([]int, len(cp.floors))
	for f, ca := range cp.ca {
		order[f], at[f] = f, math.MaxInt
		total := int(ca.scan.total)
		for probe := 64; ; probe *= 2 {
			probe = min(probe, total)
			if ca.probe(probe) >= target {
				at[f] = probe
				break
			}
			if probe == total {
				break
			}
		}
	}
	sort.SliceStable(order, func(i, j int) bool { return at[order[i]] < at[order[j]] })
	return order
}

// point is the frontier point of floor f with records ra (numerator
// side) and rb (the denominator side's calibrated curve for ra).
func (cp *claimPlan) point(p Population, f int, ra, rb rec) point {
	k := make([]int, len(p.Strata))
	proportional(p, cp.a.strata, ra.m, k)
	proportional(p, cp.b.strata, rb.m, k)
	return point{counted: k, floor: cp.floors[f], bAccept: rb.c, power: ra.power * rb.power}
}

// bCurve is the denominator side's curve for the numerator record ra at
// floor f: its acceptance number c_B at each sub-sample size is the
// largest that keeps the ratio's size within α with ra's acceptance
// number c_A — for every interval j of the floor's lattice, p_b(c_B,
// N_b − L_j + 1) ≤ α/p_a(c_A, a*(L_{j+1})) (see ClaimDesign.Judge; the
// intervals whose numerator tail is at most α constrain nothing). Curves
// are kept per record.
func (cp *claimPlan) bCurve(p Population, f int, ra rec) *curve {
	if cv, ok := cp.cb[f][ra.m]; ok {
		return cv
	}
	r := &claimRule{ClaimDesign: ClaimDesign{Claim: cp.Claim, Floor: cp.floors[f]}, nb: cp.b.population(p)}
	r.lat = floorLattice(r.Floor)
	aLat, cLat := r.latticeCounts()
	ta := cp.ca[f].scan.tallyAt(ra.m)
	var tests []test
	for j := range aLat {
		if pa := ta.pValue(ra.c, aLat[j]); pa > cp.alpha {
			tests = append(tests, test{cLat[j], cp.alpha / pa})
		}
	}
	if intersectionUnion {
		tests = []test{{r.nb - r.Floor + 1, cp.alpha}}
	}
	cv := newSideScan(p, cp.b, cp.eb).curve(tests...)
	cp.cb[f][ra.m] = cv
	return cv
}

// frontier lists the ratio's minimal ways to meet the producer's risk
// within a total of limit labels: for each floor and each record of the
// numerator's curve, the first record of the denominator side's
// calibrated curve whose power makes the product reach the target. The
// numerator's records of every floor are taken by increasing size, and
// each denominator curve is scanned only below the smallest denominator
// sub-sample found so far: a point needing as much on both sides as an
// earlier one is dominated. Points dominated given the base (every stratum
// at least as large once the base is applied) are dropped as well.
func (cp *claimPlan) frontier(p Population, target float64, limit int, base []int) {
	type cand struct {
		f  int
		ra rec
	}
	var cands []cand
	for f, ca := range cp.ca {
		ca.extend(limit)
		for _, ra := range ca.recs {
			if ra.m <= limit && ra.power >= target {
				cands = append(cands, cand{f, ra})
			}
		}
	}
	sort.SliceStable(cands, func(i, j int) bool { return cands[i].ra.m < cands[j].ra.m })
	var pts []point
	bestB := limit + 1 // the smallest denominator sub-sample so far
	for _, c := range cands {
		top := min(bestB-1, limit-c.ra.m)
		if top < 0 {
			continue
		}
		if rb, ok := cp.bCurve(p, c.f, c.ra).first(target/c.ra.power, top); ok {
			pts = append(pts, cp.point(p, c.f, c.ra, rb))
			bestB = rb.m
		}
	}
	cp.points = pareto(pts, base)
}

// pareto keeps the points whose effective vectors max(base, counted) no
// other point beats or equals everywhere (ties keep the first).
func pareto(pts []point, base []int) []point {
	eff := make([][]int, len(pts))
	cost := make([]int, len(pts))
	for i, pt := range pts {
		eff[i] = make([]int, len(base))
		for h := range base {
			eff[i][h] = max(base[h], pt.counted[h])
		}
		cost[i] = sum(eff[i])
	}
	order := make([]int, len(pts))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(x, y int) bool { return cost[order[x]] < cost[order[y]] })
	var kept []int
	for _, i := range order {
		dominated := false
		for _, j := range kept {
			if leq(eff[j], eff[i]) {
				dominated = true
				break
			}
		}
		if !dominated {
			kept = append(kept, i)
		}
	}
	out := make([]point, len(kept))
	for x, i := range kept {
		out[x] = pts[i]
	}
	return out
}

func leq(a, b []int) bool {
	for h := range a {
		if a[h] > b[h] {
			return false
		}
	}
	return true
}

func sum(v []int) int {
	s := 0
	for _, x := range v {
		s += x
	}
	return s
}

// raise sets cur[h] = max(cur[h], k[h]).
func raise(cur, k []int) {
	for h := range cur {
		cur[h] = max(cur[h], k[h])
	}
}

// marginal is Σ_h max(cur_h, k_h) − Σ_h cur_h, the labels k adds to cur.
func marginal(cur, k []int) int {
	m := 0
	for h := range cur {
		if k[h] > cur[h] {
			m += k[h] - cur[h]
		}
	}
	return m
}

// combine chooses one frontier point per ratio so that the labels,
// Σ_h max(base_h, the points' counted items), are fewest: a depth-first
// branch and bound, most demanding ratio first, pruned by the current
// labels plus the largest of the remaining ratios' cheapest additions (a
// lower bound: each of them must still be met). limit is a known total.
func combine(base []int, ratios []*claimPlan, limit int) []int {
	if len(ratios) == 0 {
		return append([]int(nil), base...)
	}
	order := append([]*claimPlan(nil), ratios...)
	minCost := func(cp *claimPlan, cur []int) int {
		best := math.MaxInt
		for _, pt := range cp.points {
			best = min(best, marginal(cur, pt.counted))
		}
		return best
	}
	sort.SliceStable(order, func(i, j int) bool { return minCost(order[i], base) > minCost(order[j], base) })
	for _, cp := range order {
		sort.SliceStable(cp.points, func(i, j int) bool {
			return marginal(base, cp.points[i].counted) < marginal(base, cp.points[j].counted)
		})
	}
	bestTotal := limit + 1
	var best []int
	var dfs func(depth int, cur []int, total int)
	dfs = func(depth int, cur []int, total int) {
		if depth == len(order) {
			if total < bestTotal {
				bestTotal, best = total, append([]int(nil), cur...)
			}
			return
		}
		lb := 0
		for _, cp := range order[depth:] {
			lb = max(lb, minCost(cp, cur))
		}
		if total+lb >= bestTotal {
			return
		}
		next := make([]int, len(cur))
		for _, pt := range order[depth].points {
			add := marginal(cur, pt.counted)
			if total+add >= bestTotal {
				continue
			}
			for h := range cur {
				next[h] = max(cur[h], pt.counted[h])
			}
			dfs(depth+1, next, total+add)
		}
	}
	dfs(0, append([]int(nil), base...), sum(base))
	return best
}

// maxProportional is the largest m such that ProportionalCounts(strata, m)
// fits within n: min over the strata of ⌊n_h·N_G/N_h⌋, at most N_G.
func maxProportional(p Population, strata []int, n []int) int {
	var NG uint64
	for _, h := range strata {
		NG += uint64(p.Strata[h].Population)
	}
	m := NG
	for _, h := range strata {
		hi, lo := bits.Mul64(uint64(n[h]), NG)
		q, _ := bits.Div64(hi, lo, uint64(p.Strata[h].Population)) // n_h ≤ N_h keeps hi < N_h
		m = min(m, q)
	}
	return int(m)
}

// design fixes how each claim is judged on the labeled sample: the most
// powerful sub-samples that fit among those the search has scanned (the
// best record of each curve; for a ratio, the best product over floors and
// records), so that labels bought for one claim serve the others.
func (pr Problem) design(plans []*claimPlan, sample []int, alpha, target float64) Design {
	d := Design{Sample: sample, Total: sum(sample), Level: alpha}
	for _, cp := range plans {
		pc := PlannedClaim{ClaimDesign: ClaimDesign{Claim: cp.Claim}}
		if cp.curve != nil {
			// the best sub-sample that fits, among those already scanned
			r := cp.curve.best(min(maxProportional(pr.Population, cp.a.strata, sample), cp.curve.scanned()))
			pc.Counted = ProportionalCounts(pr.Population, cp.a.strata, r.m)
			pc.ProducerRisk = 1 - r.power
		} else {
			pt, ok := cp.bestWithin(pr.Population, sample, 2)
			if !ok || pt.power < target {
				pt, _ = cp.bestWithin(pr.Population, sample, target)
			}
			pc.Counted, pc.Floor, pc.BAccept, pc.ProducerRisk = pt.counted, pt.floor, pt.bAccept, 1-pt.power
		}
		d.Claims = append(d.Claims, pc)
	}
	return d
}

// meets reports whether every claim reaches the target power with the
// sub-samples that fit in the sample.
func (pr Problem) meets(plans []*claimPlan, sample []int, target float64) bool {
	// proportions first: they cost a lookup
	for _, cp := range plans {
		if cp.curve != nil && cp.curve.best(maxProportional(pr.Population, cp.a.strata, sample)).power < target {
			return false
		}
	}
	for _, cp := range plans {
		if cp.curve != nil || cp.fits(sample) {
			continue
		}
		if pt, ok := cp.bestWithin(pr.Population, sample, target); !ok || pt.power < target {
			return false
		}
	}
	return true
}

// fits reports whether one of the ratio's frontier points fits in the
// sample (a frontier point meets the target).
func (cp *claimPlan) fits(sample []int) bool {
	for _, pt := range cp.points {
		if leq(pt.counted, sample) {
			return true
		}
	}
	return false
}

// bestWithin is the ratio's most powerful design whose counted items fit
// in the sample, over the floors and the numerator's records that fit and
// the denominator side's records that fit. With enough ≤ 1 it answers
// whether some design reaches enough, and stops at the first that does
// (scanning a denominator curve only as far as that needs); otherwise it
// looks only at what the curves have already scanned, so that fixing the
// counted items of a design costs no new scan. The numerator's records are
// tried from the most powerful down, and one whose own power does not beat
// the best product so far ends the floor (the product cannot exceed it).
func (cp *claimPlan) bestWithin(p Population, sample []int, enough float64) (point, bool) {
	ma := maxProportional(p, cp.a.strata, sample)
	mb := maxProportional(p, cp.b.strata, sample)
	search := enough <= 1
	best, found := point{power: -1}, false
	for f := range cp.floors {
		ca := cp.ca[f]
		if search {
			ca.extend(ma)
		}
		for i := len(ca.recs) - 1; i >= 0; i-- {
			ra := ca.recs[i]
			if ra.m > ma {
				continue
			}
			if ra.power <= best.power || search && ra.power < enough {
				break // every earlier record is less powerful still
			}
			var rb rec
			if search {
				r, ok := cp.bCurve(p, f, ra).first(enough/ra.power, mb)
				if !ok {
					continue
				}
				rb = r
			} else {
				cv, ok := cp.cb[f][ra.m]
				if !ok {
					continue
				}
				rb = cv.best(min(mb, cv.scanned()))
			}
			if pw := ra.power * rb.power; pw > best.power {
				best, found = cp.point(p, f, ra, rb), true
				if search && best.power >= enough {
					return best, true
				}
			}
		}
	}
	return best, found
}

// uniform is the smallest proportional allocation n_h = ⌈n·N_h/N⌉ (and the
// minimum per stratum) that meets every claim: meeting is monotone in n
// (each stratum's labels grow with n, and a claim keeps its sub-sample),
// so n is found by doubling and bisection.
func (pr Problem) uniform(plans []*claimPlan, alpha, target float64) (Design, error) {
	all := make([]int, len(pr.Strata))
	var N int64
	for h, s := range pr.Strata {
		all[h] = h
		N += s.Population
	}
	alloc := func(n int) []int {
		v := ProportionalCounts(pr.Population, all, n)
		for h, s := range pr.Strata {
			v[h] = max(v[h], int(min(int64(pr.MinPerStratum), s.Population)))
		}
		return v
	}
	lo, hi := 0, 1
	for !pr.meets(plans, alloc(hi), target) {
		if int64(hi) >= N {
			return Design{}, fmt.Errorf("%w: even a census of the log does not meet every claim", ErrInfeasible)
		}
		lo, hi = hi, int(min(2*int64(hi), N))
	}
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if pr.meets(plans, alloc(mid), target) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return pr.design(plans, alloc(hi), alpha, target), nil
}

package measure

import (
	"errors"
	"slices"
	"sort"

	"probity/plan"
)

// PeriodDesign is a plan's design on a period's actual strata: the labels
// per stratum and how every claim is judged on them. draw allocates by
// Sample; record, verify and progress judge by Claims. It is a function
// of the plan and the strata alone (PeriodProblem, Search), so every
// command rebuilds the same design from the manifest.
type PeriodDesign struct {
	Problem Problem
	// Sample[h] is n_h.
	Sample []int
	// Claims are the claims' designs in the plan's order.
	Claims []ClaimDesign
	// Unplanned lists the claims (indices) whose anticipated value on the
	// period's strata is not below the ceiling: the design is not sized
	// for them (no sample could give them the planned producer's risk);
	// each still counts every item the design labels on its sides, with
	// its consumer's risk kept by construction.
	Unplanned []int
	// Uniform is the labels a proportional sample would need for the
	// planned claims (searched on the cells, split as the design is);
	// UniformSample its allocation.
	Uniform       int
	UniformSample []int
	// Level is α, each claim's share of the family's risk.
	Level float64
	// ProducerRisk[i] is claim i's exact chance of rejection at the
	// anticipated composition, with the counted items of Claims[i].
	ProducerRisk []float64
}

// Value is a claim's value at a composition of binary labels (Wrong nil).
func (c Claim) Value(p Population, comp Composition) float64 {
	var tp, fp, fn, tn float64
	for h, s := range p.Strata {
		pos, neg := float64(comp.Positives[h]), float64(s.Population-comp.Positives[h])
		if p.Candidates[c.Candidate].Positive[h] {
			tp, fp = tp+pos, fp+neg
		} else {
			fn, tn = fn+pos, tn+neg
		}
	}
	return countsMatrix{tp, fp, fn, tn}.value(c.Measure)
}

// countsMatrix is a one-vs-rest confusion matrix in counts.
type countsMatrix struct{ tp, fp, fn, tn float64 }

// value is the measure's value on the matrix (0 for an empty denominator).
func (c countsMatrix) value(m Measure) float64 {
	r := func(x, y float64) float64 {
		if x+y == 0 {
			return 0
		}
		return x / (x + y)
	}
	switch m {
	case Error:
		return (c.fp + c.fn) / (c.tp + c.fp + c.fn + c.tn)
	case FNR:
		return r(c.fn, c.tp)
	case FPR:
		return r(c.fp, c.tn)
	case FOR:
		return r(c.fn, c.tn)
	case FDR:
		return r(c.fp, c.tp)
	}
	return 0
}

// NewPeriodDesign sizes the plan's design on a period's strata (see
// PeriodProblem): the design is searched on the prediction cells — the
// strata merged where every candidate predicts alike (Coarsen) — and each
// cell's labels are split over its strata in proportion to their sizes,
// rounding up (ProportionalCounts); each claim counts on each side the
// sub-sample it counted on the cells, spread the same way.
//
// Why that keeps every claim's risk: a claim's test keeps its consumer's
// risk for any counted items fixed before labeling (the count rule of
// plan/stratified and the ratio's product bound hold for every
// allocation), so only its power changes. That is computed again,
// exactly, on the period's strata (ClaimDesign.AcceptProbability at the
// anticipated composition); a claim that misses the producer's risk
// counts more of its numerator's side — first the labels the others
// already drew, then the fewest more — until it meets it.
//
// Claims the period's anticipated composition puts at or above their
// ceiling, or that no design meets alone, are left out of the search and
// judged on what the design labels (Unplanned).
func NewPeriodDesign(f *plan.File, strata []Stratum, flagged [][]bool) (*PeriodDesign, error) {
	pr, err := PeriodProblem(f, strata, flagged)
	if err != nil {
		return nil, err
	}
	cellPop, cellComp, cellOf, err := Coarsen(pr.Population, pr.Anticipated)
	if err != nil {
		return nil, err
	}
	cells := pr
	cells.Population, cells.Anticipated = cellPop, cellComp
	cells.cache = map[cacheKey]*claimPlan{}
	cd, err := designOnCells(cells)
	if err != nil {
		return nil, err
	}
	pd := &PeriodDesign{Problem: pr, Unplanned: cd.unplanned, Level: cells.Level()}
	members := make([][]int, len(cellPop.Strata))
	for h, c := range cellOf {
		members[c] = append(members[c], h)
	}
	pd.Sample = splitCells(pr.Population, members, cd.sample, pr.MinPerStratum)
	pd.UniformSample = splitCells(pr.Population, members, cd.uniform, pr.MinPerStratum)
	if cd.uniform != nil {
		pd.Uniform = sum(pd.UniformSample)
	}
	pd.Claims = make([]ClaimDesign, len(pr.Claims))
	pd.ProducerRisk = make([]float64, len(pr.Claims))
	target := 1 - pr.ProducerRisk
	for i, c := range pr.Claims {
		if slices.Contains(pd.Unplanned, i) {
			continue
		}
		d := cd.claims[i]
		ac, bc := c.sides(cellPop)
		ma := maxProportional(cellPop, ac.strata, d.Counted)
		mb := 0
		if c.Measure.Ratio() {
			mb = maxProportional(cellPop, bc.strata, d.Counted)
		}
		cdf, power, err := pr.meetOnStrata(d, ma, mb, pd.Sample, pd.Level, target)
		if err != nil {
			return nil, err
		}
		raise(pd.Sample, cdf.Counted)
		pd.Claims[i], pd.ProducerRisk[i] = cdf, 1-power
	}
	for _, i := range pd.Unplanned {
		pd.Claims[i] = fallbackDesign(pr, pr.Claims[i], pd.Sample)
		power, err := pd.Claims[i].AcceptProbability(pr.Population, pr.Anticipated, pd.Level)
		if err != nil {
			return nil, err
		}
		pd.ProducerRisk[i] = 1 - power
	}
	return pd, nil
}

// cellDesign is a design searched on the prediction cells.
type cellDesign struct {
	sample    []int
	claims    []ClaimDesign // nil entries for the unplanned
	unplanned []int
	uniform   []int // nil when no claim is planned
}

// designOnCells searches the cells' design for the claims the anticipated
// composition puts below their ceiling; when no design meets them all,
// the claims no design meets alone are judged on what the others' design
// labels. The level stays the family's: the unplanned claims share δ.
// Each claim's curves are built once (the problem's cache), however many
// searches ask for them.
func designOnCells(cells Problem) (cellDesign, error) {
	all := cells.Claims
	cd := cellDesign{claims: make([]ClaimDesign, len(all)), sample: make([]int, len(cells.Strata))}
	for h, s := range cells.Strata {
		cd.sample[h] = int(min(int64(cells.MinPerStratum), s.Population))
	}
	var planned []int
	for i, c := range all {
		if c.Value(cells.Population, cells.Anticipated) >= c.Ceiling {
			cd.unplanned = append(cd.unplanned, i)
		} else {
			planned = append(planned, i)
		}
	}
	search := func(idx []int) (*Plan, error) {
		sub := cells
		sub.family = len(all)
		sub.Claims = nil
		for _, i := range idx {
			sub.Claims = append(sub.Claims, all[i])
		}
		return Search(sub)
	}
	if len(planned) == 0 {
		return cd, nil
	}
	res, err := search(planned)
	if errors.Is(err, ErrInfeasible) {
		var keep []int
		for _, i := range planned {
			if _, err := search([]int{i}); errors.Is(err, ErrInfeasible) {
				cd.unplanned = append(cd.unplanned, i)
			} else {
				keep = append(keep, i)
			}
		}
		sort.Ints(cd.unplanned)
		if planned = keep; len(planned) == 0 {
			return cd, nil
		}
		res, err = search(planned)
	}
	if err != nil {
		return cellDesign{}, err
	}
	cd.sample, cd.uniform = res.Design.Sample, res.Uniform.Sample
	for k, i := range planned {
		cd.claims[i] = res.Design.Claims[k].ClaimDesign
	}
	return cd, nil
}

// splitCells spreads each cell's labels over its strata in proportion to
// their sizes, rounding up (⌈n_c·N_h/N_c⌉, never above N_h), with at
// least min(minimum, N_h) in each; nil for nil.
func splitCells(p Population, members [][]int, cellSample []int, minimum int) []int {
	if cellSample == nil {
		return nil
	}
	out := make([]int, len(p.Strata))
	for c, hs := range members {
		proportional(p, hs, cellSample[c], out)
	}
	for h, s := range p.Strata {
		out[h] = max(out[h], int(min(int64(minimum), s.Population)))
	}
	return out
}

// fallbackDesign counts, on each side of the claim, the largest
// proportional sub-sample the labels allow; a ratio's floor is 80 % of
// the anticipated denominator part and its c_B the count expected there.
// Any fixed floor and c_B keep the claim's risk: c_A is calibrated to them
// (ClaimDesign.Judge).
func fallbackDesign(pr Problem, c Claim, sample []int) ClaimDesign {
	p := pr.Population
	a, b := c.sides(p)
	cd := ClaimDesign{Claim: c, Counted: make([]int, len(p.Strata))}
	fit := func(sd side) {
		if len(sd.strata) == 0 {
			return
		}
		total := int(sd.population(p))
		m := sort.Search(total+1, func(m int) bool {
			k := ProportionalCounts(p, sd.strata, m)
			for _, h := range sd.strata {
				if k[h] > sample[h] {
					return true
				}
			}
			return false
		}) - 1
		k := ProportionalCounts(p, sd.strata, max(m, 0))
		for _, h := range sd.strata {
			cd.Counted[h] = k[h]
		}
	}
	fit(a)
	if c.Measure.Ratio() {
		fit(b)
		var nb, comp int64
		for _, h := range b.strata {
			nb += p.Strata[h].Population
			comp += b.count(p, pr.Anticipated, h)
		}
		bPart := nb - comp
		cd.Floor = max(1, int64(0.8*float64(bPart)))
		var counted int
		for _, h := range b.strata {
			counted += cd.Counted[h]
		}
		if nb > 0 {
			cd.BAccept = int(float64(counted) * float64(nb-cd.Floor) / float64(nb))
		}
	}
	return cd
}

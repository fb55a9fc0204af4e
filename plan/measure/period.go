package measure

import (
	"errors"
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
	// planned claims; UniformSample its allocation.
	Uniform       int
	UniformSample []int
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
// PeriodProblem). Claims the period's anticipated composition puts at or
// above their ceiling are left out of the search and judged on what the
// design labels (Unplanned).
func NewPeriodDesign(f *plan.File, strata []Stratum, flagged [][]bool) (*PeriodDesign, error) {
	pr, err := PeriodProblem(f, strata, flagged)
	if err != nil {
		return nil, err
	}
	all := pr.Claims
	pd := &PeriodDesign{Problem: pr}
	var planned []Claim
	var idx []int
	for i, c := range all {
		if c.Value(pr.Population, pr.Anticipated) >= c.Ceiling {
			pd.Unplanned = append(pd.Unplanned, i)
			continue
		}
		planned = append(planned, c)
		idx = append(idx, i)
	}
	pd.Claims = make([]ClaimDesign, len(all))
	pd.Sample = make([]int, len(strata))
	for h, s := range strata {
		pd.Sample[h] = int(min(int64(pr.MinPerStratum), s.Population))
	}
	if len(planned) > 0 {
		sub := pr
		sub.Claims = planned
		// the level stays the family's: the unplanned claims are judged too
		res, err := searchAtFamily(sub, len(all))
		if errors.Is(err, ErrInfeasible) {
			// find the claims no design meets by themselves and judge
			// them on what the others' design labels
			var keep []Claim
			var keepIdx []int
			for k, c := range planned {
				if feasibleAlone(pr, c, len(all)) {
					keep, keepIdx = append(keep, c), append(keepIdx, idx[k])
				} else {
					pd.Unplanned = append(pd.Unplanned, idx[k])
				}
			}
			sort.Ints(pd.Unplanned)
			planned, idx = keep, keepIdx
			sub.Claims = planned
			if len(planned) == 0 {
				goto fallback
			}
			res, err = searchAtFamily(sub, len(all))
		}
		if err != nil {
			return nil, err
		}
		pd.Sample = res.Design.Sample
		for k, i := range idx {
			pd.Claims[i] = res.Design.Claims[k].ClaimDesign
		}
		pd.Uniform, pd.UniformSample = res.Uniform.Total, res.Uniform.Sample
	}
fallback:
	for _, i := range pd.Unplanned {
		pd.Claims[i] = fallbackDesign(pr, all[i], pd.Sample)
	}
	return pd, nil
}

// feasibleAlone reports whether some design meets the claim by itself at
// its share of the family's risk (a claim no design can meet on these
// strata is judged on what the others' design labels).
func feasibleAlone(pr Problem, c Claim, family int) bool {
	one := pr
	one.Claims = []Claim{c}
	_, err := searchAtFamily(one, family)
	return !errors.Is(err, ErrInfeasible)
}

// searchAtFamily is Search with each claim's level that of a family of
// the given size (the unplanned claims share δ too).
func searchAtFamily(pr Problem, family int) (*Plan, error) {
	if family == len(pr.Claims) {
		return Search(pr)
	}
	// pad the family with copies of the first claim, which cost nothing
	// more (a stratum's labels are the most any claim counts there), then
	// drop them
	padded := pr
	padded.Claims = append(append([]Claim(nil), pr.Claims...), make([]Claim, family-len(pr.Claims))...)
	for i := len(pr.Claims); i < family; i++ {
		padded.Claims[i] = pr.Claims[0]
	}
	res, err := Search(padded)
	if err != nil {
		return nil, err
	}
	res.Design.Claims = res.Design.Claims[:len(pr.Claims)]
	res.Uniform.Claims = res.Uniform.Claims[:len(pr.Claims)]
	return res, nil
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

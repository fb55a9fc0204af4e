package measure

import (
	"fmt"
	"math"
	"sort"

	"probity/plan"
)

// PeriodDesign is a plan's design on a period's actual strata: the labels
// per stratum and how every claim is judged on them. draw allocates by
// Sample; record, verify and progress judge by Claims. It is a function
// of the plan and the strata alone (NewPeriodDesign), so every command
// rebuilds the same design from the manifest.
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
	// Uniform is the labels of the plan's uniform comparison (the
	// smallest proportional sample meeting the same claims on the plan's
	// cells) allocated in proportion to the period's strata;
	// UniformSample its allocation.
	Uniform       int
	UniformSample []int
	// Level is α, each claim's share of the family's risk.
	Level float64
	// ProducerRisk[i] is claim i's exact chance of rejection at the
	// anticipated composition, with the counted items of Claims[i].
	ProducerRisk []float64
	// Departure, when set, is the cell of the log whose share of the
	// decisions departs most from what the plan assumed: the plan's
	// design was sized for other shares.
	Departure *Departure
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

// NewPeriodDesign carries the plan's design to a period's strata (see
// PeriodProblem): the draw keeps the plan. Each planned claim counts, on
// each of its sides, as many items as the plan's design counts on the
// side's cells (measures.claims[].design), now spread in proportion over
// the side's strata of the period (ProportionalCounts), with the plan's
// floor at the same share of the side's anticipated denominator part and
// the plan's c_B; a stratum's labels are the most any claim counts there.
// No design is searched again.
//
// Why that keeps every claim's risk: a claim's test keeps its consumer's
// risk for any counted items fixed before labeling (the count rule of
// plan/stratified and the ratio's product bound hold for every
// allocation), so only its power changes. That is computed again,
// exactly, on the period's strata (ClaimDesign.AcceptProbability at the
// anticipated composition); a claim that misses the producer's risk —
// the user's strata move a side from the hypergeometric test to the count
// rule, or the log's strata are not the sizes the plan assumed — counts
// more of its sides (meetOnStrata): first the labels the others already
// drew, then the fewest more.
//
// Claims the plan did not plan (anticipated at or above their ceiling),
// or that the period's anticipated composition puts at or above their
// ceiling, are judged on what the design labels (Unplanned). The uniform
// comparison is the plan's: its sample size allocated in proportion to
// the period's strata. Departure says where the log's cells differ from
// the shares the plan assumed.
func NewPeriodDesign(f *plan.File, strata []Stratum, flagged [][]bool) (*PeriodDesign, error) {
	pr, err := PeriodProblem(f, strata, flagged)
	if err != nil {
		return nil, err
	}
	planPr, cl, _, _, err := SpecOf(f).problem()
	if err != nil {
		return nil, err
	}
	if len(f.Measures.Claims) != len(pr.Claims) {
		return nil, fmt.Errorf("%w: the plan lists %d claims with designs, its family has %d", plan.ErrMeasures, len(f.Measures.Claims), len(pr.Claims))
	}
	cellOf := make([]int, len(strata))
	for h := range strata {
		cellOf[h] = cl.Cell(flagged[h])
	}
	pd := &PeriodDesign{Problem: pr, Level: pr.Level(), Departure: departure(f.Measures.Cells, strata, cellOf)}
	pd.Sample = make([]int, len(strata))
	for h, s := range strata {
		pd.Sample[h] = int(min(int64(pr.MinPerStratum), s.Population))
	}
	pd.Claims = make([]ClaimDesign, len(pr.Claims))
	pd.ProducerRisk = make([]float64, len(pr.Claims))
	target := 1 - pr.ProducerRisk
	for i, c := range pr.Claims {
		mc := f.Measures.Claims[i]
		d, ma, mb, ok := carryClaim(planPr, pr, c, mc.Design)
		if mc.Unplanned || !ok || c.Value(pr.Population, pr.Anticipated) >= c.Ceiling {
			pd.Unplanned = append(pd.Unplanned, i)
			continue
		}
		cd, power, err := pr.meetOnStrata(d, ma, mb, pd.Sample, pd.Level, target)
		if err != nil {
			return nil, err
		}
		raise(pd.Sample, cd.Counted)
		pd.Claims[i], pd.ProducerRisk[i] = cd, 1-power
	}
	for _, i := range pd.Unplanned {
		pd.Claims[i] = fallbackDesign(pr, pr.Claims[i], pd.Sample)
		power, err := pd.Claims[i].AcceptProbability(pr.Population, pr.Anticipated, pd.Level)
		if err != nil {
			return nil, err
		}
		pd.ProducerRisk[i] = 1 - power
	}
	all := make([]int, len(strata))
	for h := range all {
		all[h] = h
	}
	pd.UniformSample = ProportionalCounts(pr.Population, all, int(min(int64(f.Measures.Design.Uniform), pr.total())))
	for h, s := range strata {
		pd.UniformSample[h] = max(pd.UniformSample[h], int(min(int64(pr.MinPerStratum), s.Population)))
	}
	pd.Uniform = sum(pd.UniformSample)
	return pd, nil
}

// total is the decisions of every stratum.
func (p Population) total() int64 {
	var n int64
	for _, s := range p.Strata {
		n += s.Population
	}
	return n
}

// carryClaim is the plan's design of a claim on its cells (planPr)
// carried to the period's strata (pr): the items counted on each side's
// cells (ma, and mb for a ratio), and for a ratio the floor at the plan's
// share of the side's anticipated denominator part — lowered, when the
// period's anticipated numerator is already at the ceiling there, to the
// nearest of the search's margins at which it is not — and the plan's
// c_B. ok is false when the period's anticipated composition leaves the
// ratio no denominator part.
func carryClaim(planPr, pr Problem, c Claim, stored plan.MeasureClaimDesign) (d ClaimDesign, ma, mb int, ok bool) {
	d = ClaimDesign{Claim: c, BAccept: stored.BAccept}
	a, b := c.sides(pr.Population)
	pa, pb := c.sides(planPr.Population)
	counted := func(sd side) int {
		m := 0
		for _, h := range sd.strata {
			if h < len(stored.Counted) {
				m += stored.Counted[h]
			}
		}
		return m
	}
	ma = int(min(int64(counted(pa)), a.population(pr.Population)))
	if !c.Measure.Ratio() {
		return d, ma, 0, len(a.strata) > 0
	}
	mb = int(min(int64(counted(pb)), b.population(pr.Population)))
	part := func(p Problem, sd side) int64 {
		n := sd.population(p.Population)
		for _, e := range sd.counts(p.Population, p.Anticipated) {
			n -= e
		}
		return n
	}
	planB, B := part(planPr, pb), part(pr, b)
	var A int64
	for _, e := range a.counts(pr.Population, pr.Anticipated) {
		A += e
	}
	if len(a.strata) == 0 || len(b.strata) == 0 || planB < 1 || B < 1 {
		return d, 0, 0, false
	}
	share := float64(stored.Floor) / float64(planB)
	d.Floor = max(1, int64(math.Floor(share*float64(B))))
	for k := len(floorMargins) - 1; k >= 0 && A >= ratioBadCount(d.Floor, c.Ceiling); k-- {
		if q := floorMargins[k]; 1-q > share {
			d.Floor = max(1, int64(math.Floor((1-q)*float64(B))))
		}
	}
	return d, ma, mb, A < ratioBadCount(d.Floor, c.Ceiling)
}

// Departure is the cell of a period whose share of the decisions departs
// most from the share the plan assumed for it, when some cell's does by
// more than a quarter and by at least 0.1 percentage points.
type Departure struct {
	// Cell is the cell's label in the plan (a score band, a pattern of
	// predictions).
	Cell string
	// Log and Plan are the cell's share of the decisions in the period
	// and as the plan assumed it.
	Log, Plan float64
}

// departure compares the period's cells with the plan's (nil when they
// agree within the tolerance).
func departure(cells []plan.MeasureCell, strata []Stratum, cellOf []int) *Departure {
	logN := make([]float64, len(cells))
	var total, planTotal float64
	for h, s := range strata {
		if c := cellOf[h]; c >= 0 && c < len(cells) {
			logN[c] += float64(s.Population)
		}
		total += float64(s.Population)
	}
	for _, c := range cells {
		planTotal += float64(c.Decisions)
	}
	var out *Departure
	worst := 0.0
	for i, c := range cells {
		l, p := logN[i]/total, float64(c.Decisions)/planTotal
		diff := math.Abs(l - p)
		if diff >= 0.001 && (l > 1.25*p || l < p/1.25) && diff > worst {
			out, worst = &Departure{Cell: c.Label, Log: l, Plan: p}, diff
		}
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

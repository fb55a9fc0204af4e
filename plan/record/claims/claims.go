// Package claims judges the claims of a plan with measures on a labeled
// sample: each (measure, candidate) claim by plan/measure's design that
// the draw fixed before any label (the manifest's measures), under the
// plan's multiplicity over the family; each candidate's weighted confusion
// matrix; and the candidate the plan's release rule picks. plan/measure
// is the one home of the statistics; this package only feeds it the
// labeled items and reports.
package claims

import (
	"fmt"
	"slices"
	"sort"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/measure"
	"probity/plan/record"
	"probity/plan/verdict"
	"probity/sampling/drawfolder"
)

// Result is the judgement of a plan's measures.
type Result struct {
	Measures   []record.MeasureVerdict
	Confusions []record.EstimatedConfusion
	// Accepted[j] reports whether every claim of candidate j (plan order)
	// is accepted.
	Accepted []bool
	// Released is the candidate the release rule picks ("" when none);
	// ReleaseRule is the rule.
	Released, ReleaseRule string
	// Notes say how the claims were judged, for the record's method.
	Notes []string
}

// Population rebuilds the measures' view of the draw: the manifest's
// strata with which candidates predict the positive class in each.
func Population(p *plan.File, m *drawfolder.Manifest) (measure.Population, error) {
	mi := m.Measures
	if mi == nil || len(mi.Flagged) != len(m.Strata) {
		return measure.Population{}, inputerr.Errorf("the draw was not made for this plan's measures (the manifest holds no design for them)")
	}
	var pop measure.Population
	for _, s := range m.Strata {
		pop.Strata = append(pop.Strata, measure.Stratum{Label: s.Label, Population: s.Population})
	}
	for j, c := range p.Candidates {
		cand := measure.Candidate{Name: c.Name, Positive: make([]bool, len(m.Strata))}
		for h := range m.Strata {
			if len(mi.Flagged[h]) != len(p.Candidates) {
				return measure.Population{}, inputerr.Errorf("the manifest's measures name %d candidates, the plan %d", len(mi.Flagged[h]), len(p.Candidates))
			}
			cand.Positive[h] = mi.Flagged[h][j]
		}
		pop.Candidates = append(pop.Candidates, cand)
	}
	return pop, nil
}

// Designs are the claims' designs the manifest records, in the plan's
// order.
func Designs(p *plan.File, m *drawfolder.Manifest) ([]measure.ClaimDesign, []bool, error) {
	mi := m.Measures
	if len(mi.Claims) != len(p.Measures.Claims) {
		return nil, nil, inputerr.Errorf("the manifest's measures hold %d claims, the plan %d", len(mi.Claims), len(p.Measures.Claims))
	}
	var out []measure.ClaimDesign
	var planned []bool
	for i, c := range mi.Claims {
		pc := p.Measures.Claims[i]
		if c.Candidate != pc.Candidate || c.Measure != pc.Measure || c.Ceiling != pc.Ceiling || len(c.Counted) != len(m.Strata) {
			return nil, nil, inputerr.Errorf("the manifest's claim %d (%s of %s) is not the plan's (%s of %s)", i+1, c.Measure, c.Candidate, pc.Measure, pc.Candidate)
		}
		j := slices.IndexFunc(p.Candidates, func(x plan.Candidate) bool { return x.Name == c.Candidate })
		mm, err := measure.ParseMeasure(c.Measure)
		if err != nil {
			return nil, nil, err
		}
		out = append(out, measure.ClaimDesign{Claim: measure.Claim{Candidate: j, Measure: mm, Ceiling: c.Ceiling},
			Counted: c.Counted, Floor: c.Floor, BAccept: c.BAccept})
		planned = append(planned, c.Planned)
	}
	return out, planned, nil
}

// Sample turns the labeled items into the measures' sample: per stratum,
// in key order, whether each is the positive class and whether each
// candidate is wrong. Items left unlabeled or unsure cannot be judged
// here: the claims need every counted item's label.
func Sample(p *plan.File, pop measure.Population, items []verdict.Item) (measure.Sample, error) {
	s := make(measure.Sample, len(pop.Strata))
	for _, it := range items {
		if it.Missing {
			return nil, inputerr.Errorf("item %s has no label: the measures need every drawn item labeled", it.RecordID).WithHint("label it, or use a spare for it")
		}
		l := measure.Label{Positive: it.Label == p.Measures.Positive, Wrong: make([]bool, len(p.Candidates))}
		for j := range p.Candidates {
			l.Wrong[j] = it.Predictions[j] != it.Label
		}
		s[it.Stratum] = append(s[it.Stratum], l)
	}
	return s, nil
}

// Judge judges every claim of the plan's measures on the items, under the
// plan's multiplicity: Bonferroni (each claim at δ/K), Holm (step-down
// over the claims' p-values, each accepted claim's bound at the level of
// its step) or fixed-sequence (in declared order at δ until the first
// rejection). A candidate is accepted when all its claims are.
func Judge(p *plan.File, m *drawfolder.Manifest, items []verdict.Item) (*Result, error) {
	pop, err := Population(p, m)
	if err != nil {
		return nil, err
	}
	designs, planned, err := Designs(p, m)
	if err != nil {
		return nil, err
	}
	s, err := Sample(p, pop, items)
	if err != nil {
		return nil, err
	}
	delta := 1 - p.Inputs.Confidence
	K := len(designs)
	levels := make([]float64, K)
	switch p.Inputs.Multiplicity {
	case plan.FixedSequence:
		// at δ in order; after the first rejection nothing more is accepted
		for i := range levels {
			levels[i] = delta
		}
	default:
		for i := range levels {
			levels[i] = delta / float64(K)
		}
	}
	vs := make([]measure.Verdict, K)
	for i, cd := range designs {
		if vs[i], err = cd.Judge(pop, s, levels[i]); err != nil {
			return nil, fmt.Errorf("judging %s of %s: %w", cd.Measure, p.Candidates[cd.Candidate].Name, err)
		}
	}
	pv := make([]float64, K)
	for i, v := range vs {
		pv[i] = v.PValue
	}
	if p.Inputs.Multiplicity == plan.Holm {
		// each claim's bound at the level of its step
		order := make([]int, K)
		for i := range order {
			order[i] = i
		}
		sort.SliceStable(order, func(a, b int) bool { return pv[order[a]] < pv[order[b]] })
		for step, i := range order {
			if vs[i], err = designs[i].Judge(pop, s, delta/float64(K-step)); err != nil {
				return nil, err
			}
		}
	}
	for i, ok := range Family(p.Inputs.Multiplicity, delta, pv) {
		vs[i].Accepted = ok
	}
	res := &Result{Accepted: make([]bool, len(p.Candidates)), ReleaseRule: p.Measures.Release}
	for j := range res.Accepted {
		res.Accepted[j] = true
	}
	for i, v := range vs {
		mv := record.MeasureVerdict{Candidate: p.Candidates[v.Candidate].Name, Measure: v.Measure.String(), Ceiling: v.Ceiling,
			Labeled: v.CountedA, Events: v.EventsA, LabeledOther: v.CountedB, EventsOther: v.EventsB,
			UpperBound: v.Upper, Level: v.Level, PValue: v.PValue, Verdict: record.Reject, Planned: planned[i]}
		if v.Estimated {
			e := v.Estimate
			mv.Estimate = &e
		}
		if v.Accepted {
			mv.Verdict = record.Accept
		} else {
			res.Accepted[v.Candidate] = false
		}
		res.Measures = append(res.Measures, mv)
	}
	conf, err := measure.Estimate(pop, s)
	if err != nil {
		return nil, err
	}
	for _, c := range conf {
		res.Confusions = append(res.Confusions, record.EstimatedConfusion{Candidate: c.Candidate, TP: c.TP, FP: c.FP, FN: c.FN, TN: c.TN, Prevalence: c.Prevalence})
	}
	res.Released = release(p, res, conf)
	res.Notes = append(res.Notes, fmt.Sprintf("Each (measure, candidate) claim is judged by its exact test on the items the draw's design counts for it (%s over %d claims); a candidate is accepted when all its claims are.",
		p.Inputs.Multiplicity.Title(), K))
	for i, pl := range planned {
		if !pl {
			res.Notes = append(res.Notes, fmt.Sprintf("The design was not sized for %s of %s (the log's strata put its anticipated value at or above the ceiling); its risk of a false acceptance holds all the same.", res.Measures[i].Measure, res.Measures[i].Candidate))
		}
	}
	return res, nil
}

// release applies the plan's release rule: the named candidate when it
// is accepted, or the accepted candidate with the lowest estimate of the
// measure (ties: the first declared).
func release(p *plan.File, res *Result, conf []measure.Confusion) string {
	r := p.Measures.Release
	if r == "" {
		return ""
	}
	name, best := strings.CutPrefix(r, "best:")
	if !best {
		j := slices.IndexFunc(p.Candidates, func(c plan.Candidate) bool { return c.Name == r })
		if j >= 0 && res.Accepted[j] {
			return r
		}
		return ""
	}
	m, err := measure.ParseMeasure(name)
	if err != nil {
		return ""
	}
	pick, low := "", 2.0
	for j, c := range conf {
		if !res.Accepted[j] {
			continue
		}
		v := valueOf(c, m)
		if v < low {
			pick, low = p.Candidates[j].Name, v
		}
	}
	return pick
}

// valueOf is a measure on an estimated confusion matrix.
func valueOf(c measure.Confusion, m measure.Measure) float64 {
	r := func(x, y float64) float64 {
		if x+y == 0 {
			return 0
		}
		return x / (x + y)
	}
	switch m {
	case measure.Error:
		return (c.FP + c.FN) / (c.TP + c.FP + c.FN + c.TN)
	case measure.FNR:
		return r(c.FN, c.TP)
	case measure.FPR:
		return r(c.FP, c.TN)
	case measure.FOR:
		return r(c.FN, c.TN)
	case measure.FDR:
		return r(c.FP, c.TP)
	}
	return 1
}

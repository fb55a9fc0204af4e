package verdict

import (
	"errors"
	"fmt"
	"math"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/stratified"
)

// RuleKind says which rule a sample's verdicts rest on.
type RuleKind int

// The rules a sample can be judged by.
const (
	// PlanRule is the plan's own rule — its (n, c) or its exact bound —
	// on a sample that is one simple random sample (a single stratum) or
	// an exactly proportional stratified one (stratified.SimpleRandomShortcut).
	PlanRule RuleKind = iota + 1
	// CountRule is the stratified count rule (stratified.CountRule) for
	// every other allocation.
	CountRule
)

// ErrStratifiedSequential is returned for a sequential plan on a draw with
// more than one stratum: its boundaries count errors on the worksheet
// from the top, and a prefix of a stratified worksheet is not a simple
// random sample of the population, so they would not keep their risk.
var ErrStratifiedSequential = errors.New("a sequential plan needs a draw with one stratum")

// Applied is the rule a draw's sample is judged by. It depends only on
// the plan, the design (N_h and n_h) and the anticipated errors — never on
// a label — so the draw can state it before labeling, progress stops by
// it and record applies it.
type Applied struct {
	Kind RuleKind
	// Reason says why this rule applies.
	Reason string
	// Design is the design the rule was chosen for.
	Design stratified.Design
	// Count is the stratified count rule at the plan's per-candidate risk
	// (Kind == CountRule). Its Counted[h] items of stratum h are the first
	// of that stratum's judged items in worksheet order.
	Count *stratified.CountRule
	// Thinned is set when some stratum counts fewer items than it holds.
	Thinned bool
	// Anticipated is the number of errors per stratum at which the
	// producer's risk is computed, and AnticipatedFrom says where the rates
	// came from.
	Anticipated     []int64
	AnticipatedFrom string
	// ProducerRisk is the chance of rejecting a candidate with the
	// anticipated errors under the count rule (Kind == CountRule).
	ProducerRisk float64
	// Unknown lists the strata with no item: the count rule counts all of
	// their decisions as possible errors.
	Unknown []string
}

// CountSources are the published results behind the stratified count rule.
var CountSources = []string{
	"W. Hoeffding, On the distribution of the number of successes in independent trials, Ann. Math. Statist. 27 (1956), Theorem 4",
	"V. A. Vatutin and V. G. Mikhailov, Theory Probab. Appl. 27 (1982): a hypergeometric count is a sum of independent Bernoulli trials",
	"K. Ottoboni, P. B. Stark, M. Lindeman and N. McBurnett, Risk-limiting audits by stratified union-intersection tests of elections (SUITE), 2018: the union-intersection test over the spreads of errors",
}

// Choose returns the rule a sample of design d is judged by under plan p.
// rates are the anticipated error rates per stratum (in Design order) at
// which the count rule's counted sub-sample is chosen for power and its
// producer's risk is stated; nil takes the plan's anticipated error for
// every stratum, or half the ceiling when the plan has none.
//
// A single stratum is a simple random sample: the plan's rule. More than
// one stratum is judged by the plan's (n, c) only where
// stratified.SimpleRandomShortcut proves it keeps the risk (exactly
// proportional allocation), else by the stratified count rule; a
// sequential plan on more than one stratum is refused
// (ErrStratifiedSequential).
func Choose(p *plan.File, d Design, rates []float64) (*Applied, error) {
	if err := d.validate(); err != nil {
		return nil, err
	}
	sd := d.stratified()
	a := &Applied{Design: sd}
	for _, s := range d.Strata {
		if s.Sample == 0 {
			a.Unknown = append(a.Unknown, s.Label)
		}
	}
	level := p.Rule.PerCandidateRisk
	if !(level > 0 && level < 1) {
		return nil, inputerr.Errorf("%w: rule.per_candidate_risk %v is outside (0, 1)", ErrInput, level)
	}
	if len(d.Strata) == 1 {
		a.Kind = PlanRule
		a.Reason = "one stratum: the sample is a simple random sample of the population, judged by the plan's rule"
		return a, nil
	}
	if p.Sequential != nil || p.Inputs.Design == plan.DesignSequential {
		return nil, ErrStratifiedSequential
	}
	ok, why := stratified.SimpleRandomShortcut(sd, p.Rule.SampleSize, p.Rule.AcceptanceNumber, p.Inputs.Ceiling, 1-level)
	if ok {
		a.Kind = PlanRule
		a.Reason = why
		return a, nil
	}
	if err := a.count(p, d, rates, level); err != nil {
		return nil, err
	}
	a.Reason = "the plan's acceptance number holds only for a simple random sample or an exactly proportional allocation, and here " + why +
		"; the stratified count rule keeps the risk whatever the allocation and wherever the errors sit"
	if len(a.Unknown) > 0 {
		a.Reason += fmt.Sprintf(" (%s with no item counted as unknown: all of %s decisions may be errors)", plural(len(a.Unknown), "stratum", "strata"), map[bool]string{true: "its", false: "their"}[len(a.Unknown) == 1])
	}
	if a.Thinned {
		a.Reason += "; strata sampled above proportion count only the first of their items, a sub-sample fixed before labeling that keeps the errors from hiding where few items per decision were drawn"
	}
	return a, nil
}

// count makes a the stratified count rule for design d at risk level, with
// the counted sub-sample chosen for power at the anticipated errors.
func (a *Applied) count(p *plan.File, d Design, rates []float64, level float64) error {
	var err error
	if a.Anticipated, a.AnticipatedFrom, err = anticipatedErrors(p, d, rates); err != nil {
		return err
	}
	counted, rule, err := stratified.CountedForPower(a.Design, a.Anticipated, p.Inputs.Ceiling, 1-level)
	if err != nil {
		return inputerr.Errorf("%w: %v", ErrInput, err)
	}
	a.Kind, a.Count = CountRule, rule
	for h, s := range d.Strata {
		if counted[h] < s.Sample {
			a.Thinned = true
		}
	}
	acc, err := rule.AcceptProbability(a.Anticipated)
	if err != nil {
		return inputerr.Errorf("%w: %v", ErrInput, err)
	}
	a.ProducerRisk = 1 - acc
	return nil
}

// RuleAt is the count rule at another confidence, with the same counted
// items (for the steps of Holm's procedure).
func (a *Applied) RuleAt(confidence float64) (*stratified.CountRule, error) {
	if a.Count == nil {
		return nil, fmt.Errorf("%w: not a count rule", ErrInput)
	}
	if confidence == a.Count.Confidence {
		return a.Count, nil
	}
	return stratified.NewCountRule(a.Count.Design, a.Count.Counted, a.Count.Ceiling, confidence)
}

// anticipatedErrors spreads the anticipated errors over the strata: with
// rates r_h (given, else the plan's p0 in every stratum, else half the
// ceiling), stratum h holds ⌊r_h·N_h⌋ errors and the units the floors
// lost, ⌊Σ r_h·N_h⌋ − Σ⌊r_h·N_h⌋, go to the largest remainders (ties to
// the earlier stratum), so the total is the population's anticipated
// count and small strata are not rounded to no error at all. from says
// where the rates came from.
func anticipatedErrors(p *plan.File, d Design, rates []float64) ([]int64, string, error) {
	from := "the per-stratum anticipated errors of the draw"
	if rates == nil {
		r := p.Inputs.Ceiling / 2
		from = "half the ceiling in every stratum (the plan has no anticipated error)"
		if p0 := p.Inputs.Anticipated; p0 != nil {
			r = *p0
			from = fmt.Sprintf("the plan's anticipated error %s in every stratum", numfmt.Setting(r))
		}
		rates = make([]float64, len(d.Strata))
		for h := range rates {
			rates[h] = r
		}
	}
	if len(rates) != len(d.Strata) {
		return nil, "", inputerr.Errorf("%w: %d anticipated rates for %d strata", ErrInput, len(rates), len(d.Strata))
	}
	out := make([]int64, len(rates))
	rem := make([]float64, len(rates))
	var want float64
	var got int64
	for h, r := range rates {
		if !(r >= 0 && r <= 1) || math.IsNaN(r) {
			return nil, "", inputerr.Errorf("%w: anticipated error %v of stratum %q is outside [0, 1]", ErrInput, r, d.Strata[h].Label)
		}
		t := r * float64(d.Strata[h].Population)
		out[h] = plan.GoodLotErrors(d.Strata[h].Population, r)
		rem[h] = t - float64(out[h])
		want += t
		got += out[h]
	}
	total := int64(math.Floor(want + 1e-9))
	for ; got < total; got++ {
		best := -1
		for h := range rem {
			if out[h] < d.Strata[h].Population && (best < 0 || rem[h] > rem[best]) {
				best = h
			}
		}
		if best < 0 {
			break
		}
		out[best]++
		rem[best] = -1
	}
	return out, from, nil
}

// stratified is the design in the stratified package's terms.
func (d Design) stratified() stratified.Design {
	out := stratified.Design{Strata: make([]stratified.Stratum, len(d.Strata))}
	for h, s := range d.Strata {
		out.Strata[h] = stratified.Stratum{Label: s.Label, Population: s.Population, Sample: s.Sample}
	}
	return out
}

// Record is the rule as record.json states it. judged[h] and lastItem[h]
// are the judged items of stratum h and the worksheet item of its last
// counted one (nil under the plan's rule).
func (a *Applied) Record(p *plan.File, lastItem []int) *record.AppliedRule {
	r := &record.AppliedRule{Reason: a.Reason, Sources: []string{}, Strata: []record.CountedStratum{}}
	if a.Kind == PlanRule {
		r.Name = record.RulePlan
		if len(a.Design.Strata) > 1 {
			r.Sources = CountSources[:2]
		}
		return r
	}
	c := a.Count
	r.Name = record.RuleStratifiedCount
	r.Sources = append([]string(nil), CountSources...)
	r.CountedSize, r.AcceptanceNumber = c.CountedSize(), c.Accept
	r.BadLotErrors, r.LeastFavourableMean = c.BadLot, c.LeastMean
	r.ConsumerRiskBound = c.ConsumerRiskBound()
	pr := a.ProducerRisk
	r.ProducerRisk, r.AnticipatedFrom = &pr, a.AnticipatedFrom
	r.Thinned = a.Thinned
	for h, s := range a.Design.Strata {
		cs := record.CountedStratum{Label: s.Label, Judged: s.Sample, Counted: c.Counted[h], Unknown: s.Sample == 0}
		if lastItem != nil {
			cs.LastItem = lastItem[h]
		}
		r.Strata = append(r.Strata, cs)
	}
	return r
}

// plural is "1 stratum" or "k strata".
func plural(k int, one, many string) string {
	if k == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", k, many)
}

// OC is the operating characteristic of the count rule at the error rates
// errs: the chance of acceptance when every stratum has that rate (d_h =
// round(e·N_h) errors in stratum h), exactly (CountRule.AcceptProbability).
// Errors spread otherwise give other curves; at the ceiling every spread
// is bounded by Count.ConsumerRiskBound.
func (a *Applied) OC(errs []float64) ([]record.OCPoint, error) {
	if a.Count == nil {
		return nil, fmt.Errorf("%w: not a count rule", ErrInput)
	}
	out := make([]record.OCPoint, 0, len(errs))
	d := make([]int64, len(a.Design.Strata))
	for _, e := range errs {
		for h, s := range a.Design.Strata {
			d[h] = min(s.Population, max(0, int64(math.Round(e*float64(s.Population)))))
		}
		p, err := a.Count.AcceptProbability(d)
		if err != nil {
			return nil, inputerr.Errorf("%w: %v", ErrInput, err)
		}
		out = append(out, record.OCPoint{Error: e, AcceptProbability: p})
	}
	return out, nil
}

package verdict

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// ErrSequential is returned for a plan with a sequential design, which
// Judge does not handle.
var ErrSequential = errors.New("sequential plans are judged by their boundaries")

// ErrInput is wrapped by every error about Judge's input.
var ErrInput = errors.New("invalid judgement input")

// Item is one judged decision of the sample.
type Item struct {
	RecordID string
	// Stratum is the index of the item's stratum in Input.Design.Strata.
	Stratum int
	// Label is the true label; ignored when Missing.
	Label string
	// Missing marks an item left unlabeled or marked unsure that is
	// counted as an error for every candidate (--allow-incomplete).
	Missing bool
	// Predictions holds one prediction per plan candidate, in plan order.
	Predictions []string
}

// Input is what Judge needs.
type Input struct {
	Plan *plan.File
	// Design's n_h must equal the number of Items in each stratum.
	Design Design
	Items  []Item
	// UnequalBound is the bound used when the weights are unequal
	// (KornGraubard unless set).
	UnequalBound UnequalBound
}

// Result is the judgement of every candidate.
type Result struct {
	Candidates []record.Candidate
	Method     record.MethodInfo
	// Overall is record.Accept when the candidates the plan requires
	// (Inputs.Require: all or any) are accepted.
	Overall string
	// SelfWeighting reports whether the sample was judged as a simple
	// random sample (see Design.SelfWeighting).
	SelfWeighting bool
	// Notes are facts about the judgement a reviewer should read (e.g. a
	// stratum with no sampled item).
	Notes []string
}

// judgeMethod is the bound and test chosen for a plan and sample.
type judgeMethod struct {
	bound plan.Bound
	// ruleApplies: the plan's (n, c) rule decides at the plan's level.
	ruleApplies bool
}

// Judge judges every candidate of in.Plan.
func Judge(in Input) (*Result, error) {
	p := in.Plan
	if p == nil || p.IsSizingOnly() {
		return nil, inputerr.Errorf("%w: the plan declares no candidates", ErrInput)
	}
	if p.Sequential != nil || p.Inputs.Design == plan.DesignSequential {
		return nil, ErrSequential
	}
	if err := in.Design.validate(); err != nil {
		return nil, err
	}
	counts := make([]int, len(in.Design.Strata))
	for i, it := range in.Items {
		if it.Stratum < 0 || it.Stratum >= len(counts) {
			return nil, inputerr.Errorf("%w: item %d (%s) has no stratum", ErrInput, i+1, it.RecordID)
		}
		if len(it.Predictions) != len(p.Candidates) {
			return nil, inputerr.Errorf("%w: item %d (%s) has %d predictions for %d candidates", ErrInput, i+1, it.RecordID, len(it.Predictions), len(p.Candidates))
		}
		counts[it.Stratum]++
	}
	for h, s := range in.Design.Strata {
		if counts[h] != s.Sample {
			return nil, inputerr.Errorf("%w: stratum %q has %d items but n_h = %d", ErrInput, s.Label, counts[h], s.Sample)
		}
	}
	unequal := in.UnequalBound
	if unequal != KornGraubard && unequal != WeightedHoeffding {
		return nil, inputerr.Errorf("%w: bound %q is not %s or %s", ErrInput, unequal, KornGraubard, WeightedHoeffding)
	}

	res := &Result{SelfWeighting: in.Design.SelfWeighting()}
	n := len(in.Items)
	lot := int64(0)
	for _, s := range in.Design.Strata {
		lot += s.Population
		if s.Sample == 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("stratum %q (N_h = %d) has no item in the sample; the judgement speaks for the other strata only", s.Label, s.Population))
		}
	}
	m, err := chooseMethod(p, res.SelfWeighting, n, lot, unequal)
	if err != nil {
		return nil, err
	}
	level := p.Rule.PerCandidateRisk
	if !(level > 0 && level < 1) {
		return nil, inputerr.Errorf("%w: rule.per_candidate_risk %v is outside (0, 1)", ErrInput, level)
	}
	if !m.ruleApplies && res.SelfWeighting && n != p.Rule.SampleSize {
		res.Notes = append(res.Notes, fmt.Sprintf("%d items were judged where the plan asks for n = %d; the verdict follows the p-value, not the plan's c", n, p.Rule.SampleSize))
	}

	tests := make([]Test, len(p.Candidates))
	for ci, c := range p.Candidates {
		rc, t, err := judgeCandidate(in, ci, m, level, lot)
		if err != nil {
			return nil, fmt.Errorf("candidate %s: %w", c.Name, err)
		}
		res.Candidates = append(res.Candidates, rc)
		tests[ci] = t
	}
	delta := 1 - p.Inputs.Confidence
	decisions, err := Decide(p.Inputs.Multiplicity, tests, delta)
	if err != nil {
		return nil, inputerr.Errorf("%w: %v", ErrInput, err)
	}
	firstFail := ""
	for ci := range res.Candidates {
		rc, d := &res.Candidates[ci], decisions[ci]
		adj := d.Adjusted
		rc.AdjustedPValue = &adj
		switch {
		case d.NotReached:
			rc.Verdict = record.Reject
			rc.Reason = p.Inputs.Multiplicity.NotReachedReason(firstFail)
		case d.Accepted:
			rc.Verdict = record.Accept
		default:
			rc.Verdict = record.Reject
		}
		if !d.NotReached {
			rc.Reason = reason(rc, m, p, n, level, d)
			if !d.Accepted && firstFail == "" && p.Inputs.Multiplicity == plan.FixedSequence {
				firstFail = rc.Name
			}
		}
	}
	if p.Inputs.Multiplicity == plan.Holm {
		// The Holm stop point is the not-accepted candidate with the
		// smallest step; fill the not-reached reasons with it.
		best := 0
		for ci, d := range decisions {
			if !d.NotReached && !d.Accepted && (best == 0 || d.Step < best) {
				best, firstFail = d.Step, res.Candidates[ci].Name
			}
		}
		for ci, d := range decisions {
			if d.NotReached {
				res.Candidates[ci].Reason = plan.Holm.NotReachedReason(firstFail)
			}
		}
	}
	res.Overall = overall(p.Inputs.Require, res.Candidates)
	res.Method = methodInfo(p, m, n, level, res)
	return res, nil
}

// chooseMethod picks the bound and whether the plan's (n, c) rule decides.
func chooseMethod(p *plan.File, selfWeighting bool, n int, lot int64, unequal UnequalBound) (judgeMethod, error) {
	sameN := n == p.Rule.SampleSize
	if !selfWeighting {
		return judgeMethod{bound: unequal.Bound()}, nil
	}
	switch p.Rule.Model {
	case plan.ModelBinomial, plan.ModelUnset:
		return judgeMethod{bound: plan.BoundClopperPearson, ruleApplies: sameN}, nil
	case plan.ModelHypergeometric:
		return judgeMethod{bound: plan.BoundExactHypergeometric, ruleApplies: sameN && lot == p.Inputs.Population}, nil
	case plan.ModelHoeffding:
		return judgeMethod{bound: plan.BoundHoeffding, ruleApplies: sameN}, nil
	case plan.ModelKL:
		return judgeMethod{bound: plan.BoundChernoff, ruleApplies: sameN}, nil
	}
	return judgeMethod{}, inputerr.Errorf("%w: rule.model %q is not binomial, hypergeometric, hoeffding or kl", ErrInput, p.Rule.Model)
}

// judgeCandidate counts one candidate's errors and computes its estimate,
// bound, p-value and test.
func judgeCandidate(in Input, ci int, m judgeMethod, level float64, lot int64) (record.Candidate, Test, error) {
	p := in.Plan
	c := p.Candidates[ci]
	rc := record.Candidate{Name: c.Name, Column: c.Column, ScoreColumn: c.ScoreColumn, Threshold: c.Threshold}
	perStratum := make([]int, len(in.Design.Strata))
	var labels, preds []string
	for _, it := range in.Items {
		rc.Labeled++
		if it.Missing {
			rc.Missing++
			rc.Errors++
			perStratum[it.Stratum]++
			continue
		}
		labels = append(labels, it.Label)
		preds = append(preds, it.Predictions[ci])
		if it.Predictions[ci] != it.Label {
			rc.Errors++
			perStratum[it.Stratum]++
		}
	}
	rc.Confusion = Confusion(p.Classes, labels, preds)
	for h, s := range in.Design.Strata {
		se := record.StratumErr{Label: s.Label, Labeled: s.Sample, Errors: perStratum[h], Upper: 1}
		if s.Sample > 0 {
			se.Rate = float64(perStratum[h]) / float64(s.Sample)
			se.Lower, se.Upper = plan.ClopperPearsonInterval(perStratum[h], s.Sample, 0.95)
		}
		rc.Strata = append(rc.Strata, se)
	}
	est, err := in.Design.Stratified(perStratum)
	if err != nil {
		return rc, Test{}, err
	}
	x, n := rc.Errors, rc.Labeled
	ceiling := p.Inputs.Ceiling
	conf := 1 - level
	rc.BoundConfidence = conf
	var t Test
	var upperAt func(conf float64) float64
	switch m.bound {
	case plan.BoundClopperPearson:
		rc.Estimate = float64(x) / float64(n)
		t.PValue = plan.BinomialPValueAtLeast(x, n, ceiling)
		upperAt = func(cf float64) float64 { return plan.ClopperPearsonUpper(x, n, cf) }
	case plan.BoundExactHypergeometric:
		rc.Estimate = float64(x) / float64(n)
		t.PValue = plan.HypergeometricPValueAtLeast(x, n, lot, ceiling)
		upperAt = func(cf float64) float64 { return plan.HypergeometricUpper(x, n, lot, cf) }
	case plan.BoundHoeffding:
		rc.Estimate = float64(x) / float64(n)
		e := Estimate{Rate: rc.Estimate, SumW2n: 1 / float64(n)}
		t.PValue = WeightedHoeffdingPValue(e, ceiling)
		upperAt = func(cf float64) float64 { return WeightedHoeffdingUpper(e, cf) }
	case plan.BoundChernoff:
		rc.Estimate = float64(x) / float64(n)
		t.PValue = ChernoffPValue(x, n, ceiling)
		upperAt = func(cf float64) float64 { return ChernoffUpper(x, n, cf) }
	case plan.BoundWeightedHoeffding:
		rc.Estimate = est.Rate
		t.PValue = WeightedHoeffdingPValue(est, ceiling)
		upperAt = func(cf float64) float64 { return WeightedHoeffdingUpper(est, cf) }
	case plan.BoundKornGraubard:
		rc.Estimate = est.Rate
		upperAt = func(cf float64) float64 { return KornGraubardUpper(est, n, cf) }
		t.PValue = boundPValue(upperAt, ceiling)
	}
	rc.UpperBound = upperAt(conf)
	rc.PValue = t.PValue
	if math.IsNaN(rc.UpperBound) || math.IsNaN(t.PValue) {
		return rc, Test{}, inputerr.Errorf("%w: the %s bound is undefined for %d errors in %d", ErrInput, m.bound, x, n)
	}
	exact := m.bound.Exact()
	accept := p.Rule.AcceptanceNumber
	t.Accept = func(lv float64) bool {
		byRule := m.ruleApplies && x <= accept
		if m.ruleApplies && lv <= level*(1+1e-9) {
			return byRule
		}
		if exact {
			return byRule || t.PValue <= lv
		}
		return byRule || upperAt(1-lv) < ceiling
	}
	return rc, t, nil
}

// boundPValue is the smallest α at which the bound at 1 − α is below the
// ceiling — the α with upperAt(1 − α) = ceiling — found by bisection on
// log α over [1e-300, 1/2] (the bound falls as α grows). When the bound at
// confidence 1/2 is not below the ceiling the p-value is reported as 1
// (the data give no evidence that the error is under the ceiling).
func boundPValue(upperAt func(float64) float64, ceiling float64) float64 {
	if !(upperAt(0.5) < ceiling) {
		return 1
	}
	lo, hi := math.Log(1e-300), math.Log(0.5)
	if upperAt(1-math.Exp(lo)) < ceiling {
		return math.Exp(lo)
	}
	for i := 0; i < 200 && hi-lo > 1e-12; i++ {
		mid := (lo + hi) / 2
		if upperAt(1-math.Exp(mid)) < ceiling {
			hi = mid
		} else {
			lo = mid
		}
	}
	return math.Exp(hi)
}

func reason(rc *record.Candidate, m judgeMethod, p *plan.File, n int, level float64, d Decision) string {
	var s string
	switch {
	case m.ruleApplies && rc.Errors <= p.Rule.AcceptanceNumber:
		s = fmt.Sprintf("%s ≤ c = %d in n = %d", errorsText(rc.Errors), p.Rule.AcceptanceNumber, n)
	case m.ruleApplies && d.Level <= level*(1+1e-9):
		s = fmt.Sprintf("%s > c = %d in n = %d", errorsText(rc.Errors), p.Rule.AcceptanceNumber, n)
	default:
		cmp := "<"
		if !d.Accepted {
			cmp = "≥"
		}
		s = fmt.Sprintf("upper bound %s %s ceiling %s at confidence %s", numfmt.RateUp(rc.UpperBound), cmp, numfmt.Setting(p.Inputs.Ceiling), numfmt.Confidence(1-d.Level))
		if m.bound.Exact() {
			cmp = "≤"
			if !d.Accepted {
				cmp = ">"
			}
			s = fmt.Sprintf("p-value %s %s level %s", numfmt.PValue(rc.PValue), cmp, numfmt.PValue(d.Level))
		}
	}
	if p.Inputs.Multiplicity == plan.Holm && d.Step > 1 {
		s += fmt.Sprintf(" (Holm step %d, level %s)", d.Step, numfmt.PValue(d.Level))
	}
	return s
}

// errorsText is "1 error" or "k errors".
func errorsText(k int) string {
	if k == 1 {
		return "1 error"
	}
	return strconv.Itoa(k) + " errors"
}

// overall is the audit's verdict under the plan's requirement.
func overall(require plan.Require, cands []record.Candidate) string {
	accepted := 0
	for _, c := range cands {
		if c.Verdict == record.Accept {
			accepted++
		}
	}
	if require.Met(accepted, len(cands)) {
		return record.Accept
	}
	return record.Reject
}

// UnequalBound is the bound Judge uses when the strata's inclusion weights
// differ. Its names are those of the record command's option.
type UnequalBound int

// Bounds for samples with unequal inclusion weights.
const (
	// KornGraubard is the default (the zero value): Clopper–Pearson with
	// the effective sample size (approximate).
	KornGraubard UnequalBound = iota
	// WeightedHoeffding is rigorous but wider.
	WeightedHoeffding
)

// ParseUnequalBound returns the bound named s ("korn-graubard" or
// "weighted-hoeffding").
func ParseUnequalBound(s string) (UnequalBound, error) {
	for _, u := range []UnequalBound{KornGraubard, WeightedHoeffding} {
		if s == u.String() {
			return u, nil
		}
	}
	return 0, fmt.Errorf("%w: bound %q is not %s or %s", ErrInput, s, KornGraubard, WeightedHoeffding)
}

// String is the option's name.
func (u UnequalBound) String() string {
	switch u {
	case KornGraubard:
		return "korn-graubard"
	case WeightedHoeffding:
		return "weighted-hoeffding"
	}
	return fmt.Sprintf("UnequalBound(%d)", int(u))
}

// Bound is the record's name of the bound the option selects.
func (u UnequalBound) Bound() plan.Bound {
	if u == WeightedHoeffding {
		return plan.BoundWeightedHoeffding
	}
	return plan.BoundKornGraubard
}

// UnequalBoundOf is the option under which a judgement with bound b was
// made (KornGraubard unless b is the weighted Hoeffding bound), so that a
// record can be judged again the same way.
func UnequalBoundOf(b plan.Bound) UnequalBound {
	if b == plan.BoundWeightedHoeffding {
		return WeightedHoeffding
	}
	return KornGraubard
}

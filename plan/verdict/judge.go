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
	// Item is the item's number in the worksheet (0 when not known).
	Item int
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
	// Items are in worksheet order: within a stratum the items of the
	// sample in key order, then the spares that replaced some of them, in
	// key order (the order the counted items of the count rule are taken
	// in).
	Items []Item
	// Rates are the anticipated error rates per stratum (Design order), fixed
	// before labeling, at which the count rule's counted sub-sample is
	// chosen; nil takes the plan's (see Choose).
	Rates []float64
}

// Result is the judgement of every candidate.
type Result struct {
	Candidates []record.Candidate
	Method     record.MethodInfo
	// Overall is record.Accept when the candidates the plan requires
	// (Inputs.Require: all or any) are accepted.
	Overall string
	// Applied is the rule the verdicts rest on.
	Applied *Applied
	// Notes are facts about the judgement a reviewer should read (e.g. a
	// stratum with no sampled item).
	Notes []string
}

// judgeMethod is the bound and test chosen for a plan and sample.
type judgeMethod struct {
	bound plan.Bound
	// ruleApplies: the plan's (n, c) rule decides at the plan's level.
	ruleApplies bool
	// meanAtCeiling is n·D*/N for a stratified sample judged by the plan's
	// rule: the binomial comparison behind the shortcut holds for counts up
	// to meanAtCeiling − 1 (0 for a single stratum: no limit).
	meanAtCeiling float64
	// count is the applied count rule (bound BoundStratifiedCount).
	count *Applied
}

// Judge judges every candidate of in.Plan under the rule Choose picks.
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
	applied, err := Choose(p, in.Design, in.Rates)
	if err != nil {
		return nil, err
	}
	res := &Result{Applied: applied}
	n := len(in.Items)
	lot := in.Design.Population()
	for _, s := range in.Design.Strata {
		if s.Sample == 0 {
			res.Notes = append(res.Notes, fmt.Sprintf("stratum %q (N_h = %d) has no item in the sample: the verdict counts all of its decisions as possible errors", s.Label, s.Population))
		}
	}
	var m judgeMethod
	if applied.Kind == CountRule {
		m = judgeMethod{bound: plan.BoundStratifiedCount, count: applied}
	} else {
		if m, err = chooseMethod(p, n, lot); err != nil {
			return nil, err
		}
		if len(in.Design.Strata) > 1 {
			// The shortcut proved the plan's c; other levels (Holm's later
			// steps) use the binomial comparison within its range.
			m.meanAtCeiling = float64(n) * float64(plan.BadLotErrors(lot, p.Inputs.Ceiling)) / float64(lot)
		}
	}
	level := p.Rule.PerCandidateRisk
	if !m.ruleApplies && m.count == nil && n != p.Rule.SampleSize {
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
			// The bound at the level the candidate was tested at (a later
			// step of Holm's procedure tests at a larger risk), so that the
			// bound, the verdict and the reason agree.
			if d.Level > 0 && math.Abs(d.Level-level) > 1e-9*level {
				if err := tests[ci].boundAt(rc, 1-d.Level); err != nil {
					return nil, fmt.Errorf("candidate %s: %w", rc.Name, err)
				}
			}
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
	res.Method.Rule = applied.Record(p, lastCounted(in, applied))
	return res, nil
}

// lastCounted is, under the count rule, the worksheet item of the last
// counted item of each stratum (0 when none counts); nil otherwise.
func lastCounted(in Input, a *Applied) []int {
	if a.Kind != CountRule {
		return nil
	}
	out := make([]int, len(in.Design.Strata))
	seen := make([]int, len(in.Design.Strata))
	for _, it := range in.Items {
		h := it.Stratum
		if seen[h] < a.Count.Counted[h] {
			seen[h]++
			out[h] = it.Item
		}
	}
	return out
}

// chooseMethod picks the bound of the plan's rule for a simple random
// sample (or an exactly proportional one), and whether the plan's (n, c)
// decides.
func chooseMethod(p *plan.File, n int, lot int64) (judgeMethod, error) {
	sameN := n == p.Rule.SampleSize
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
	var counted, seen []int // the count rule's errors among the counted items
	if m.count != nil {
		counted, seen = make([]int, len(perStratum)), make([]int, len(perStratum))
	}
	var labels, preds []string
	for _, it := range in.Items {
		rc.Labeled++
		wrong := it.Missing || it.Predictions[ci] != it.Label
		if it.Missing {
			rc.Missing++
		} else {
			labels = append(labels, it.Label)
			preds = append(preds, it.Predictions[ci])
		}
		if wrong {
			rc.Errors++
			perStratum[it.Stratum]++
		}
		if m.count != nil {
			h := it.Stratum
			if seen[h] < m.count.Count.Counted[h] {
				seen[h]++
				if wrong {
					counted[h]++
				}
			}
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
	var t Test
	var upperAt func(conf float64) (float64, error)
	exactUpper := func(f func(float64) float64) func(float64) (float64, error) {
		return func(cf float64) (float64, error) { return f(cf), nil }
	}
	switch m.bound {
	case plan.BoundClopperPearson:
		rc.Estimate = float64(x) / float64(n)
		t.PValue = plan.BinomialPValueAtLeast(x, n, ceiling)
		upperAt = exactUpper(func(cf float64) float64 { return plan.ClopperPearsonUpper(x, n, cf) })
	case plan.BoundExactHypergeometric:
		rc.Estimate = float64(x) / float64(n)
		t.PValue = plan.HypergeometricPValueAtLeast(x, n, lot, ceiling)
		upperAt = exactUpper(func(cf float64) float64 { return plan.HypergeometricUpper(x, n, lot, cf) })
	case plan.BoundHoeffding:
		rc.Estimate = float64(x) / float64(n)
		e := Estimate{Rate: rc.Estimate, SumW2n: 1 / float64(n)}
		t.PValue = WeightedHoeffdingPValue(e, ceiling)
		upperAt = exactUpper(func(cf float64) float64 { return WeightedHoeffdingUpper(e, cf) })
	case plan.BoundChernoff:
		rc.Estimate = float64(x) / float64(n)
		t.PValue = ChernoffPValue(x, n, ceiling)
		upperAt = exactUpper(func(cf float64) float64 { return ChernoffUpper(x, n, cf) })
	case plan.BoundStratifiedCount:
		rc.Estimate = est.Rate
		s := 0
		for _, v := range counted {
			s += v
		}
		rc.CountedErrors = &s
		v, err := m.count.Count.Judge(counted)
		if err != nil {
			return rc, Test{}, inputerr.Errorf("%w: %v", ErrInput, err)
		}
		t.PValue = v.PValue
		upperAt = func(cf float64) (float64, error) {
			r, err := m.count.RuleAt(cf)
			if err != nil {
				return math.NaN(), err
			}
			v, err := r.Judge(counted)
			return v.Upper, err
		}
		t.kornGraubard = func(cf float64) float64 { return KornGraubardUpper(est, n, cf) }
	default:
		return rc, Test{}, inputerr.Errorf("%w: no judgement for bound %q", ErrInput, m.bound)
	}
	t.upper = upperAt
	if err := t.boundAt(&rc, conf); err != nil {
		return rc, Test{}, err
	}
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
		if m.meanAtCeiling > 0 && float64(x) > m.meanAtCeiling-1 {
			return byRule // beyond the binomial comparison's range
		}
		if exact {
			return byRule || t.PValue <= lv
		}
		u, err := upperAt(1 - lv)
		return byRule || (err == nil && u < ceiling)
	}
	return rc, t, nil
}

// boundAt sets the candidate's upper bound (and, under the count rule, the
// descriptive Korn–Graubard bound) at confidence cf.
func (t *Test) boundAt(rc *record.Candidate, cf float64) error {
	u, err := t.upper(cf)
	if err != nil {
		return inputerr.Errorf("%w: %v", ErrInput, err)
	}
	rc.UpperBound, rc.BoundConfidence = u, cf
	if t.kornGraubard != nil {
		kg := t.kornGraubard(cf)
		rc.KornGraubardUpper = &kg
	}
	return nil
}

func reason(rc *record.Candidate, m judgeMethod, p *plan.File, n int, level float64, d Decision) string {
	var s string
	atPlan := d.Level <= level*(1+1e-9)
	switch {
	case m.count != nil && atPlan:
		cmp := "≤"
		if !d.Accepted {
			cmp = ">"
		}
		r := m.count.Count
		s = fmt.Sprintf("%s among the %d counted items %s c = %d (stratified count rule)", errorsText(*rc.CountedErrors), r.CountedSize(), cmp, r.Accept)
	case m.count != nil:
		cmp := "≤"
		if !d.Accepted {
			cmp = ">"
		}
		s = fmt.Sprintf("%s among the %d counted items, p-value %s %s level %s (stratified count rule)", errorsText(*rc.CountedErrors), m.count.Count.CountedSize(), numfmt.PValue(rc.PValue), cmp, numfmt.PValue(d.Level))
	case m.ruleApplies && rc.Errors <= p.Rule.AcceptanceNumber:
		s = fmt.Sprintf("%s ≤ c = %d in n = %d", errorsText(rc.Errors), p.Rule.AcceptanceNumber, n)
	case m.ruleApplies && atPlan:
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

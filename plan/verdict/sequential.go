package verdict

import (
	"errors"
	"fmt"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/sequential"
)

// ErrUndecided is wrapped when the labeled items do not reach a decision
// of a sequential plan's boundaries for some candidate.
var ErrUndecided = errors.New("the sequential plan has not decided")

// JudgeSequential judges a sequential plan (in.Plan.Sequential set): for
// each candidate the items, in the order drawn, are walked through the
// plan's boundaries (sequential.Judge) and the candidate is accepted or
// rejected where they decide; items after that point do not count for it.
// The boundaries carry the plan's exact risks. Errors, the estimate
// x/t, the Clopper–Pearson bound and p-value at the stopping point t are
// the upper bound and the p-value of H0: error ≥ ceiling take the stopping
// rule into account for an unbounded stream: they are exact under the
// stage-wise ordering of outcomes (sequential.UpperBound, PValue). For a
// finite lot they are the Clopper–Pearson values at the stopping point,
// which ignore the stopping rule and are marked approximate. Multiplicity: under Bonferroni and Holm each
// candidate's boundaries are already at δ/M and decide on their own;
// under fixed-sequence the candidates are taken in declared order and
// those after the first rejection are not reached.
func JudgeSequential(in Input) (*Result, error) {
	p := in.Plan
	if p == nil || p.IsSizingOnly() || p.Sequential == nil {
		return nil, inputerr.Errorf("%w: not a sequential plan with candidates", ErrInput)
	}
	rule, err := sequential.NewRule(p.Sequential)
	if err != nil {
		return nil, inputerr.Errorf("%w: plan sequential rule: %v", ErrInput, err)
	}
	if err := in.Design.validate(); err != nil {
		return nil, err
	}
	if len(in.Design.Strata) > 1 {
		return nil, inputerr.Errorf("%w: the draw has %d strata, and a prefix of a stratified worksheet is not a simple random sample of the population, which the boundaries need", ErrStratifiedSequential, len(in.Design.Strata)).
			WithHint("draw the sequential plan without strata, or judge this draw under a fixed plan")
	}
	res := &Result{}
	level := p.Rule.PerCandidateRisk
	firstFail := ""
	for ci, c := range p.Candidates {
		errs := make([]bool, len(in.Items))
		for i, it := range in.Items {
			errs[i] = it.Missing || it.Predictions[ci] != it.Label
		}
		d, at := rule.Judge(errs)
		if d == sequential.Continue {
			return nil, inputerr.Errorf("%w: candidate %s has %s in the %d items labeled from the top, inside the boundaries; label further down the worksheet (up to %d items)",
				ErrUndecided, c.Name, errorsText(count(errs[:at])), at, rule.MaxSampleSize()).
				WithHint("'probity progress' says how many more labels each candidate can need")
		}
		sub := Input{Plan: p, Design: redesign(in.Design, in.Items[:at]), Items: in.Items[:at]}
		rc, _, err := judgeCandidate(sub, ci, judgeMethod{bound: plan.BoundClopperPearson}, level, 0)
		if err != nil {
			return nil, fmt.Errorf("candidate %s: %w", c.Name, err)
		}
		rc.StoppedAt = at
		if p.Inputs.Population == 0 {
			o := sequential.Outcome{T: at, E: count(errs[:at]), D: d}
			if rc.UpperBound, err = sequential.UpperBound(p.Sequential, o, 1-level); err != nil {
				return nil, fmt.Errorf("candidate %s: %w", c.Name, err)
			}
			if rc.PValue, err = sequential.PValue(p.Sequential, o, p.Inputs.Ceiling); err != nil {
				return nil, fmt.Errorf("candidate %s: %w", c.Name, err)
			}
		}
		switch {
		case firstFail != "" && p.Inputs.Multiplicity == plan.FixedSequence:
			rc.Verdict = record.Reject
			rc.Reason = plan.FixedSequence.NotReachedReason(firstFail)
		case d == sequential.Accept:
			rc.Verdict = record.Accept
			rc.Reason = fmt.Sprintf("%s in the first %d labels: at or below the acceptance boundary %d", errorsText(rc.Errors), at, p.Sequential.AcceptIfErrorsAtMost[at-1])
		default:
			rc.Verdict = record.Reject
			rc.Reason = fmt.Sprintf("%s in the first %d labels: at or above the rejection boundary %d", errorsText(rc.Errors), at, *p.Sequential.RejectIfErrorsAtLeast[at-1])
			if firstFail == "" {
				firstFail = rc.Name
			}
		}
		res.Candidates = append(res.Candidates, rc)
	}
	res.Overall = overall(p.Inputs.Require, res.Candidates)
	boundText := "The upper bounds and p-values are exact for the stopping rule: they order the possible stopping points stage-wise (an earlier acceptance is more favourable than a later one, a later rejection more favourable than an earlier one) and are computed by the same dynamic programme as the plan's risks."
	bound := plan.BoundSequential
	if p.Inputs.Population > 0 {
		boundText = "The upper bounds and p-values are Clopper–Pearson values at the stopping point, shown for description only: they ignore the stopping rule."
		bound = plan.BoundSequentialLot
	}
	res.Method = record.MethodInfo{Bound: bound, Approximate: bound.Approximate(), Rule: &record.AppliedRule{
		Name: record.RuleSequential, Sources: []string{}, Strata: []record.CountedStratum{},
		Reason: "one stratum: every prefix of the worksheet is a simple random sample, which the plan's sequential boundaries are computed for",
	}}
	res.Method.Statement = fmt.Sprintf(
		"Each candidate is judged by the plan's sequential boundaries, labeling from the top of the worksheet until its errors reach the acceptance or the rejection boundary (at most %d labels); the boundaries keep the false-accept risk at or below %s per candidate. %s",
		rule.MaxSampleSize(), numfmt.Chance(level), boundText)
	return res, nil
}

func count(b []bool) int {
	n := 0
	for _, x := range b {
		if x {
			n++
		}
	}
	return n
}

// redesign is d with each n_h recounted over items.
func redesign(d Design, items []Item) Design {
	out := Design{Strata: make([]Stratum, len(d.Strata))}
	copy(out.Strata, d.Strata)
	for i := range out.Strata {
		out.Strata[i].Sample = 0
	}
	for _, it := range items {
		out.Strata[it.Stratum].Sample++
	}
	return out
}

// SequentialOC is the exact OC curve of a sequential plan at points
// evenly spaced error rates from 0 to top (sequential.Evaluate, binomial
// or, for a finite lot, hypergeometric with D = round(error·N)).
func SequentialOC(p *plan.File, points int, top float64) ([]record.OCPoint, error) {
	var out []record.OCPoint
	for i := 0; i < points; i++ {
		e := top * float64(i) / float64(points-1)
		var m sequential.Model = sequential.Binomial{P: e}
		if N := p.Inputs.Population; N > 0 {
			d := int64(e*float64(N) + 0.5)
			e = float64(d) / float64(N)
			if len(out) > 0 && out[len(out)-1].Error == e {
				continue
			}
			m = sequential.Hypergeometric{N: N, D: d}
		}
		perf, err := sequential.Evaluate(p.Sequential, m)
		if err != nil {
			return nil, err
		}
		out = append(out, record.OCPoint{Error: e, AcceptProbability: perf.Accept})
	}
	return out, nil
}

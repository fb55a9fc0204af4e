package progress

import (
	"fmt"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/sequential"
)

// candRules are the stopping rules of one candidate: accept decides
// acceptance, reject decides rejection (they differ only under Holm).
type candRules struct {
	accept, reject       *sequential.Rule
	acceptWhy, rejectWhy func(t, e int) string
}

// rulesFor builds every candidate's stopping rules and the plan part of the
// result.
//
// Fixed (n, c): both rules are the curtailed plan (sequential.Curtailed).
// Under Holm the step-down can accept a candidate whose errors exceed the
// Bonferroni c (its later steps test at up to the full δ), so rejection
// stops only once the errors exceed c_δ, the largest count whose exact
// p-value is ≤ δ; acceptance still stops at c, which Holm's first step
// already accepts.
//
// Sequential: the plan's boundaries decide both (the boundaries are
// designed at the per-candidate risk δ/M', so Holm is judged as
// Bonferroni).
func rulesFor(p *plan.File) ([]candRules, *Result, error) {
	res := &Result{Design: p.Inputs.Design, Rule: record.RulePlan}
	if res.Design == plan.DesignUnset {
		res.Design = plan.DesignFixed
	}
	var out candRules
	if p.Sequential != nil {
		res.Design, res.Rule = plan.DesignSequential, record.RuleSequential
		r, err := sequential.NewRule(p.Sequential)
		if err != nil {
			return nil, nil, inputerr.Errorf("the plan's sequential rule is not valid: %w", err)
		}
		res.SampleSize = r.MaxSampleSize()
		out = candRules{accept: r, reject: r,
			acceptWhy: func(t, e int) string {
				return fmt.Sprintf("at or below the acceptance boundary (%d at t = %d)", p.Sequential.AcceptIfErrorsAtMost[t-1], t)
			},
			rejectWhy: func(t, e int) string {
				return fmt.Sprintf("at or above the rejection boundary (%d at t = %d)", *p.Sequential.RejectIfErrorsAtLeast[t-1], t)
			},
		}
	} else {
		n, c := p.Rule.SampleSize, p.Rule.AcceptanceNumber
		res.SampleSize = n
		res.AcceptanceNumber = &c
		acc, err := curtailedRule(n, c)
		if err != nil {
			return nil, nil, err
		}
		rc := c
		if p.Inputs.Multiplicity == plan.Holm && p.Inputs.CandidateCount > 1 {
			rc = holmRejectNumber(p, n, c)
		}
		rej := acc
		if rc != c {
			if rej, err = curtailedRule(n, rc); err != nil {
				return nil, nil, err
			}
		}
		out = candRules{accept: acc, reject: rej,
			acceptWhy: func(t, e int) string {
				if t == n {
					return fmt.Sprintf("at most c = %d", c)
				}
				return fmt.Sprintf("even if all %d remaining items were errors there would be %d ≤ c = %d", n-t, e+n-t, c)
			},
			rejectWhy: func(t, e int) string {
				if rc != c {
					return fmt.Sprintf("more than %d, the most any step of Holm's procedure accepts in %d labels", rc, n)
				}
				return fmt.Sprintf("more than c = %d, so the full sample of %d must reject", c, n)
			},
		}
	}
	rules := make([]candRules, len(p.Candidates))
	for i := range rules {
		rules[i] = out
	}
	return rules, res, nil
}

func curtailedRule(n, c int) (*sequential.Rule, error) {
	rr, err := sequential.Curtailed(n, c)
	if err != nil {
		return nil, inputerr.Errorf("the plan's rule n = %d, c = %d is not valid: %w", n, c, err)
	}
	return sequential.NewRule(rr)
}

// holmRejectNumber is c_δ: the largest error count x ≥ c in n labels whose
// exact p-value of "error ≥ ceiling" is at most δ = 1 − confidence (the
// level of Holm's last step), capped at n − 1.
func holmRejectNumber(p *plan.File, n, c int) int {
	delta := 1 - p.Inputs.Confidence
	pv := func(x int) float64 {
		if p.Inputs.Population > 0 {
			return plan.HypergeometricPValueAtLeast(x, n, p.Inputs.Population, p.Inputs.Ceiling)
		}
		return plan.BinomialPValueAtLeast(x, n, p.Inputs.Ceiling)
	}
	x := c
	for x+1 < n && pv(x+1) <= delta {
		x++
	}
	return x
}

package main

import (
	"probity/plan/inputerr"
	"probity/plan/planfile"
)

// refuseMeasuresRecord refuses a plan with error measures for record and
// verify: the measures are judged (plan/record/claims) but the signed PDF
// does not show them yet, and a record.json and PDF that disagree must not
// be issued. An empty path (verify without --plan) is not checked here.
func refuseMeasuresRecord(planPath string) error {
	if planPath == "" {
		return nil
	}
	p, _, err := planfile.Load(planPath)
	if err != nil {
		return err
	}
	if p.Measures == nil {
		return nil
	}
	return inputerr.Errorf("%s: the plan declares error measures (measures:); the record of measures is not yet available", planPath).
		WithHint("the signed record cannot yet show per-measure verdicts; plan without --measure to record the overall error")
}

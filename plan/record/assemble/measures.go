package assemble

import (
	"errors"
	"slices"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/measure"
	"probity/plan/record"
	"probity/plan/record/claims"
	"probity/plan/record/intake"
	"probity/sampling/drawfolder"
	"probity/templates"
)

// judgeMeasures judges a plan's measures (plan/record/claims) and puts
// them in the record: the claims, the weighted confusion matrices, the
// candidates' verdicts (all their claims accepted) and the overall one,
// and the candidate the release rule picks — none, and the record
// rejects, when the rule picks no accepted candidate. With a release rule
// the overall verdict is the release's; without one, the plan's
// requirement over the candidates (all, or any).
func judgeMeasures(rec *record.Record, p *plan.File, m *drawfolder.Manifest, checked *intake.Result) error {
	if p.Measures == nil {
		return nil
	}
	res, err := claims.Judge(p, m, checked.Items)
	if err != nil {
		return err
	}
	rec.Measures, rec.EstimatedConfusion = res.Measures, res.Confusions
	rec.MeasurePlan = &record.MeasurePlan{Positive: p.Measures.Positive, Prevalence: p.Measures.Prevalence}
	anyAccepted, allAccepted := false, true
	for j := range rec.Candidates {
		c := &rec.Candidates[j]
		if res.Accepted[j] {
			c.Verdict, c.Reason = record.Accept, "every measure claimed for it is below its ceiling"
			anyAccepted = true
		} else {
			c.Verdict, c.Reason = record.Reject, "a measure claimed for it is not shown below its ceiling"
			allAccepted = false
		}
	}
	ok := allAccepted
	if p.Inputs.Require == plan.RequireAny {
		ok = anyAccepted
	}
	if res.ReleaseRule != "" {
		rec.ReleaseRule = res.ReleaseRule
		rec.Released = &record.Released{Candidate: res.Released}
		// the decision signed is the release: accepted exactly when the
		// rule picks an accepted candidate
		ok = res.Released != ""
	}
	rec.OverallVerdict = record.Reject
	if ok {
		rec.OverallVerdict = record.Accept
	}
	rec.Method.Assumptions = append(rec.Method.Assumptions, res.Notes...)
	return nil
}

// ErrNoMissMeasure is the cause of the refusal of a safety, medical or
// vehicle use for a plan with measures that claims no measure on missed
// positives and states no reason why.
var ErrNoMissMeasure = errors.New("no claim on missed positives")

// missMeasure checks that a plan with measures judged for a safety,
// medical or vehicle use (templates.SafetyRelevant) claims a measure on
// missed positives — the false-negative rate or the false omission rate
// (measure.Measure.Critical) — or states why not: that reason is then a
// deviation of the record, returned. Without either it refuses, naming
// the plan file (planFile) and the measures it lacks.
func missMeasure(p *plan.File, planFile, use string) (string, error) {
	if p.Measures == nil || !templates.SafetyRelevant(use) {
		return "", nil
	}
	var claimed []string
	for _, c := range p.Measures.Claims {
		m, err := measure.ParseMeasure(c.Measure)
		if err != nil {
			return "", err
		}
		if m.Critical() {
			return "", nil
		}
		if !slices.Contains(claimed, c.Measure) {
			claimed = append(claimed, c.Measure)
		}
	}
	if r := strings.TrimSpace(p.Measures.NoMissMeasureReason); r != "" {
		return r, nil
	}
	return "", inputerr.At(planFile, 0, "", "a %s use needs a claim on the misses of the positive class %s (fnr or for), and the plan claims only %s",
		use, p.Measures.Positive, strings.Join(claimed, ", ")).Wrap(ErrNoMissMeasure)
}

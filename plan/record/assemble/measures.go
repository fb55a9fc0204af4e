package assemble

import (
	"probity/plan"
	"probity/plan/record"
	"probity/plan/record/claims"
	"probity/plan/record/intake"
	"probity/sampling/drawfolder"
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

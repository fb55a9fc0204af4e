package pdfreport

import (
	"strings"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/templates"
)

// fieldsOf prepares the template fields from the record, formatted for
// print.
func fieldsOf(rec *record.Record, use string) templates.Fields {
	p := rec.Plan
	f := templates.Fields{
		System:           strings.TrimSpace(rec.System),
		SystemVersion:    strings.TrimSpace(rec.SystemVersion),
		Period:           rec.Period,
		Date:             rec.Date,
		RecordID:         rec.RecordID,
		Use:              use,
		Ceiling:          numfmt.Setting(p.Ceiling),
		Confidence:       numfmt.Confidence(p.Confidence),
		FamilyRisk:       numfmt.Chance(1 - p.Confidence),
		BoundConfidence:  numfmt.Confidence(boundConfidence(rec)),
		PerCandidateRisk: numfmt.Chance(p.PerCandidateRisk),
		Candidates:       p.CandidateCount,
		Require:          p.Require.String(),
		MultiplicityRule: p.Multiplicity.String(),
		Model:            p.Model.String(),
		Rule:             p.Method.String(),
		Sequential:       p.Design == plan.DesignSequential,
		SampleSize:       p.SampleSize,
		AcceptanceNumber: p.AcceptanceNumber,
		Bound:            rec.Method.Bound.Title(),
		Approximate:      rec.Method.Approximate,
		Weighted:         rec.Method.Bound.Weighted(),
		AllowIncomplete:  rec.Deviations.AllowIncomplete,
		Stratified:       len(rec.Strata) > 1,
	}
	if f.System == "" {
		f.System = "the system under audit"
	}
	if f.Bound == "" {
		f.Bound = "stated"
	}
	if p.ConsumerRisk > 0 {
		f.ConsumerRisk = numfmt.Chance(p.ConsumerRisk)
	}
	if p.Anticipated != nil {
		f.Anticipated = numfmt.Setting(*p.Anticipated)
	}
	if p.ProducerRisk != nil {
		f.ProducerRisk = numfmt.Chance(*p.ProducerRisk)
	}
	if p.CandidateCount > 1 {
		f.Multiplicity = p.Multiplicity.Title()
	}
	if p.Population > 0 {
		f.Population = numfmt.Count(p.Population)
	}
	if r := rec.Method.Rule; r != nil && r.Name == record.RuleStratifiedCount {
		f.CountRule, f.CountedSize, f.CountAcceptance, f.Thinned = true, r.CountedSize, r.AcceptanceNumber, r.Thinned
		// the decisions judged (rounded-up shares can exceed the plan's n)
		judged := 0
		for _, s := range r.Strata {
			judged += s.Judged
		}
		f.SampleSize = judged
		for _, s := range r.Strata {
			if s.Unknown {
				f.UnknownStrata++
			}
		}
		f.ConsumerRisk, f.CountRiskBound = "", numfmt.ChanceUp(r.ConsumerRiskBound)
		if r.ProducerRisk != nil {
			f.ProducerRisk, f.AnticipatedFrom = numfmt.Chance(*r.ProducerRisk), r.AnticipatedFrom
		}
	}
	for _, c := range rec.Candidates {
		if c.BoundConfidence > 0 && c.BoundConfidence != boundConfidence(rec) {
			f.StepLevels = true
		}
	}
	if f.StepLevels {
		f.BoundConfidence = numfmt.Confidence(1 - p.PerCandidateRisk) // the first step's
	}
	if hasMeasures(rec) {
		measureFields(&f, rec)
	}
	return f
}

// boundConfidence is the per-candidate confidence of the bounds: the
// first candidate's (all share it), else 1 − the plan's per-candidate
// risk.
func boundConfidence(rec *record.Record) float64 {
	for _, c := range rec.Candidates {
		if c.BoundConfidence > 0 {
			return c.BoundConfidence
		}
	}
	return 1 - rec.Plan.PerCandidateRisk
}

// measureFields sets the fields of a record of measures: the claims'
// ceilings, their number, each claim's risk and confidence (the first
// step's under Holm), the labels drawn and the release. The overall
// error's count rule does not decide here, so its fields are cleared.
func measureFields(f *templates.Fields, rec *record.Record) {
	f.Measures, f.Claims, f.Positive = true, len(rec.Measures), positiveClass(rec)
	f.Ceiling = ceilingsText(rec)
	lo, hi := claimLevels(rec)
	f.PerCandidateRisk, f.BoundConfidence, f.StepLevels = numfmt.Chance(lo), numfmt.Confidence(1-lo), hi != lo
	f.Multiplicity = ""
	if f.Claims > 1 {
		f.Multiplicity = rec.Plan.Multiplicity.Title()
	}
	f.CountRule, f.CountRiskBound, f.AnticipatedFrom, f.ConsumerRisk, f.ProducerRisk, f.Anticipated = false, "", "", "", "", ""
	f.Weighted, f.Sequential = true, false
	f.SampleSize = 0
	for _, s := range rec.Strata {
		f.SampleSize += s.Sample
	}
	f.ReleaseRule, f.Released, f.NoRelease = rec.ReleaseFields()
}

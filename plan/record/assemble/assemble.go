// Package assemble builds an acceptance record (record.json's content)
// from a plan, a draw folder and the labeled worksheet: it runs the intake
// checks, judges every candidate and fills in the plan, the fingerprints,
// the OC curve, the deviations, the method and the sign-off. The record
// command calls it to write a record and the verify command calls it again
// to recompute one.
//
// The package computes and never prints; it reads no clock (the date is
// passed in).
package assemble

import (
	"errors"
	"fmt"
	"strings"
	"time"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/record/intake"
	"probity/plan/verdict"
	"probity/templates"
)

// OCPoints is the number of OC-curve points a record holds.
const OCPoints = 61

// Input is everything a record is built from.
type Input struct {
	Plan   *plan.File
	PlanFP string
	Folder *intake.Folder
	Labels *intake.Labels
	// AllowIncomplete counts unlabeled and unsure items as errors.
	AllowIncomplete bool
	// Bound is the bound for unequal weights (verdict.KornGraubard unless
	// set).
	Bound verdict.UnequalBound
	// Use is the declared use (templates.Uses()).
	Use string
	// Date is the record's date, YYYY-MM-DD.
	Date string
	// Signoff holds what the sign-off file gave, any roles; missing roles
	// get a blank line, missing meanings the templates' default.
	Signoff []record.Signoff
	// Templates is the wording set (nil: embedded).
	Templates *templates.Set
	// ToolVersion and SigningKey (the public key fingerprint, "" when
	// unsigned) are written into the record.
	ToolVersion string
	SigningKey  string
	// Adjust, when set, is called after the intake checks and before the
	// judgement, and may change the items' labels (e.g. to the adjudicated
	// final labels of double labeling); what it returns is stored as the
	// record's label quality.
	Adjust func(*intake.Result) (*record.LabelQuality, error)
}

// ErrInput is wrapped by errors about the assemble inputs themselves (an
// unknown use, a malformed date).
var ErrInput = errors.New("invalid record input")

// Assemble checks the inputs and builds the record. Errors from the intake
// checks are *inputerr.Error values naming the file and line.
func Assemble(in Input) (*record.Record, error) {
	if err := checkUse(in.Use); err != nil {
		return nil, err
	}
	if _, err := time.Parse("2006-01-02", in.Date); err != nil {
		return nil, inputerr.Errorf("%w: date %q is not a date in the form YYYY-MM-DD", ErrInput, in.Date)
	}
	p := in.Plan
	if p.IsSizingOnly() {
		return nil, inputerr.Errorf("%w: the plan declares no candidates, so there is nothing to judge", ErrInput)
	}
	seq := p.Sequential != nil
	checked, err := intake.Check(p, in.PlanFP, in.Folder, in.Labels, intake.Options{AllowIncomplete: in.AllowIncomplete, Prefix: seq})
	if err != nil {
		return nil, err
	}
	rec := &record.Record{
		Format: record.Format, ToolVersion: in.ToolVersion, Date: in.Date,
		Period: in.Folder.Manifest.Period, System: p.System, SystemVersion: p.SystemVersion, Use: in.Use,
		Fingerprints: checked.Fingerprints, SigningKey: in.SigningKey,
	}
	if in.Adjust != nil {
		lq, err := in.Adjust(checked)
		if err != nil {
			return nil, err
		}
		rec.LabelQuality = lq
	}
	rec.RecordID = record.ID(rec.Fingerprints, rec.LabelQuality)
	res, err := judge(p, checked, in.Bound)
	if err != nil {
		return nil, err
	}
	rec.Plan = planInfo(p, in.PlanFP, in.Folder)
	rec.Candidates = res.Candidates
	rec.OverallVerdict = res.Overall
	rec.Method = res.Method
	rec.Method.Assumptions = append(rec.Method.Assumptions, res.Notes...)
	if res.SelfWeighting && !rec.Method.Bound.Weighted() {
		if s := checked.Design.MaxWeightSpread(); s > 1e-12 {
			rec.Method.Assumptions = append(rec.Method.Assumptions, fmt.Sprintf(
				"The strata's inclusion weights N_h/n_h differ by at most %s %% through the rounding of the proportional allocation; the sample is judged as a simple random sample.",
				strings.TrimSuffix(fmt.Sprintf("%.2f", 100*s), ".00")))
		}
	}
	rec.Deviations = checked.Deviations
	for _, s := range checked.Design.Strata {
		w := 0.0
		if s.Sample > 0 {
			w = float64(s.Population) / float64(s.Sample)
		}
		rec.Strata = append(rec.Strata, record.StratumCount{Label: s.Label, Population: s.Population, Sample: s.Sample, Weight: w})
	}
	if seq {
		if rec.OC, err = verdict.SequentialOC(p, OCPoints, ocTop(p)); err != nil {
			return nil, inputerr.Errorf("%w: %v", ErrInput, err)
		}
	} else {
		for _, pt := range p.OC(OCPoints) {
			rec.OC = append(rec.OC, record.OCPoint{Error: pt.Error, AcceptProbability: pt.AcceptProbability})
		}
	}
	if rec.Signoff, err = signoff(in.Signoff, in.Templates, rec); err != nil {
		return nil, err
	}
	rec.Normalize()
	return rec, nil
}

func checkUse(use string) error {
	for _, u := range templates.Uses() {
		if u == use {
			return nil
		}
	}
	return inputerr.Errorf("%w: use %q is not one of %s", ErrInput, use, strings.Join(templates.Uses(), ", "))
}

// judge runs the verdict package on the checked items.
func judge(p *plan.File, c *intake.Result, bound verdict.UnequalBound) (*verdict.Result, error) {
	in := verdict.Input{Plan: p, Design: c.Design, Items: c.Items, UnequalBound: bound}
	if p.Sequential != nil {
		return verdict.JudgeSequential(in)
	}
	return verdict.Judge(in)
}

// ocTop is the right end of a sequential plan's OC curve: three times the
// ceiling, at most 1.
func ocTop(p *plan.File) float64 {
	return min(1, 3*p.Inputs.Ceiling)
}

// planInfo repeats the plan's rule and inputs.
func planInfo(p *plan.File, fp string, f *intake.Folder) record.PlanInfo {
	in := p.Inputs
	return record.PlanInfo{
		Fingerprint: fp, Method: in.Method, Model: p.Rule.Model, Design: in.Design,
		Multiplicity: in.Multiplicity, Require: in.Require, Ceiling: in.Ceiling, Confidence: in.Confidence,
		CandidateCount: in.CandidateCount, Anticipated: in.Anticipated, Population: in.Population,
		SampleSize: p.Rule.SampleSize, AcceptanceNumber: p.Rule.AcceptanceNumber,
		PerCandidateRisk: p.Rule.PerCandidateRisk, ConsumerRisk: p.Rule.ConsumerRisk, ProducerRisk: p.Rule.ProducerRisk,
		Seed: p.Seed, SelectionSeed: f.Manifest.SelectionSeed,
	}
}

// signoff returns the three sign-off lines in print order (prepared,
// reviewed, approved), each with its meaning (the templates' default when
// the sign-off file gave none) and blank when not given.
func signoff(given []record.Signoff, set *templates.Set, rec *record.Record) ([]record.Signoff, error) {
	if set == nil {
		var err error
		if set, err = templates.Load(""); err != nil {
			return nil, err
		}
	}
	byRole := map[string]record.Signoff{}
	for _, s := range given {
		byRole[s.Role] = s
	}
	f := templates.Fields{System: rec.System, SystemVersion: rec.SystemVersion, Period: rec.Period, Date: rec.Date, RecordID: rec.RecordID, Use: rec.Use}
	var out []record.Signoff
	for _, role := range templates.Roles() {
		s := byRole[role]
		s.Role = role
		if strings.TrimSpace(s.Meaning) == "" {
			m, err := set.SignatureMeaning(role, f)
			if err != nil {
				return nil, err
			}
			s.Meaning = strings.TrimSpace(m)
		}
		out = append(out, s)
	}
	return out, nil
}

package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/measure"
	"probity/plan/numfmt"
)

// measureOptions are plan's flags for error measures with their own
// denominators (plan/measure).
type measureOptions struct {
	measure                        []string
	prevalence, decisions, release string
	noMissReason                   string

	claims []measureFlag // parsed --measure, in order
}

// measureFlag is one --measure NAME:CEILING.
type measureFlag struct {
	m       measure.Measure
	ceiling float64
}

// addMeasureFlags adds the measures' flags to plan.
func addMeasureFlags(fl *pflag.FlagSet, m *measureOptions) {
	fl.StringArrayVar(&m.measure, "measure", nil, "certify `NAME:CEILING` for every candidate, NAME one of error, fnr, fpr, for, fdr (repeatable)")
	fl.StringVar(&m.prevalence, "prevalence", "", "with --measure: `P`, the anticipated share of true positives in the log")
	fl.StringVar(&m.decisions, "decisions", "100000", "with --measure: `N`, the decisions a period is assumed to hold (draw sizes again on the log)")
	fl.StringVar(&m.release, "release", "", "with --measure: what is released, a candidate `NAME` or best:MEASURE (the accepted candidate with the lowest estimate)")
	fl.StringVar(&m.noMissReason, "no-miss-measure-reason", "", "with --measure: `TEXT` stating why no miss measure (fnr, for) is claimed; a safety use needs one or the other")
}

// declared reports whether --measure was given.
func (m *measureOptions) declared() bool { return len(m.measure) > 0 }

// validate reads the measures' flags. Without --measure every one of them
// (and --anticipated NAME:VALUE) is refused; with it, --ceiling may be left
// out (the error's ceiling, else the smallest, stands in for the plan's
// overall rule, which the measures replace as the judgement).
func (m *measureOptions) validate(o *planOptions, changed func(string) bool) error {
	if !m.declared() {
		for _, f := range []string{"prevalence", "decisions", "release", "no-miss-measure-reason"} {
			if changed(f) {
				return inputerr.Errorf("--%s goes with --measure", f).WithHint("add --measure NAME:CEILING, e.g. --measure fnr:0.05")
			}
		}
		for _, a := range o.anticipated {
			if strings.Contains(a, ":") {
				return inputerr.Errorf("--anticipated %s names a measure, which goes with --measure", a).WithHint("add --measure NAME:CEILING, or give the anticipated overall error as a bare number")
			}
		}
		return nil
	}
	if o.budget != "" {
		return inputerr.Errorf("--measure has no effect with --budget, which makes no plan").WithHint("drop --budget to make a plan")
	}
	seen := map[measure.Measure]bool{}
	minCeiling, errCeiling := math.Inf(1), ""
	for _, spec := range m.measure {
		name, c, ok := strings.Cut(spec, ":")
		if !ok {
			return inputerr.Errorf("--measure %q is not NAME:CEILING", spec).WithHint("e.g. --measure fnr:0.05")
		}
		mm, err := measure.ParseMeasure(name)
		if err != nil {
			return inputerr.Errorf("--measure %q: %s is not one of error, fnr, fpr, for, fdr", spec, name)
		}
		if seen[mm] {
			return inputerr.Errorf("--measure %s is given twice", mm)
		}
		seen[mm] = true
		v, err := parseNumber("measure", c)
		if err != nil {
			return err
		}
		if !(v > 0 && v < 1) {
			return inputerr.Errorf("--measure %q: the ceiling must be between 0 and 1 (exclusive)", spec)
		}
		m.claims = append(m.claims, measureFlag{mm, v})
		if v < minCeiling {
			minCeiling = v
		}
		if mm == measure.Error {
			errCeiling = c
		}
	}
	if o.ceiling != "" {
		return inputerr.Errorf("--ceiling and --measure cannot be used together").WithHint("state the overall error's ceiling as --measure error:CEILING")
	}
	o.ceiling = errCeiling
	if o.ceiling == "" {
		o.ceiling = strconv.FormatFloat(minCeiling, 'g', -1, 64)
	}
	if m.prevalence == "" {
		return inputerr.Errorf("--measure needs --prevalence, the anticipated share of true positives in the log").WithHint("e.g. --prevalence 0.03")
	}
	if o.positive == "" {
		return inputerr.Errorf("--measure needs --positive, the critical class the rates are about").WithHint("e.g. --positive defect")
	}
	for _, f := range []string{"design", "population", "method"} {
		if changed(f) {
			return inputerr.Errorf("--%s does not apply to a plan with --measure (a fixed design, exact tails, periods of a log)", f)
		}
	}
	if o.candidate == nil && o.thresholds == "" {
		return inputerr.Errorf("--measure needs declared candidates").WithHint("declare them with --candidate NAME=COLUMN or --thresholds COLUMN:t1,t2,…")
	}
	return nil
}

// legacyAnticipated is the bare --anticipated number (the overall error),
// when one is given and usable for the plan's overall rule.
func (o *planOptions) legacyAnticipated() (float64, bool, error) {
	var bare []string
	for _, a := range o.anticipated {
		if !strings.Contains(a, ":") {
			bare = append(bare, a)
		}
	}
	if len(bare) == 0 {
		return 0, false, nil
	}
	if len(bare) > 1 || (!o.measures.declared() && len(o.anticipated) > 1) {
		return 0, false, inputerr.Errorf("--anticipated is given %d times", len(o.anticipated)).WithHint("give the overall error once; with --measure name the others NAME:VALUE")
	}
	if o.measures.declared() && strings.Contains(bare[0], ",") {
		return 0, false, nil // one overall error per candidate: the measures' business
	}
	p0, err := parseNumber("anticipated", bare[0])
	if err != nil {
		return 0, false, err
	}
	if o.measures.declared() {
		if c, err := strconv.ParseFloat(o.ceiling, 64); err == nil && !(p0 >= 0 && p0 < c) {
			return 0, false, nil // judged by the measures; the overall rule goes without
		}
	}
	return p0, true, nil
}

// measureFlagNames maps the fields of plan/measure's input errors to flags.
var measureFlagNames = map[string]string{
	"anticipated": "--anticipated", "measure": "--measure", "release": "--release", "prevalence": "--prevalence",
	"decisions": "--decisions", "candidates": "--candidate/--thresholds",
}

// applyMeasures sizes the measures' design and adds it to the plan file.
func applyMeasures(f *plan.File, o *planOptions) error {
	mo := &o.measures
	if !mo.declared() {
		return nil
	}
	pi, err := parseNumber("prevalence", mo.prevalence)
	if err != nil {
		return err
	}
	n, err := parseCount("decisions", mo.decisions)
	if err != nil {
		return err
	}
	spec := measure.Spec{Candidates: f.Candidates, Positive: o.positive, Prevalence: pi, Decisions: n,
		Confidence: f.Inputs.Confidence, ProducerRisk: f.Inputs.ProducerRisk, Multiplicity: f.Inputs.Multiplicity,
		Release: mo.release, NoMissMeasureReason: strings.TrimSpace(mo.noMissReason)}
	for _, a := range o.anticipated {
		if strings.Contains(a, ":") {
			spec.Anticipated = append(spec.Anticipated, a)
		} else {
			spec.Anticipated = append(spec.Anticipated, "error:"+a)
		}
	}
	// the family: every measure for every candidate, measure by measure
	for _, c := range mo.claims {
		for _, cand := range f.Candidates {
			spec.Claims = append(spec.Claims, plan.MeasureClaim{Candidate: cand.Name, Measure: c.m.String(), Ceiling: c.ceiling})
		}
	}
	ms, err := measure.BuildPlan(spec)
	if err != nil {
		return flagNames(err, measureFlagNames)
	}
	f.Measures = ms
	return nil
}

// writeMeasuresReport prints a plan with measures: the family, the design
// across the cells and the uniform sample for the same risks.
func writeMeasuresReport(w io.Writer, f *plan.File, out, fingerprint string) error {
	m := f.Measures
	saving := fmt.Sprintf("%.2f", m.Design.Saving)
	if m.Design.Saving >= 10 {
		saving = fmt.Sprintf("%.1f", m.Design.Saving)
	}
	fmt.Fprintf(w, "Label %s decisions, stratified by the candidates' predictions; a uniform sample would need %s (%s× as many).\n",
		numfmt.Count(m.Design.Total), numfmt.Count(m.Design.Uniform), saving)
	fmt.Fprintf(w, "\nClaims (positive class %q, prevalence %s, %s decisions a period assumed):\n", m.Positive, numfmt.Rate(m.Prevalence), numfmt.Count(m.Decisions))
	fmt.Fprintf(w, "  a candidate whose measure is at or above its ceiling is accepted with probability at most %s\n", numfmt.Chance(m.Design.Level))
	fmt.Fprintf(w, "  (%s over the family of %d (measure, candidate) claims: δ = %s)\n", f.Inputs.Multiplicity.Title(), m.Design.Family, numfmt.Chance(1-f.Inputs.Confidence))
	wn := len("candidate")
	for _, c := range m.Claims {
		wn = max(wn, len([]rune(c.Candidate)))
	}
	fmt.Fprintf(w, "  %-*s  %-7s  %8s  %11s  %14s\n", wn, "candidate", "measure", "ceiling", "anticipated", "producer risk")
	unplanned := 0
	for _, c := range m.Claims {
		note := ""
		if c.Unplanned {
			note, unplanned = "  expected to fail: not planned", unplanned+1
		}
		fmt.Fprintf(w, "  %-*s  %-7s  %8s  %11s  %14s%s\n", wn, c.Candidate, c.Measure, strconv.FormatFloat(c.Ceiling, 'g', -1, 64),
			strconv.FormatFloat(c.Anticipated, 'g', 4, 64), numfmt.Chance(c.ProducerRisk), note)
	}
	if unplanned > 0 {
		fmt.Fprintf(w, "  (a claim anticipated at or above its ceiling is judged on the labels the others need, keeping its risk; it is expected to be rejected)\n")
	}
	fmt.Fprintf(w, "\nDesign across the strata every candidate predicts alike (anticipated):\n")
	wl := len("stratum")
	for _, c := range m.Cells {
		wl = max(wl, len([]rune(c.Label)))
	}
	fmt.Fprintf(w, "  %-*s  %10s  %10s  %7s  %8s\n", wl, "stratum", "decisions", "positives", "labels", "uniform")
	for _, c := range m.Cells {
		fmt.Fprintf(w, "  %-*s  %10s  %10s  %7s  %8s\n", wl, c.Label, numfmt.Count(c.Decisions), numfmt.Count(c.Positives), numfmt.Count(c.Sample), numfmt.Count(c.Uniform))
	}
	fmt.Fprintf(w, "  %-*s  %10s  %10s  %7s  %8s\n", wl, "total", "", "", numfmt.Count(m.Design.Total), numfmt.Count(m.Design.Uniform))
	fmt.Fprintf(w, "anticipated: %s, prevalence %s; assumes %s\n", strings.Join(m.Anticipated, " "), strconv.FormatFloat(m.Prevalence, 'g', -1, 64), m.Assumes)
	for _, c := range m.Cells {
		if float64(c.Decisions) < 0.0001*float64(m.Decisions) && len(f.Candidates) > 1 && f.Candidates[0].ScoreColumn != "" {
			fmt.Fprintf(w, "note: the anticipated values leave %s (almost) empty, as equal values for every threshold do; a log whose bands are not empty will need other labels than these\n", c.Label)
			fmt.Fprintf(w, "hint: give one value per threshold, in declared order, e.g. --anticipated fnr:V1,V2,… --anticipated error:V1,V2,…\n")
			break
		}
	}
	fmt.Fprintf(w, "draw carries this design to the log's actual strata (crossed with --strata), adding labels only where a claim's power there needs them.\n")
	switch r := m.Release; {
	case r == "":
		fmt.Fprintf(w, "release: none declared (the record names no candidate for release)\n")
	case strings.HasPrefix(r, "best:"):
		fmt.Fprintf(w, "release: the accepted candidate with the lowest estimated %s\n", strings.TrimPrefix(r, "best:"))
	default:
		fmt.Fprintf(w, "release: %s, if it is accepted\n", r)
	}
	if m.NoMissMeasureReason != "" {
		fmt.Fprintf(w, "no miss measure (fnr, for) claimed: %s\n", m.NoMissMeasureReason)
	}
	if out != "" {
		fmt.Fprintf(w, "plan written to %s (sha256 %s)\n", out, fingerprint)
	}
	return nil
}

package main

import (
	"errors"
	"fmt"

	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/record/assemble"
)

// noMissMeasureHint completes the refusal of a safety, medical or vehicle
// use for a plan with measures that claims neither fnr nor for and
// states no reason why.
func noMissMeasureHint(err error, use string) error {
	if !errors.Is(err, assemble.ErrNoMissMeasure) {
		return err
	}
	return inputerr.SetHint(err, "plan again with --measure fnr:CEILING (or for:CEILING), or state why the plan needs none with "+
		"--no-miss-measure-reason TEXT; or record with the --use the decisions really serve (not "+use+")")
}

// writeMeasuresSummary prints a record of measures: a table of the
// claims (candidate, measure, ceiling, estimate, upper bound rounded up,
// verdict), each candidate's verdict and the release.
func writeMeasuresSummary(d deps, rec *record.Record) {
	w := d.stdout
	cw, mw := len("candidate"), len("measure")
	lo, hi := 1.0, 0.0
	for _, m := range rec.Measures {
		cw, mw = max(cw, len([]rune(m.Candidate))), max(mw, len(m.Measure))
		lo, hi = min(lo, m.Level), max(hi, m.Level)
	}
	conf := "one-sided at " + numfmt.Confidence(1-lo)
	if lo != hi {
		conf = "at each claim's confidence"
	}
	fmt.Fprintf(w, "measures for the positive class %q, upper bounds %s, rounded up:\n", positiveOf(rec), conf)
	fmt.Fprintf(w, "  %-*s  %-*s  %8s  %9s  %11s  %s\n", cw, "candidate", mw, "measure", "ceiling", "estimate", "upper bound", "verdict")
	for _, m := range rec.Measures {
		est := "undefined"
		if m.Estimate != nil {
			est = numfmt.Rate(*m.Estimate)
		}
		line := fmt.Sprintf("  %-*s  %-*s  %8s  %9s  %11s  %s", cw, m.Candidate, mw, m.Measure, numfmt.Setting(m.Ceiling), est, numfmt.RateUp(m.UpperBound), m.Verdict)
		if lo != hi {
			line += " (" + numfmt.Confidence(1-m.Level) + ")"
		}
		if !m.Planned {
			line += " (not planned)"
		}
		fmt.Fprintln(w, line)
	}
	for _, c := range rec.Candidates {
		fmt.Fprintf(w, "%s %s: %s\n", c.Name, c.Verdict, c.Reason)
	}
	if s := rec.ReleaseStatement(); s != "" {
		fmt.Fprintln(w, s)
	}
	fmt.Fprintf(w, "overall: %s\n", rec.OverallVerdict)
	if r := rec.Deviations.NoMissMeasure; r != "" {
		fmt.Fprintf(w, "deviation: no claim on missed positives (fnr or for) for a %s use; the plan states why: %s\n", rec.Use, r)
	}
}

// positiveOf is the record's positive class.
func positiveOf(rec *record.Record) string {
	if rec.MeasurePlan != nil {
		return rec.MeasurePlan.Positive
	}
	return ""
}

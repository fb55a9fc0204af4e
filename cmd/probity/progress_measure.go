package main

import (
	"encoding/json"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/progress"
	"probity/plan/sequential"
	"probity/sampling/drawfolder"
)

// progressMeasuresReport is the --json output for a plan with measures.
type progressMeasuresReport struct {
	Plan            string `json:"plan"`
	PlanFingerprint string `json:"plan_fingerprint"`
	Labels          string `json:"labels"`
	Period          string `json:"period"`
	*progress.MeasuresResult
}

// runProgressMeasures assesses a plan with measures claim by claim.
func runProgressMeasures(d deps, opts *progressOptions, fingerprint string, in progress.Input, m *drawfolder.Manifest) error {
	res, err := progress.AssessMeasures(in, m)
	if err != nil {
		return err
	}
	if opts.json {
		enc := json.NewEncoder(d.stdout)
		enc.SetEscapeHTML(false)
		enc.SetIndent("", "  ")
		return enc.Encode(progressMeasuresReport{Plan: opts.planPath, PlanFingerprint: fingerprint, Labels: opts.labels, Period: m.Period, MeasuresResult: res})
	}
	writeProgressMeasures(d.stdout, in.Plan, res)
	return nil
}

// writeProgressMeasures prints the claims' states.
func writeProgressMeasures(w io.Writer, p *plan.File, res *progress.MeasuresResult) {
	fmt.Fprintf(w, "Plan with measures: %s labels; each claim counts the items the draw fixed for it and is decided only when no completion of its remaining counted labels can change its verdict (%s).\n",
		numfmt.Count(res.SampleSize), p.Inputs.Multiplicity.Title())
	fmt.Fprintf(w, "Labeled from the top: %s of %s.\n\n", numfmt.Count(res.Labeled), numfmt.Count(res.SampleSize))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "candidate\tclaim\tlabeled/counted\tevents\tdecision")
	ratio := false
	for _, c := range res.Claims {
		lab := fmt.Sprintf("%s/%s", numfmt.Count(c.Labeled), numfmt.Count(c.Counted))
		ev := numfmt.Count(c.Events)
		if c.CountedOther > 0 {
			ratio = true
			lab += fmt.Sprintf("; %s/%s", numfmt.Count(c.LabeledOther), numfmt.Count(c.CountedOther))
			ev += "; " + numfmt.Count(c.EventsOther)
		}
		fmt.Fprintf(tw, "%s\t%s < %s\t%s\t%s\t%s\n", c.Candidate, c.Measure, numfmt.Setting(c.Ceiling), lab, ev, measureStatus(c))
	}
	tw.Flush()
	fmt.Fprintln(w, "events: wrong decisions (error), misses among the predicted negatives (fnr, for), false alarms")
	fmt.Fprintln(w, "    among the predicted positives (fpr, fdr)")
	if ratio {
		fmt.Fprintln(w, "after \";\": a ratio's other side, the false alarms (fnr) or misses (fpr) its denominator counts")
	}
	fmt.Fprintln(w)
	var cands []string
	for _, c := range res.Candidates {
		cands = append(cands, fmt.Sprintf("%s %s", c.Name, progressStatusWord(c.Decision)))
	}
	fmt.Fprintf(w, "Candidates: %s.\n", strings.Join(cands, "; "))
	switch {
	case res.Release == "":
	case !res.ReleaseDecided:
		fmt.Fprintf(w, "Release (%s): not decided yet.\n", res.Release)
	case res.Released == "":
		fmt.Fprintf(w, "Release (%s): decided — no candidate qualifies.\n", res.Release)
	default:
		fmt.Fprintf(w, "Release (%s): decided — %s.\n", res.Release, res.Released)
	}
	if res.MaxRemaining > 0 {
		fmt.Fprintf(w, "Continue: at most %s more %s from the top label every counted item of the undecided claims.\n", numfmt.Count(res.MaxRemaining), map[bool]string{true: "label", false: "labels"}[res.MaxRemaining == 1])
	} else {
		fmt.Fprintln(w, "Every claim is decided; run probity record on the labels to issue the record.")
	}
	for _, n := range res.Notes {
		fmt.Fprintf(w, "Note: %s.\n", strings.TrimSuffix(n, "."))
	}
}

// measureStatus is a claim's printed decision.
func measureStatus(c progress.MeasureClaim) string {
	switch c.Decision {
	case sequential.Accept:
		if c.Labeled+c.LabeledOther < c.Counted+c.CountedOther {
			return "accept: cannot fail"
		}
		return "accept"
	case sequential.Reject:
		if c.Labeled+c.LabeledOther < c.Counted+c.CountedOther {
			return "reject: cannot pass"
		}
		return "reject"
	}
	return "continue"
}

// progressStatusWord is a candidate's decision in one word.
func progressStatusWord(d sequential.Decision) string {
	switch d {
	case sequential.Accept:
		return "accepted"
	case sequential.Reject:
		return "rejected"
	}
	return "open"
}

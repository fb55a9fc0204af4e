package main

import (
	"fmt"
	"io"
	"text/tabwriter"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/measure"
	"probity/plan/numfmt"
	"probity/plan/record/claims"
	"probity/sampling"
	"probity/sampling/drawfolder"
)

// addDrawMeasures stratifies a draw for a plan with measures by the
// candidates' predictions (after the user's strata) and allocates by the
// plan's design on the log's strata; an allocation flag is refused, since
// the design decides n_h.
func addDrawMeasures(o *drawOptions, in *sampling.DrawInput) error {
	if in.Plan.Measures == nil {
		return nil
	}
	if o.allocationSet || o.minPerSet || o.roundingSet {
		return inputerr.Errorf("--allocation, --rounding and --min-per-stratum do not apply to a plan with measures: its design decides each stratum's labels")
	}
	return flagNames(sampling.AddPredictionStrata(in), map[string]string{"strata_columns": "--strata", "bands": "--band"})
}

// refuseSQLMeasures refuses a draw inside a database for a plan with
// measures: the queries do not yet stratify by the candidates' predictions
// with the design's allocation.
func refuseSQLMeasures(p *plan.File) error {
	if p.Measures == nil {
		return nil
	}
	return inputerr.Errorf("a plan with measures cannot yet be drawn inside a database").WithHint("export the table and draw from the file: probity draw --plan PLAN --log EXPORT.csv --out DIR")
}

// writeDrawMeasures prints, before any label, how each claim of a plan
// with measures will be judged: its counted items per side, the counts it
// accepts (fixed now) and its exact producer's risk at the composition
// the plan anticipates; then the design's labels against a uniform
// sample's for the same risks.
func writeDrawMeasures(w io.Writer, p *plan.File, m *drawfolder.Manifest) error {
	pop, err := claims.Population(p, m)
	if err != nil {
		return err
	}
	designs, planned, err := claims.Designs(p, m)
	if err != nil {
		return err
	}
	mi := m.Measures
	fmt.Fprintf(w, "verdict: each claim by its own exact test on the items counted for it, at level %s (%s); fixed now, before any label\n",
		numfmt.Chance(mi.Level), p.Inputs.Multiplicity.Title())
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  candidate\tclaim\tcounted\taccepts at most\tproducer's risk")
	for i, cd := range designs {
		ca, err := claims.AcceptanceNumber(pop, cd, mi.Level)
		if err != nil {
			return err
		}
		na, nb := 0, 0
		for h, k := range cd.Counted {
			if claimNumerator(cd.Measure, pop.Candidates[cd.Candidate].Positive[h]) {
				na += k
			} else {
				nb += k
			}
		}
		counted := numfmt.Count(na)
		acc := "no count passes"
		if ca >= 0 {
			acc = fmt.Sprintf("%s %s", numfmt.Count(ca), measureEvents(cd.Measure))
		}
		if cd.Measure.Ratio() {
			counted += "; " + numfmt.Count(nb)
			if ca >= 0 && cd.BAccept >= 0 {
				acc += fmt.Sprintf("; %s %s", numfmt.Count(cd.BAccept), measureOtherEvents(cd.Measure))
			}
		}
		risk := numfmt.Chance(mi.Claims[i].ProducerRisk)
		if !planned[i] {
			risk += " (not sized for)"
		}
		fmt.Fprintf(tw, "  %s\t%s < %s\t%s\t%s\t%s\n", p.Candidates[cd.Candidate].Name, cd.Measure, numfmt.Setting(cd.Ceiling), counted, acc, risk)
	}
	tw.Flush()
	fmt.Fprintln(w, "  counted: the first items of each of the claim's strata, in worksheet order; after \";\"")
	fmt.Fprintln(w, "  a ratio's denominator side (fnr: false alarms among the flagged; fpr: misses among the cleared)")
	switch {
	case mi.Uniform > m.SampleSize:
		fmt.Fprintf(w, "design: %s labels; a uniform sample would need %s for the same risks (%.1f× as many)\n",
			numfmt.Count(m.SampleSize), numfmt.Count(mi.Uniform), float64(mi.Uniform)/float64(m.SampleSize))
	case mi.Uniform > 0:
		fmt.Fprintf(w, "design: %s labels; a uniform sample would need %s for the same risks on this log's strata\n",
			numfmt.Count(m.SampleSize), numfmt.Count(mi.Uniform))
	default:
		fmt.Fprintf(w, "design: %s labels\n", numfmt.Count(m.SampleSize))
	}
	return nil
}

// claimNumerator reports whether a stratum the candidate predicts
// positive (pos) or negative is on the claim's numerator side.
func claimNumerator(m measure.Measure, pos bool) bool {
	switch m {
	case measure.FOR, measure.FNR:
		return !pos
	case measure.FDR, measure.FPR:
		return pos
	}
	return true
}

// measureEvents names what a claim's numerator side counts.
func measureEvents(m measure.Measure) string {
	switch m {
	case measure.FNR, measure.FOR:
		return "misses"
	case measure.FPR, measure.FDR:
		return "false alarms"
	}
	return "wrong"
}

// measureOtherEvents names a ratio's denominator side's complement events.
func measureOtherEvents(m measure.Measure) string {
	if m == measure.FNR {
		return "false alarms"
	}
	return "misses"
}

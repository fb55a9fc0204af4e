package main

import (
	"encoding/json"
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

// drawMeasures is what a draw for a plan with measures fixes before any
// label, as draw prints it and --json writes it.
type drawMeasures struct {
	// Level is each claim's share of δ; Multiplicity how δ is shared.
	Level        float64 `json:"level"`
	Multiplicity string  `json:"multiplicity"`
	// Labels is the design's sample; Uniform what a uniform sample would
	// need for the same claims on this log's strata (0 when none is
	// planned).
	Labels  int                `json:"labels"`
	Uniform int                `json:"uniform"`
	Claims  []drawMeasureClaim `json:"claims"`
}

// drawMeasureClaim is one claim's test, fixed before any label.
type drawMeasureClaim struct {
	Candidate string  `json:"candidate"`
	Measure   string  `json:"measure"`
	Ceiling   float64 `json:"ceiling"`
	// Counted items of the claim's strata (its numerator's side), and of
	// a ratio's denominator side.
	Counted      int `json:"counted"`
	CountedOther int `json:"counted_other"`
	// AcceptEvents is the most events among the counted items that pass
	// (−1: none passes); AcceptOther a ratio's most complement events on
	// its other side (null for a proportion).
	AcceptEvents int  `json:"accept_events"`
	AcceptOther  *int `json:"accept_other"`
	// ProducerRisk is the exact chance of rejection at the composition the
	// plan anticipates; Planned is false when the design was not sized for
	// the claim on this log.
	ProducerRisk float64 `json:"producer_risk"`
	Planned      bool    `json:"planned"`
}

// drawMeasuresOf works out each claim's test from the plan and the
// manifest (claims.AcceptanceNumber: plan/measure's judgement).
func drawMeasuresOf(p *plan.File, m *drawfolder.Manifest) (*drawMeasures, error) {
	pop, err := claims.Population(p, m)
	if err != nil {
		return nil, err
	}
	designs, planned, err := claims.Designs(p, m)
	if err != nil {
		return nil, err
	}
	mi := m.Measures
	out := &drawMeasures{Level: mi.Level, Multiplicity: p.Inputs.Multiplicity.String(), Labels: m.SampleSize, Uniform: mi.Uniform}
	for i, cd := range designs {
		ca, err := claims.AcceptanceNumber(pop, cd, mi.Level)
		if err != nil {
			return nil, err
		}
		c := drawMeasureClaim{Candidate: p.Candidates[cd.Candidate].Name, Measure: cd.Measure.String(), Ceiling: cd.Ceiling,
			AcceptEvents: ca, ProducerRisk: mi.Claims[i].ProducerRisk, Planned: planned[i]}
		for h, k := range cd.Counted {
			if cd.Measure.OnNumerator(pop.Candidates[cd.Candidate].Positive[h]) {
				c.Counted += k
			} else {
				c.CountedOther += k
			}
		}
		if cd.Measure.Ratio() {
			b := cd.BAccept
			c.AcceptOther = &b
		}
		out.Claims = append(out.Claims, c)
	}
	return out, nil
}

// writeDrawMeasures prints, before any label, how each claim of a plan
// with measures will be judged: its counted items per side, the counts it
// accepts (fixed now) and its exact producer's risk at the composition
// the plan anticipates; then the design's labels against a uniform
// sample's for the same risks.
func writeDrawMeasures(w io.Writer, p *plan.File, m *drawfolder.Manifest) error {
	dm, err := drawMeasuresOf(p, m)
	if err != nil {
		return err
	}
	fmt.Fprintf(w, "verdict: each claim by its own exact test on the items counted for it, at level %s (%s); fixed now, before any label\n",
		numfmt.Chance(dm.Level), p.Inputs.Multiplicity.Title())
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  candidate\tclaim\tcounted\taccepts at most\tproducer's risk")
	for _, c := range dm.Claims {
		mm, _ := measure.ParseMeasure(c.Measure)
		counted := numfmt.Count(c.Counted)
		acc := "no count passes"
		if c.AcceptEvents >= 0 {
			acc = fmt.Sprintf("%s %s", numfmt.Count(c.AcceptEvents), measureEvents(mm))
		}
		if c.AcceptOther != nil {
			counted += "; " + numfmt.Count(c.CountedOther)
			if c.AcceptEvents >= 0 && *c.AcceptOther >= 0 {
				acc += fmt.Sprintf("; %s %s", numfmt.Count(*c.AcceptOther), measureOtherEvents(mm))
			}
		}
		risk := numfmt.Chance(c.ProducerRisk)
		if !c.Planned {
			risk += " (not sized for)"
		}
		fmt.Fprintf(tw, "  %s\t%s < %s\t%s\t%s\t%s\n", c.Candidate, c.Measure, numfmt.Setting(c.Ceiling), counted, acc, risk)
	}
	tw.Flush()
	fmt.Fprintln(w, "  counted: the first items of each of the claim's strata, in worksheet order; after \";\"")
	fmt.Fprintln(w, "  a ratio's denominator side (fnr: false alarms among the flagged; fpr: misses among the cleared)")
	switch {
	case dm.Uniform > dm.Labels:
		fmt.Fprintf(w, "design: %s labels; a uniform sample would need %s for the same risks (%.1f× as many)\n",
			numfmt.Count(dm.Labels), numfmt.Count(dm.Uniform), float64(dm.Uniform)/float64(dm.Labels))
	case dm.Uniform > 0:
		fmt.Fprintf(w, "design: %s labels; a uniform sample would need %s for the same risks on this log's strata\n",
			numfmt.Count(dm.Labels), numfmt.Count(dm.Uniform))
	default:
		fmt.Fprintf(w, "design: %s labels\n", numfmt.Count(dm.Labels))
	}
	return nil
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

// drawReport is draw's --json output.
type drawReport struct {
	Folder        string                   `json:"folder"`
	SampleSize    int                      `json:"sample_size"`
	Spares        int                      `json:"spares"`
	LotSize       int64                    `json:"lot_size"`
	Period        string                   `json:"period"`
	SelectionSeed string                   `json:"selection_seed"`
	Allocation    string                   `json:"allocation"`
	Strata        []drawfolder.StratumInfo `json:"strata"`
	// Measures is each claim's test for a plan with measures (null
	// otherwise).
	Measures *drawMeasures `json:"measures"`
}

// writeDrawJSON prints the draw as one JSON object.
func writeDrawJSON(w io.Writer, dir string, p *plan.File, m *drawfolder.Manifest) error {
	rep := drawReport{Folder: dir, SampleSize: m.SampleSize, Spares: m.Spares, LotSize: m.LotSize, Period: m.Period,
		SelectionSeed: m.SelectionSeed, Allocation: m.Allocation.Rule, Strata: m.Strata}
	if p.Measures != nil && m.Measures != nil {
		dm, err := drawMeasuresOf(p, m)
		if err != nil {
			return err
		}
		rep.Measures = dm
	}
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	return enc.Encode(rep)
}

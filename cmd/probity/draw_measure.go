package main

import (
	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
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

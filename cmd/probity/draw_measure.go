package main

import (
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

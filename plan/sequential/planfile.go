package sequential

import (
	"errors"
	"fmt"

	"probity/plan"
)

// Errors of Apply that name an input the sequential design needs.
var (
	// ErrNeedsAnticipated: the design is searched between the anticipated
	// error and the ceiling, so it needs an anticipated error.
	ErrNeedsAnticipated = errors.New("a sequential design needs an anticipated error")
	// ErrNeedsExact: the boundaries are judged by exact probabilities, so
	// the method must be exact.
	ErrNeedsExact = errors.New("a sequential design uses the exact method")
)

// Apply designs the sequential plan for a plan file whose Rule holds the
// fixed (n, c) plan (as plan.Build makes it) and turns the file into a
// sequential plan: Sequential gets the boundaries (and the fixed plan's n
// and c for comparison), Rule.SampleSize becomes the truncation point T —
// the number of items a draw must select — Rule.AcceptanceNumber the final
// acceptance number a_T, and Rule.ConsumerRisk and Rule.ProducerRisk the
// sequential plan's exact risks. The per-candidate risk is unchanged
// (δ/M' under the plan's multiplicity rule). Inputs.Design is set to
// plan.DesignSequential.
func Apply(f *plan.File, maxSampleSize int) (*Design, error) {
	if f.Inputs.Anticipated == nil {
		return nil, ErrNeedsAnticipated
	}
	if f.Inputs.Method != plan.MethodUnset && f.Inputs.Method != plan.MethodExact {
		return nil, fmt.Errorf("%w, not %s", ErrNeedsExact, f.Inputs.Method)
	}
	spec := Spec{
		Ceiling:         f.Inputs.Ceiling,
		Anticipated:     *f.Inputs.Anticipated,
		ConsumerRisk:    f.Rule.PerCandidateRisk,
		ProducerRisk:    f.Inputs.ProducerRisk,
		FixedSampleSize: f.Rule.SampleSize,
		MaxSampleSize:   maxSampleSize,
	}
	if f.Inputs.Population > 0 {
		spec.Population = f.Inputs.Population
		spec.BadLotErrors = f.Rule.BadLotErrors
		spec.GoodLotErrors = f.Rule.GoodLotErrors
	}
	d, err := Search(spec)
	if err != nil {
		return nil, err
	}
	d.Rule.FixedSampleSize = f.Rule.SampleSize
	d.Rule.FixedAcceptanceNumber = f.Rule.AcceptanceNumber
	f.Sequential = d.Rule
	f.Inputs.Design = plan.DesignSequential
	f.Rule.SampleSize = d.Rule.MaxSampleSize
	f.Rule.AcceptanceNumber = d.FinalAcceptance
	f.Rule.ConsumerRisk = d.ConsumerRisk
	pr := d.ProducerRisk
	f.Rule.ProducerRisk = &pr
	return d, nil
}

package plan

import (
	"errors"
	"fmt"
	"math"
)

// Measures is the part of a plan that certifies error measures with their
// own denominators (plan/measure): the declared positive (critical) class,
// the family of claims (a measure of a candidate below its ceiling), what
// the plan anticipates, the release rule declared before any label and
// the design that meets every claim. plan/measure computes it and
// rechecks it (measure.Recheck); this package only carries it, since the
// measures' statistics live there.
type Measures struct {
	// Positive is the positive (critical) class; the rates are one-vs-rest
	// for it.
	Positive string `yaml:"positive" json:"positive"`
	// Prevalence is the anticipated share of true positives in the log.
	Prevalence float64 `yaml:"prevalence" json:"prevalence"`
	// Decisions is the number of decisions a period is assumed to hold
	// when the plan is made; draw carries the design to the log's
	// actual strata.
	Decisions int64 `yaml:"decisions" json:"decisions"`
	// Claims is the family, in declared order: every measure for every
	// candidate.
	Claims []MeasureClaim `yaml:"claims" json:"claims"`
	// Anticipated lists the anticipated values as given, NAME:VALUE with
	// one value or one per candidate.
	Anticipated []string `yaml:"anticipated,omitempty" json:"anticipated,omitempty"`
	// Release is the release rule declared before any label: a candidate's
	// name, "best:MEASURE" (the accepted candidate with the lowest
	// estimate of MEASURE), or empty (no candidate is named for release).
	Release string `yaml:"release,omitempty" json:"release,omitempty"`
	// NoMissMeasureReason states why the plan claims no measure on the
	// critical error type (fnr, for); a safety use needs either such a
	// measure or this reason.
	NoMissMeasureReason string `yaml:"no_miss_measure_reason,omitempty" json:"no_miss_measure_reason,omitempty"`
	// Assumes states how the cells' anticipated composition follows from
	// the anticipated values (nested thresholds; label-column candidates
	// independent given the truth).
	Assumes string `yaml:"assumes,omitempty" json:"assumes,omitempty"`
	// Cells are the strata the plan sizes on: the decisions every candidate
	// predicts alike, with their anticipated shares and positives.
	Cells []MeasureCell `yaml:"cells" json:"cells"`
	// Design is the smallest design meeting every claim on the cells.
	Design MeasureDesign `yaml:"design" json:"design"`
}

// MeasureClaim is one claim of the family.
type MeasureClaim struct {
	Candidate string  `yaml:"candidate" json:"candidate"`
	Measure   string  `yaml:"measure" json:"measure"`
	Ceiling   float64 `yaml:"ceiling" json:"ceiling"`
	// Anticipated is the claim's value at the anticipated composition.
	Anticipated float64 `yaml:"anticipated" json:"anticipated"`
	// ProducerRisk is the exact chance the claim is rejected at the
	// anticipated composition, under the design.
	ProducerRisk float64 `yaml:"producer_risk" json:"producer_risk"`
	// Unplanned is true when the anticipated value is at or above the
	// ceiling: the claim is judged on what the design labels for the
	// others and is expected to be rejected.
	Unplanned bool `yaml:"unplanned,omitempty" json:"unplanned,omitempty"`
	// Design is how the claim is judged on the plan's cells, and Uniform
	// how it is judged on the uniform sample, with UniformProducerRisk
	// its exact chance of rejection there: what plan/measure rechecks a
	// loaded plan by, and what draw carries to a log's strata.
	Design              MeasureClaimDesign `yaml:"design" json:"design"`
	Uniform             MeasureClaimDesign `yaml:"uniform" json:"uniform"`
	UniformProducerRisk float64            `yaml:"uniform_producer_risk" json:"uniform_producer_risk"`
}

// MeasureClaimDesign is how a claim is judged on a labeled sample of the
// plan's cells: the labeled items of each cell it counts (in cell order)
// and, for a ratio (fnr, fpr), its floor b₀ and the acceptance number c_B
// of its denominator's side (0 for a proportion).
type MeasureClaimDesign struct {
	Counted []int `yaml:"counted,flow" json:"counted"`
	Floor   int64 `yaml:"floor,omitempty" json:"floor,omitempty"`
	BAccept int   `yaml:"b_accept,omitempty" json:"b_accept,omitempty"`
}

// MeasureCell is one stratum of the plan's design: the decisions every
// candidate predicts alike. Flagged lists the candidates predicting the
// positive class there.
type MeasureCell struct {
	Label     string   `yaml:"label" json:"label"`
	Flagged   []string `yaml:"flagged,flow" json:"flagged"`
	Decisions int64    `yaml:"decisions" json:"decisions"`
	Positives int64    `yaml:"positives" json:"positives"`
	// Sample is the design's n_h; Uniform is the uniform sample's.
	Sample  int `yaml:"sample" json:"sample"`
	Uniform int `yaml:"uniform" json:"uniform"`
}

// MeasureDesign is the size of the design and of the uniform sample for
// the same risks.
type MeasureDesign struct {
	// Family is the number of (measure, candidate) claims the risk is
	// shared over, and Level each claim's share of δ.
	Family int     `yaml:"family" json:"family"`
	Level  float64 `yaml:"level" json:"level"`
	// Total is the design's labels; Uniform the uniform sample's (the
	// smallest proportional allocation meeting the same claims); Saving
	// is Uniform/Total.
	Total   int     `yaml:"total" json:"total"`
	Uniform int     `yaml:"uniform" json:"uniform"`
	Saving  float64 `yaml:"saving" json:"saving"`
}

// ErrMeasures is wrapped by every structural error in a plan's measures.
var ErrMeasures = errors.New("invalid measures in the plan")

// validate checks what later steps rely on before plan/measure rechecks
// the numbers.
func (m *Measures) validate(f *File) error {
	if m.Positive == "" {
		return fmt.Errorf("measures.positive is empty")
	}
	if !(m.Prevalence > 0 && m.Prevalence < 1) {
		return fmt.Errorf("measures.prevalence %v is outside (0, 1)", m.Prevalence)
	}
	if m.Decisions < 2 {
		return fmt.Errorf("measures.decisions %d is below 2", m.Decisions)
	}
	if len(m.Claims) == 0 {
		return fmt.Errorf("measures.claims is empty")
	}
	names := map[string]bool{}
	for _, c := range f.Candidates {
		names[c.Name] = true
	}
	for i, c := range m.Claims {
		if !names[c.Candidate] {
			return fmt.Errorf("measures.claims[%d].candidate %q is not a declared candidate", i, c.Candidate)
		}
		if !(c.Ceiling > 0 && c.Ceiling < 1) || math.IsNaN(c.Ceiling) {
			return fmt.Errorf("measures.claims[%d].ceiling %v is outside (0, 1)", i, c.Ceiling)
		}
	}
	if len(m.Cells) == 0 {
		return fmt.Errorf("measures.cells is empty")
	}
	for i, c := range m.Cells {
		if c.Decisions < 1 || c.Positives < 0 || c.Positives > c.Decisions || c.Sample < 0 || int64(c.Sample) > c.Decisions {
			return fmt.Errorf("measures.cells[%d] (%s) has impossible counts", i, c.Label)
		}
		for _, n := range c.Flagged {
			if !names[n] {
				return fmt.Errorf("measures.cells[%d].flagged names %q, not a declared candidate", i, n)
			}
		}
	}
	return nil
}

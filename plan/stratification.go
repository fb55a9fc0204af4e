package plan

import (
	"fmt"
	"math"
)

// Stratification is the stratified design a plan was sized for (the
// plan file's stratification key; nil for a plan sized for a simple random
// sample). Such a plan's Rule holds the sample size n of the design and the
// stratified count rule's acceptance number and risks on the planned
// strata; the draw allocates n as stated here and states the rule again
// on the strata it finds.
type Stratification struct {
	// Allocation is proportional, equal or neyman; MinPerStratum the
	// minimum per stratum (applied when the sample has room for it);
	// Rounding how proportional shares are rounded (up or
	// largest-remainder).
	Allocation    string `yaml:"allocation"`
	MinPerStratum int    `yaml:"min_per_stratum"`
	Rounding      string `yaml:"rounding,omitempty"`
	// Strata are the planned strata: their labels, sizes N_h (or, given as
	// shares, the sizes of a nominal population) and anticipated error
	// rates.
	Strata []PlannedStratum `yaml:"strata"`
	// Sample and Counted are n_h and the counted k_h per stratum at the
	// plan's n, in the order of Strata.
	Sample  []int `yaml:"sample,flow"`
	Counted []int `yaml:"counted,flow"`
	// SimpleRandomSampleSize is the n a simple random sample would need for
	// the same risks (the plan before the design was known).
	SimpleRandomSampleSize int `yaml:"simple_random_sample_size"`
}

// PlannedStratum is one stratum of a planned design.
type PlannedStratum struct {
	Label       string  `yaml:"label"`
	Population  int64   `yaml:"population"`
	Anticipated float64 `yaml:"anticipated"`
}

// validate checks the section's structure (errors name the field, for
// File.Check to locate).
func (s *Stratification) validate(n int) error {
	if len(s.Strata) < 2 {
		return fieldErr("stratification.strata", "lists %d strata (at least 2)", len(s.Strata))
	}
	switch s.Allocation {
	case "proportional", "equal", "neyman":
	default:
		return fieldErr("stratification.allocation", "%q is not proportional, equal or neyman", s.Allocation)
	}
	if s.MinPerStratum < 0 {
		return fieldErr("stratification.min_per_stratum", "%d is negative", s.MinPerStratum)
	}
	seen := map[string]bool{}
	for i, st := range s.Strata {
		if st.Label == "" || seen[st.Label] {
			return fieldErr(fmt.Sprintf("stratification.strata[%d].label", i), "%q is empty or repeated", st.Label)
		}
		seen[st.Label] = true
		if st.Population < 1 || !(st.Anticipated >= 0 && st.Anticipated < 1) || math.IsNaN(st.Anticipated) {
			return fieldErr(fmt.Sprintf("stratification.strata[%d]", i), "(%s): population %d must be at least 1 and anticipated %v in [0, 1)", st.Label, st.Population, st.Anticipated)
		}
	}
	if len(s.Sample) != len(s.Strata) || len(s.Counted) != len(s.Strata) {
		return fieldErr("stratification.sample", "%d sample and %d counted sizes for %d strata", len(s.Sample), len(s.Counted), len(s.Strata))
	}
	total := 0
	for i := range s.Sample {
		if s.Sample[i] < 0 || int64(s.Sample[i]) > s.Strata[i].Population || s.Counted[i] < 0 || s.Counted[i] > s.Sample[i] {
			return fieldErr("stratification.sample", "stratum %d (%s): %d sampled, %d counted of %d", i+1, s.Strata[i].Label, s.Sample[i], s.Counted[i], s.Strata[i].Population)
		}
		total += s.Sample[i]
	}
	if total < n {
		return fieldErr("stratification.sample", "the strata hold %d items, fewer than rule.sample_size %d", total, n)
	}
	return nil
}

// Rates are the planned anticipated error rates by stratum label.
func (s *Stratification) Rates() map[string]float64 {
	out := map[string]float64{}
	for _, st := range s.Strata {
		out[st.Label] = st.Anticipated
	}
	return out
}

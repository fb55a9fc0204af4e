package stratified

import (
	"errors"
	"fmt"
	"math"

	"probity/plan"
)

// Stratum is one stratum of the population: its size N_h and the number
// n_h of its decisions drawn without replacement and labeled.
type Stratum struct {
	Label      string
	Population int64 // N_h ≥ 1
	Sample     int   // n_h, 0 ≤ n_h ≤ N_h
}

// Design is a stratified sample: the strata with their sizes and sample
// sizes. A stratum with n_h = 0 is allowed; the bounds count it as unknown
// (every one of its N_h decisions may be an error).
type Design struct {
	Strata []Stratum
}

// ErrDesign is wrapped by every error about a design or the counts
// observed in it.
var ErrDesign = errors.New("invalid stratified design")

// Validate checks that there is at least one stratum, N_h ≥ 1 and
// 0 ≤ n_h ≤ N_h for every stratum, and that the total population fits in
// an int64 without overflow.
func (d Design) Validate() error {
	if len(d.Strata) == 0 {
		return fmt.Errorf("%w: no strata", ErrDesign)
	}
	var total int64
	for _, s := range d.Strata {
		if s.Population < 1 || s.Sample < 0 || int64(s.Sample) > s.Population {
			return fmt.Errorf("%w: stratum %q has N_h = %d and n_h = %d (need N_h ≥ 1 and 0 ≤ n_h ≤ N_h)",
				ErrDesign, s.Label, s.Population, s.Sample)
		}
		if total > math.MaxInt64-s.Population {
			return fmt.Errorf("%w: the strata hold more than %d decisions", ErrDesign, int64(math.MaxInt64))
		}
		total += s.Population
	}
	return nil
}

// checkErrors validates the design and the observed errors x_h, one per
// stratum in Design order, 0 ≤ x_h ≤ n_h.
func (d Design) checkErrors(errs []int) error {
	if err := d.Validate(); err != nil {
		return err
	}
	if len(errs) != len(d.Strata) {
		return fmt.Errorf("%w: %d error counts for %d strata", ErrDesign, len(errs), len(d.Strata))
	}
	for h, s := range d.Strata {
		if errs[h] < 0 || errs[h] > s.Sample {
			return fmt.Errorf("%w: stratum %q has %d errors in %d labeled items", ErrDesign, s.Label, errs[h], s.Sample)
		}
	}
	return nil
}

// Population is N = Σ N_h.
func (d Design) Population() int64 {
	var n int64
	for _, s := range d.Strata {
		n += s.Population
	}
	return n
}

// SampleSize is n = Σ n_h.
func (d Design) SampleSize() int {
	n := 0
	for _, s := range d.Strata {
		n += s.Sample
	}
	return n
}

// BadLotErrors is D* = ⌈ceiling·N⌉, the fewest errors the population holds
// when its error rate is at or above the ceiling (plan.BadLotErrors).
func (d Design) BadLotErrors(ceiling float64) int64 {
	return plan.BadLotErrors(d.Population(), ceiling)
}

// maxErrors is the largest number of errors stratum h can hold given that
// n_h − x_h of its labeled items were correct: N_h − (n_h − x_h).
func maxErrors(s Stratum, x int) int64 {
	return s.Population - int64(s.Sample-x)
}

package stratified

import (
	"fmt"
	"math/rand/v2"
)

// drawHypergeometric draws the number of errors among n items taken
// without replacement from a stratum of N decisions holding D errors, one
// item at a time.
func drawHypergeometric(rng *rand.Rand, N, D int64, n int) int {
	x := 0
	for i := 0; i < n; i++ {
		// the next item is an error with probability (D − x)/(N − i)
		if rng.Int64N(N-int64(i)) < D-int64(x) {
			x++
		}
	}
	return x
}

// MonteCarloAccept estimates the chance that accept returns true when
// stratum h holds errors[h] errors and its n_h items are drawn without
// replacement: the fraction of reps simulated samples it accepts, with the
// randomness taken from src. It is for judgements whose acceptance
// probability has no convolution formula (Sequential); CountRule has the
// exact AcceptProbability.
func MonteCarloAccept(d Design, errors []int64, reps int, src rand.Source, accept func(errs []int) bool) (float64, error) {
	if err := d.Validate(); err != nil {
		return 0, err
	}
	if len(errors) != len(d.Strata) {
		return 0, fmt.Errorf("%w: %d error counts for %d strata", ErrDesign, len(errors), len(d.Strata))
	}
	for h, s := range d.Strata {
		if errors[h] < 0 || errors[h] > s.Population {
			return 0, fmt.Errorf("%w: stratum %q cannot hold %d errors in %d decisions", ErrDesign, s.Label, errors[h], s.Population)
		}
	}
	if reps < 1 {
		return 0, fmt.Errorf("%w: %d repetitions", ErrRule, reps)
	}
	rng := rand.New(src)
	errs := make([]int, len(d.Strata))
	hits := 0
	for r := 0; r < reps; r++ {
		for h, s := range d.Strata {
			errs[h] = drawHypergeometric(rng, s.Population, errors[h], s.Sample)
		}
		if accept(errs) {
			hits++
		}
	}
	return float64(hits) / float64(reps), nil
}

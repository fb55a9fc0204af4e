package verdict

import (
	"errors"
	"math"
	"probity/plan/inputerr"
)

// Stratum is one stratum of the draw: its size N_h in the audited
// population and the number n_h of items judged in it.
type Stratum struct {
	Label      string
	Population int64 // N_h
	Sample     int   // n_h judged (spares that replaced items included)
}

// Design is the stratified sample as judged: the strata with their sizes.
type Design struct {
	Strata []Stratum
}

// ErrDesign is wrapped by every error about a sample design.
var ErrDesign = errors.New("invalid sample design")

// validate checks N_h ≥ n_h ≥ 0, N_h ≥ 1 and at least one judged item.
func (d Design) validate() error {
	if len(d.Strata) == 0 {
		return inputerr.Errorf("%w: no strata", ErrDesign)
	}
	n := 0
	for _, s := range d.Strata {
		if s.Population < 1 || s.Sample < 0 || int64(s.Sample) > s.Population {
			return inputerr.Errorf("%w: stratum %q has N_h = %d and n_h = %d (need N_h ≥ 1 and 0 ≤ n_h ≤ N_h)", ErrDesign, s.Label, s.Population, s.Sample)
		}
		n += s.Sample
	}
	if n == 0 {
		return inputerr.Errorf("%w: no item was judged", ErrDesign)
	}
	return nil
}

// SampleSize is n = Σ n_h.
func (d Design) SampleSize() int {
	n := 0
	for _, s := range d.Strata {
		n += s.Sample
	}
	return n
}

// covered returns the total N over the strata with n_h > 0, the part of
// the population the sample can speak for.
func (d Design) covered() float64 {
	var N float64
	for _, s := range d.Strata {
		if s.Sample > 0 {
			N += float64(s.Population)
		}
	}
	return N
}

// MaxWeightSpread is max_h w_h / min_h w_h − 1 over the sampled strata,
// with w_h = N_h/n_h: 0 for exactly equal inclusion weights.
func (d Design) MaxWeightSpread() float64 {
	lo, hi := math.Inf(1), 0.0
	for _, s := range d.Strata {
		if s.Sample == 0 {
			continue
		}
		w := float64(s.Population) / float64(s.Sample)
		lo, hi = math.Min(lo, w), math.Max(hi, w)
	}
	if hi == 0 {
		return 0
	}
	return hi/lo - 1
}

// Estimate is the stratified estimate of the error rate and its variance:
//
//	p̂ = Σ_h W_h p̂_h,   W_h = N_h / N,   p̂_h = x_h / n_h,
//	v̂ = Σ_h W_h² (1 − n_h/N_h) s_h² / n_h,   s_h² = n_h p̂_h (1 − p̂_h) / (n_h − 1),
//
// (Cochran, Sampling Techniques, 3rd ed., §5.2 and §5A.3, the stratified
// mean of a 0/1 variable with the finite population correction). The sums
// run over the strata with n_h > 0 and N is their total. A stratum with
// n_h = 1 has no within-stratum variance estimate; it is given the largest
// possible, s_h² = 1/4 (conservative; common practice, no source). errors
// is x_h per stratum, in Design order.
type Estimate struct {
	Rate     float64
	Variance float64
	// SumW2n is Σ_h W_h² / n_h, the variance scale of the weighted
	// Hoeffding bound.
	SumW2n float64
	// SampledStrata is H, the number of strata with n_h > 0.
	SampledStrata int
}

// Stratified computes the Estimate from the errors per stratum.
func (d Design) Stratified(errors []int) (Estimate, error) {
	if err := d.validate(); err != nil {
		return Estimate{}, err
	}
	if len(errors) != len(d.Strata) {
		return Estimate{}, inputerr.Errorf("%w: %d error counts for %d strata", ErrDesign, len(errors), len(d.Strata))
	}
	N := d.covered()
	var e Estimate
	for h, s := range d.Strata {
		x := errors[h]
		if x < 0 || x > s.Sample {
			return Estimate{}, inputerr.Errorf("%w: stratum %q has %d errors in %d items", ErrDesign, s.Label, x, s.Sample)
		}
		if s.Sample == 0 {
			continue
		}
		e.SampledStrata++
		nh := float64(s.Sample)
		W := float64(s.Population) / N
		ph := float64(x) / nh
		e.Rate += W * ph
		e.SumW2n += W * W / nh
		s2 := 0.25
		if s.Sample > 1 {
			s2 = nh * ph * (1 - ph) / (nh - 1)
		}
		fpc := 1 - nh/float64(s.Population)
		e.Variance += W * W * fpc * s2 / nh
	}
	e.Rate = math.Min(math.Max(e.Rate, 0), 1)
	return e, nil
}

// Population is N = Σ N_h.
func (d Design) Population() int64 {
	var n int64
	for _, s := range d.Strata {
		n += s.Population
	}
	return n
}

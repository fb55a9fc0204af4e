package measure

import (
	"fmt"
	"math"
)

// Anticipate is the composition a plan assumes for one candidate whose
// strata are its predicted classes (possibly crossed with the user's own
// strata): the anticipated prevalence π (the share of true positives in
// the log) and one anticipated measure fix the rate of positives among
// the decisions it predicts positive (ρ₊) and negative (ρ₋), the same in
// every stratum of a side. With N₊ and N₋ the sizes of the two sides and
// N = N₊ + N₋, N₊ρ₊ + N₋ρ₋ = πN and
//
//	fnr v: ρ₋ = vπN/N₋                for v: ρ₋ = v
//	fpr v: ρ₊ = 1 − v(1 − π)N/N₊      fdr v: ρ₊ = 1 − v
//
// with the other rate from the prevalence. Each stratum then holds
// round(ρ·N_h) positives. Error is not enough to fix the split (it mixes
// both sides) and is refused; so are values that put a rate outside
// [0, 1]. Threshold candidates over score bands need a rate per band, which
// the caller builds as a Composition directly.
func Anticipate(p Population, candidate int, prevalence float64, m Measure, value float64) (Composition, error) {
	if err := p.Validate(); err != nil {
		return Composition{}, err
	}
	if candidate < 0 || candidate >= len(p.Candidates) {
		return Composition{}, fmt.Errorf("%w: candidate %d of %d", ErrPopulation, candidate, len(p.Candidates))
	}
	if !(prevalence > 0 && prevalence < 1) {
		return Composition{}, fmt.Errorf("%w: prevalence %v is not between 0 and 1", ErrPopulation, prevalence)
	}
	if !(value >= 0 && value < 1) {
		return Composition{}, fmt.Errorf("%w: anticipated %s %v is not in [0, 1)", ErrPopulation, m, value)
	}
	var Np, Nn float64
	for h, s := range p.Strata {
		if p.Candidates[candidate].Positive[h] {
			Np += float64(s.Population)
		} else {
			Nn += float64(s.Population)
		}
	}
	if Np == 0 || Nn == 0 {
		return Composition{}, fmt.Errorf("%w: candidate %q predicts one side only", ErrPopulation, p.Candidates[candidate].Name)
	}
	pos := prevalence * (Np + Nn) // anticipated true positives
	var rp, rn float64
	switch m {
	case FNR:
		rn = value * pos / Nn
		rp = (pos - Nn*rn) / Np
	case FPR:
		rp = 1 - value*(Np+Nn-pos)/Np
		rn = (pos - Np*rp) / Nn
	case FOR:
		rn = value
		rp = (pos - Nn*rn) / Np
	case FDR:
		rp = 1 - value
		rn = (pos - Np*rp) / Nn
	default:
		return Composition{}, fmt.Errorf("%w: an anticipated %s does not say how the positives split between the predicted classes; give fnr, fpr, for or fdr", ErrPopulation, m)
	}
	const tol = 1e-12
	if rp < -tol || rp > 1+tol || rn < -tol || rn > 1+tol {
		return Composition{}, fmt.Errorf("%w: prevalence %v and %s %v put the rate of positives at %.4g among the predicted positives and %.4g among the predicted negatives", ErrPopulation, prevalence, m, value, rp, rn)
	}
	c := Composition{Positives: make([]int64, len(p.Strata))}
	for h, s := range p.Strata {
		r := rn
		if p.Candidates[candidate].Positive[h] {
			r = rp
		}
		c.Positives[h] = int64(math.Round(math.Min(math.Max(r, 0), 1) * float64(s.Population)))
	}
	return c, nil
}

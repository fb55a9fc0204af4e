package stratified

import (
	"fmt"
	"math/big"
	"sort"
)

// ProportionalCounts returns the counted sizes of a sub-sample thinned
// towards proportional allocation at the sampling fraction of stratum ref:
// with f = n_ref/N_ref, stratum h counts k_h = min(n_h, ⌈f·N_h⌉) items
// (exact integer arithmetic). Rounding up keeps every thinned stratum at
// or above f items per decision, so thinning never opens a stratum to the
// least favourable spread below the reference (rounding down would, and
// a small stratum thinned to no item would count as unknown); a stratum
// sampled below f keeps all its items.
func ProportionalCounts(d Design, ref int) []int { return proportionalCounts(d, ref, true) }

// proportionalCounts is ProportionalCounts rounding f·N_h up or down.
func proportionalCounts(d Design, ref int, up bool) []int {
	s := d.Strata[ref]
	out := make([]int, len(d.Strata))
	for h, t := range d.Strata {
		// ⌈n_ref·N_h/N_ref⌉ or ⌊n_ref·N_h/N_ref⌋
		q := new(big.Int).Mul(big.NewInt(int64(s.Sample)), big.NewInt(t.Population))
		if up {
			q.Add(q, big.NewInt(s.Population-1))
		}
		q.Quo(q, big.NewInt(s.Population))
		k := t.Sample
		if q.IsInt64() && q.Int64() < int64(k) {
			k = int(q.Int64())
		}
		out[h] = k
	}
	return out
}

// CountedForPower chooses the counted sizes k_h that give the count rule
// the highest chance of accepting when stratum h holds anticipated[h]
// errors: every labeled item (k = n), or a sub-sample thinned by
// ProportionalCounts at the sampling fraction of one of the sampled
// strata, rounding f·N_h up or (where that counts fewer items and still
// serves better) down. When allocation is far from proportional (equal, Neyman),
// counting every item lets the least favourable spread put the errors
// where few items per decision were drawn; thinning the over-sampled
// strata removes that lever at the cost of labels that do not count. The
// choice uses only the design and the anticipated errors — never the
// labels — so it is made before labeling and the rule keeps its risk.
// Ties go to the candidate that counts more items.
func CountedForPower(d Design, anticipated []int64, ceiling, confidence float64) ([]int, *CountRule, error) {
	if err := d.Validate(); err != nil {
		return nil, nil, err
	}
	if len(anticipated) != len(d.Strata) {
		return nil, nil, fmt.Errorf("%w: %d anticipated error counts for %d strata", ErrDesign, len(anticipated), len(d.Strata))
	}
	// candidate fractions, largest first (the first candidate counts all)
	var refs []int
	for h, s := range d.Strata {
		if s.Sample > 0 {
			refs = append(refs, h)
		}
	}
	frac := func(h int) *big.Rat { return big.NewRat(int64(d.Strata[h].Sample), d.Strata[h].Population) }
	sort.SliceStable(refs, func(i, j int) bool { return frac(refs[i]).Cmp(frac(refs[j])) > 0 })
	var (
		best     []int
		bestRule *CountRule
		bestP    = -1.0
	)
	seen := map[string]bool{}
	for _, ref := range refs {
		for _, up := range []bool{true, false} {
			k := proportionalCounts(d, ref, up)
			key := fmt.Sprint(k)
			if seen[key] {
				continue
			}
			seen[key] = true
			r, err := NewCountRule(d, k, ceiling, confidence)
			if err != nil {
				return nil, nil, err
			}
			p, err := r.AcceptProbability(anticipated)
			if err != nil {
				return nil, nil, err
			}
			if p > bestP {
				best, bestRule, bestP = k, r, p
			}
		}
	}
	if best == nil { // no stratum sampled
		r, err := NewCountRule(d, nil, ceiling, confidence)
		if err != nil {
			return nil, nil, err
		}
		return r.Counted, r, nil
	}
	return best, bestRule, nil
}

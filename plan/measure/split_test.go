package measure

import (
	"math"
)

// splitPower is the exact acceptance probability of the split-risk ratio
// rule (the alternative to the intersection–union test): upper bound A_U
// at α_A from the a side, lower bound B_L = N_b − C_U at α_B from the b
// side, accept when A_U/(A_U + B_L) < ceiling, with (1 − α_A)(1 − α_B) =
// 1 − α (the sides are independent). One stratum per side.
func splitPower(Na, A0 int64, Nb, C0 int64, ceiling, alpha, share float64, ma, mb int) float64 {
	alphaB := 1 - math.Pow(1-alpha, share)
	alphaA := 1 - (1-alpha)/(1-alphaB)
	ta, _ := newTally([]int64{Na}, []int{ma})
	tb, _ := newTally([]int64{Nb}, []int{mb})
	var p float64
	cache := map[int64]float64{}
	for s := 0; s <= mb; s++ {
		ps := tb.cdf([]int64{C0}, s) - tb.cdf([]int64{C0}, s-1)
		if ps < 1e-14 {
			if s > int(float64(mb)*float64(C0)/float64(Nb)) {
				break
			}
			continue
		}
		BL := Nb - tb.upper(s, alphaB)
		if BL < 1 {
			continue
		}
		a := ratioBadCount(BL, ceiling)
		pa, ok := cache[a]
		if !ok {
			pa = ta.cdf([]int64{A0}, ta.acceptAt(a, alphaA, 0))
			cache[a] = pa
		}
		p += ps * pa
	}
	return p
}

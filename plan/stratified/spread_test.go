package stratified

import (
	"math"
	"math/rand/v2"
	"testing"
)

// bruteMin is min Σ cost_h(d_h) over all spreads with Σ d_h ≥ total, by
// enumeration.
func bruteMin(costs []cost, total int64) float64 {
	best := math.Inf(1)
	d := make([]int64, len(costs))
	var rec func(h int, sum int64, val float64)
	rec = func(h int, sum int64, val float64) {
		if h == len(costs) {
			if sum >= total && val < best {
				best = val
			}
			return
		}
		lo, hi := costs[h].bounds()
		for v := lo; v <= hi; v++ {
			d[h] = v
			rec(h+1, sum+v, val+costs[h].at(v))
		}
	}
	rec(0, 0, 0)
	return best
}

// randomConvex is a random convex cost on [lo, hi]: a starting value and
// nondecreasing increments (some negative, some zero, some repeated).
func randomConvex(rng *rand.Rand) tableCost {
	lo := rng.Int64N(3)
	n := 1 + rng.IntN(7)
	inc := make([]float64, n)
	for i := range inc {
		inc[i] = math.Round((rng.Float64()*4-1.5)*4) / 4 // quarter steps make ties
	}
	// sort increments to make the function convex
	for i := 1; i < n; i++ {
		for j := i; j > 0 && inc[j] < inc[j-1]; j-- {
			inc[j], inc[j-1] = inc[j-1], inc[j]
		}
	}
	v := []float64{rng.Float64()}
	for _, s := range inc {
		v = append(v, v[len(v)-1]+s)
	}
	return tableCost{lo: lo, v: v}
}

// TestSpreadSolverAgainstEnumeration compares the greedy least favourable
// spread with brute force on random convex costs, for every feasible total,
// and checks maxTotalBelow against the same enumeration.
func TestSpreadSolverAgainstEnumeration(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 400; trial++ {
		H := 1 + rng.IntN(4)
		costs := make([]cost, H)
		var room int64
		for h := range costs {
			c := randomConvex(rng)
			costs[h] = c
			_, top := c.bounds()
			room += top
		}
		sv := newSpreadSolver(costs)
		for total := int64(0); total <= room+1; total++ {
			want := bruteMin(costs, total)
			got, spread := sv.minTotal(total)
			if !(math.Abs(got-want) <= 1e-9 || (math.IsInf(got, 1) && math.IsInf(want, 1))) {
				t.Fatalf("trial %d, total %d: solver %v, enumeration %v", trial, total, got, want)
			}
			if spread != nil {
				var sum int64
				var val float64
				for h, d := range spread {
					lo, hi := costs[h].bounds()
					if d < lo || d > hi {
						t.Fatalf("trial %d: spread %v leaves the range of stratum %d", trial, spread, h)
					}
					sum += d
					val += costs[h].at(d)
				}
				if sum < total || math.Abs(val-got) > 1e-9 {
					t.Fatalf("trial %d, total %d: spread %v sums to %d with cost %v, want ≥ %d and %v", trial, total, spread, sum, val, total, got)
				}
			}
		}
		for _, th := range []float64{-1, 0, 0.5, 1, 2.5, 5, 1e9} {
			want := int64(-1)
			for total := int64(0); total <= room; total++ {
				if bruteMin(costs, total) < th {
					want = total
				}
			}
			if got := sv.maxTotalBelow(th); got != want {
				t.Fatalf("trial %d, threshold %v: maxTotalBelow %d, enumeration %d", trial, th, got, want)
			}
		}
	}
}

// TestCostsAreConvex checks the premise of the greedy solver on every
// small stratum: the increments of the mixture martingale's ln M(d) and of
// Fisher's −ln p(d) never decrease.
func TestCostsAreConvex(t *testing.T) {
	for N := int64(1); N <= 40; N += 3 {
		for n := 1; int64(n) <= N; n += 2 {
			for x := 0; x <= n; x++ {
				s := Stratum{Population: N, Sample: n}
				for _, c := range []cost{
					mixtureCost{s: s, x: x, a: 0.3, b: 5},
					mixtureCost{s: s, x: x, a: 2, b: 2},
					fisherCost{s: s, x: x, w: 1, cap: N},
				} {
					lo, hi := c.bounds()
					prev := math.Inf(-1)
					for d := lo + 1; d <= hi; d++ {
						inc := c.at(d) - c.at(d-1)
						if inc < prev-1e-9*(1+math.Abs(prev)) {
							t.Fatalf("%T N=%d n=%d x=%d: increment %v at d=%d after %v", c, N, n, x, inc, d, prev)
						}
						prev = inc
					}
				}
			}
		}
	}
}

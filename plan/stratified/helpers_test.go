package stratified

import (
	"fmt"
	"math"
	"sort"
)

// allocation rules of the tests (the sampling package is the home of the
// real allocator; this is its rounding rule, largest remainder, restated
// so the tests do not depend on the draw).
type allocRule struct {
	name string
	// weight of stratum h in the apportionment
	weight func(h int, N []int64, rates []float64) float64
	min    int   // minimum per stratum
	sizes  []int // a fixed allocation, when not nil
}

var (
	proportional = allocRule{name: "proportional", weight: func(h int, N []int64, _ []float64) float64 { return float64(N[h]) }}
	equal        = allocRule{name: "equal", weight: func(int, []int64, []float64) float64 { return 1 }}
	neyman       = allocRule{name: "neyman", weight: func(h int, N []int64, r []float64) float64 {
		return float64(N[h]) * math.Sqrt(r[h]*(1-r[h]))
	}}
)

// fixed is an allocation given item by item.
func fixed(n ...int) allocRule {
	return allocRule{name: "fixed", sizes: n}
}

func withMin(r allocRule, k int) allocRule {
	r.name = fmt.Sprintf("%s, min %d", r.name, k)
	r.min = k
	return r
}

// allocate divides n items by largest remainder (ties to the lower index),
// fixing strata below the minimum at min(k, N_h) and reapportioning the
// rest, and taking whole any stratum whose share exceeds it.
func allocate(N []int64, n int, rule allocRule, rates []float64) []int {
	if rule.sizes != nil {
		return append([]int(nil), rule.sizes...)
	}
	H := len(N)
	out := make([]int, H)
	fixed := make([]bool, H)
	for {
		m := n
		var sw float64
		for h := range N {
			if fixed[h] {
				m -= out[h]
			} else {
				sw += rule.weight(h, N, rates)
			}
		}
		type share struct {
			h    int
			frac float64
		}
		var shares []share
		got := 0
		for h := range N {
			if fixed[h] {
				continue
			}
			s := float64(m) * rule.weight(h, N, rates) / sw
			out[h] = int(math.Floor(s))
			got += out[h]
			shares = append(shares, share{h, s - math.Floor(s)})
		}
		sort.SliceStable(shares, func(i, j int) bool { return shares[i].frac > shares[j].frac })
		for i := 0; i < m-got; i++ {
			out[shares[i%len(shares)].h]++
		}
		changed := false
		for h := range N {
			if fixed[h] {
				continue
			}
			if lim := min(int64(rule.min), N[h]); int64(out[h]) < lim {
				fixed[h], out[h], changed = true, int(lim), true
			} else if int64(out[h]) > N[h] {
				fixed[h], out[h], changed = true, int(N[h]), true
			}
		}
		if !changed {
			return out
		}
	}
}

func design(N []int64, n []int) Design {
	d := Design{}
	for h := range N {
		d.Strata = append(d.Strata, Stratum{Label: fmt.Sprintf("s%d", h+1), Population: N[h], Sample: n[h]})
	}
	return d
}

// compositions calls f with every d (0 ≤ d_h ≤ N_h) with Σ d_h = total.
func compositions(N []int64, total int64, f func(d []int64)) {
	d := make([]int64, len(N))
	var rec func(h int, rest int64)
	rec = func(h int, rest int64) {
		if h == len(N)-1 {
			if rest <= N[h] {
				d[h] = rest
				f(d)
			}
			return
		}
		var cap int64
		for _, v := range N[h+1:] {
			cap += v
		}
		for v := max(0, rest-cap); v <= min(rest, N[h]); v++ {
			d[h] = v
			rec(h+1, rest-v)
		}
	}
	rec(0, total)
}

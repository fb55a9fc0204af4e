package stratified

import (
	"fmt"
	"strings"
	"testing"

	"probity/plan"
)

// smallCase is a small population and an allocation of its sample.
type smallCase struct {
	name  string
	N     []int64
	n     int
	rule  allocRule
	rates []float64 // for Neyman
}

// smallCases are invented populations of at most 30 decisions per stratum,
// with allocations that round, leave a stratum empty, give a stratum a
// single item, or over-sample small strata.
var smallCases = []smallCase{
	{name: "four strata", N: []int64{30, 20, 12, 6}, n: 34, rule: proportional},
	{name: "four strata", N: []int64{30, 20, 12, 6}, n: 34, rule: equal},
	{name: "four strata", N: []int64{30, 20, 12, 6}, n: 30, rule: withMin(proportional, 5)},
	{name: "four strata", N: []int64{30, 20, 12, 6}, n: 34, rule: neyman, rates: []float64{0.05, 0.1, 0.3, 0.5}},
	{name: "big and tiny", N: []int64{30, 5}, n: 16, rule: proportional},
	{name: "big and tiny", N: []int64{30, 5}, n: 16, rule: equal},
	{name: "tiny stratum left empty", N: []int64{25, 25, 2}, n: 24, rule: proportional},
	{name: "tiny stratum, minimum 1", N: []int64{28, 2}, n: 12, rule: withMin(proportional, 1)},
	{name: "one item in the big stratum", N: []int64{30, 8, 8}, n: 13, rule: fixed(1, 6, 6)},
	{name: "one item in each small stratum", N: []int64{30, 4, 4}, n: 18, rule: fixed(16, 1, 1)},
	{name: "three unequal", N: []int64{24, 12, 3}, n: 18, rule: equal},
}

// worstAccept enumerates every spread of D* … D*+extra errors over the
// strata and returns the largest acceptance probability and where it is.
func worstAccept(t *testing.T, r *CountRule, extra int64, accept func([]int64) float64) (float64, []int64) {
	t.Helper()
	N := make([]int64, len(r.Design.Strata))
	for h, s := range r.Design.Strata {
		N[h] = s.Population
	}
	worst, where := -1.0, []int64(nil)
	top := min(r.Design.Population(), r.BadLot+extra)
	for total := r.BadLot; total <= top; total++ {
		compositions(N, total, func(d []int64) {
			if p := accept(d); p > worst {
				worst, where = p, append([]int64(nil), d...)
			}
		})
	}
	return worst, where
}

// TestExactRiskSmallPopulations computes, for every small case, ceiling and
// confidence, the exact acceptance probability of the count rule (all
// items counted, and thinned for power at half the ceiling) at every spread
// of errors on the boundary Σ d_h = D* and up to 6 errors above it, and
// requires the largest to be at most α (within 1e-12). It tables the
// worst spread found (go test -v).
func TestExactRiskSmallPopulations(t *testing.T) {
	var table strings.Builder
	fmt.Fprintf(&table, "%-16s %-26s %-7s %-4s %-14s %-3s %-16s %s\n", "N_h", "n_h", "ceiling", "α", "counted k_h", "c", "worst d_h", "P(accept)")
	usable := 0
	for _, sc := range smallCases {
		nh := allocate(sc.N, sc.n, sc.rule, sc.rates)
		d := design(sc.N, nh)
		for _, ceiling := range []float64{0.15, 0.25, 0.4} {
			for _, conf := range []float64{0.8, 0.9} {
				alpha := 1 - conf
				anticipated := make([]int64, len(sc.N))
				for h := range sc.N {
					anticipated[h] = plan.GoodLotErrors(sc.N[h], ceiling/2)
				}
				thinned, _, err := CountedForPower(d, anticipated, ceiling, conf)
				if err != nil {
					t.Fatal(err)
				}
				for _, counted := range [][]int{nil, thinned} {
					r, err := NewCountRule(d, counted, ceiling, conf)
					if err != nil {
						t.Fatal(err)
					}
					worst, where := worstAccept(t, r, 6, func(e []int64) float64 {
						p, err := r.AcceptProbability(e)
						if err != nil {
							t.Fatal(err)
						}
						return p
					})
					if r.Accept >= 0 {
						usable++
					}
					fmt.Fprintf(&table, "%-16s %-26s %-7v %-4.2g %-14s %-3d %-16s %.4g\n",
						fmt.Sprint(sc.N), fmt.Sprintf("%v %s", nh, sc.rule.name),
						ceiling, alpha, fmt.Sprint(r.Counted), r.Accept, fmt.Sprint(where), worst)
					if worst > alpha+1e-12 {
						t.Errorf("%s %v %s, ceiling %v, α %.2g, counted %v: P(accept) = %.6g at d = %v exceeds α",
							sc.name, nh, sc.rule.name, ceiling, alpha, r.Counted, worst, where)
					}
				}
			}
		}
	}
	t.Logf("worst spreads (exact enumeration):\n%s", table.String())
	if usable < 40 {
		t.Fatalf("only %d rules can accept at all; the check is nearly vacuous", usable)
	}
}

// TestExactRiskNaiveCountFails is the negative control: judging these
// designs by the simple-random-sample rule (the binomial c for n, all
// errors counted) exceeds the stated risk at some spread, which the same
// enumeration must find.
func TestExactRiskNaiveCountFails(t *testing.T) {
	found := 0
	for _, sc := range smallCases {
		nh := allocate(sc.N, sc.n, sc.rule, sc.rates)
		d := design(sc.N, nh)
		for _, ceiling := range []float64{0.15, 0.25, 0.4} {
			alpha := 0.1
			c := -1
			for plan.BinomialCDF(c+1, sc.n, ceiling) <= alpha {
				c++
			}
			if c < 0 {
				continue
			}
			r, err := NewCountRule(d, nil, ceiling, 1-alpha)
			if err != nil {
				t.Fatal(err)
			}
			r.Accept = c // the naive rule
			worst, where := worstAccept(t, r, 0, func(e []int64) float64 {
				p, _ := r.AcceptProbability(e)
				return p
			})
			if worst > alpha+1e-9 {
				found++
				t.Logf("naive rule c = %d on %v %s (n_h %v), ceiling %v: P(accept) = %.4g at d = %v (α = %v)", c, sc.N, sc.rule.name, nh, ceiling, worst, where, alpha)
			}
		}
	}
	if found == 0 {
		t.Fatal("the enumeration found no failure of the naive rule; it cannot tell a failing rule from a valid one")
	}
}

package stratified

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"probity/plan"
)

// The power comparison behind the choice of method (package doc): the
// labels needed for a 90 % chance of acceptance at the anticipated error
// p0 = ceiling/2, confidence 0.95, for an invented population of 100 000
// decisions in four strata with shares 0.45/0.35/0.18/0.02.
//
// The full table (all methods, about ten minutes on two cores) runs with
// PROBITY_POWER_TABLE=1:
//
//	PROBITY_POWER_TABLE=1 go test -run TestPowerTable -v -timeout 0 ./plan/stratified
//
// Without it, TestPowerCountRule checks the chosen method's entries
// against the simple-random-sample plan.

var (
	powerShares = []float64{0.45, 0.35, 0.18, 0.02}
	powerN      = func() []int64 {
		N := make([]int64, len(powerShares))
		for h, s := range powerShares {
			N[h] = int64(math.Round(s * 100000))
		}
		return N
	}()
	// varying per-stratum rates (multiples of p0 whose weighted mean is
	// p0) for the Neyman rows
	rateMultiples = func() []float64 {
		m := []float64{0.5, 1, 2, 3}
		var w float64
		for h, v := range m {
			w += powerShares[h] * v
		}
		for h := range m {
			m[h] /= w
		}
		return m
	}()
)

// powerDesign is one row's population, allocation and anticipated errors.
type powerDesign struct {
	name  string
	rule  allocRule
	rates []float64 // anticipated per-stratum error rates
}

func powerDesigns(ceiling float64) []powerDesign {
	p0 := ceiling / 2
	flat := []float64{p0, p0, p0, p0}
	vary := make([]float64, 4)
	for h := range vary {
		vary[h] = p0 * rateMultiples[h]
	}
	return []powerDesign{
		{"proportional", proportional, flat},
		{"equal", equal, flat},
		{"neyman (rates ×0.5/1/2/3)", neyman, vary},
		{"proportional, min 60", withMin(proportional, 60), flat},
	}
}

// setup allocates n and returns the design and the anticipated errors.
func (pd powerDesign) setup(n int) (Design, []int64) {
	nh := allocate(powerN, n, pd.rule, pd.rates)
	d := design(powerN, nh)
	ant := make([]int64, len(powerN))
	for h := range ant {
		ant[h] = int64(math.Round(pd.rates[h] * float64(powerN[h])))
	}
	return d, ant
}

// smallestN finds the smallest n with power(n) ≥ 0.9: a doubling and
// bisection bracket, then (when scan is set) a linear scan upwards from 5 %
// below the bracket, because power is a saw-tooth in n.
func smallestN(power func(n int) float64, start int, scan bool) int {
	lo, hi := start/2, start
	for power(hi) < 0.9 {
		lo, hi = hi, 2*hi
	}
	for hi-lo > 1 {
		m := lo + (hi-lo)/2
		if power(m) >= 0.9 {
			hi = m
		} else {
			lo = m
		}
	}
	if !scan {
		return hi
	}
	for n := max(1, int(0.95*float64(hi))); n < hi; n++ {
		if power(n) >= 0.9 {
			return n
		}
	}
	return hi
}

// srsBinomialN is the exact binomial plan of a simple random sample: the
// smallest n with some c such that P(Bin(n, ceiling) ≤ c) ≤ α and
// P(Bin(n, p0) ≤ c) ≥ 0.9.
func srsBinomialN(ceiling, alpha, p0 float64) (int, int) {
	for n := 1; ; n++ {
		c := -1
		for plan.BinomialCDF(c+1, n, ceiling) <= alpha {
			c++
		}
		if c >= 0 && plan.BinomialCDF(c, n, p0) >= 0.9 {
			return n, c
		}
	}
}

func countPower(pd powerDesign, ceiling, conf float64, thin bool) func(int) float64 {
	return func(n int) float64 {
		d, ant := pd.setup(n)
		var r *CountRule
		var err error
		if thin {
			_, r, err = CountedForPower(d, ant, ceiling, conf)
		} else {
			r, err = NewCountRule(d, nil, ceiling, conf)
		}
		if err != nil {
			panic(err)
		}
		p, err := r.AcceptProbability(ant)
		if err != nil {
			panic(err)
		}
		return p
	}
}

// TestPowerCountRule checks the chosen method against the reference plan:
// proportional allocation needs at most 6 % more labels than the simple
// random sample (the rounding of a 2 % stratum), the others at most 2.1
// times as many.
func TestPowerCountRule(t *testing.T) {
	for _, ceiling := range []float64{0.02, 0.05} {
		srs, _ := srsBinomialN(ceiling, 0.05, ceiling/2)
		for _, pd := range powerDesigns(ceiling) {
			n := smallestN(countPower(pd, ceiling, 0.95, true), srs, false)
			ratio := float64(n) / float64(srs)
			limit := 2.1
			if pd.rule.name == "proportional" {
				limit = 1.06
			}
			t.Logf("ceiling %v, %s: n = %d (%.2f × the simple random sample's %d)", ceiling, pd.name, n, ratio, srs)
			if ratio > limit {
				t.Errorf("ceiling %v, %s: the count rule needs %d labels, %.2f × the simple random sample's %d (limit %.2f)", ceiling, pd.name, n, ratio, srs, limit)
			}
		}
	}
}

// staircase is the acceptance probability of a test whose acceptance
// region is a lower set in the error counts (fewer errors never turn an
// acceptance into a rejection), by enumeration of all but the last stratum
// and a binary search in the last.
func staircase(d Design, D []int64, accept func(x []int) bool) float64 {
	H := len(d.Strata)
	xmax := make([]int, H)
	pmf := make([][]float64, H)
	for h, s := range d.Strata {
		for x := 0; x <= s.Sample; x++ {
			xmax[h] = x
			pmf[h] = append(pmf[h], plan.HypergeometricPMF(x, s.Population, D[h], s.Sample))
			if plan.HypergeometricSF(x, s.Population, D[h], s.Sample) < 1e-13 {
				break
			}
		}
	}
	x := make([]int, H)
	var rec func(h int, p float64) float64
	rec = func(h int, p float64) float64 {
		if p < 1e-15 {
			return 0
		}
		if h == H-1 {
			lo, hi := -1, xmax[h]
			for lo < hi {
				mid := lo + (hi-lo+1)/2
				x[h] = mid
				if accept(x) {
					lo = mid
				} else {
					hi = mid - 1
				}
			}
			if lo < 0 {
				return 0
			}
			s := d.Strata[h]
			return p * plan.HypergeometricCDF(lo, s.Population, D[h], s.Sample)
		}
		var sum float64
		for v := 0; v <= xmax[h]; v++ {
			x[h] = v
			sum += rec(h+1, p*pmf[h][v])
		}
		return sum
	}
	return rec(0, 1)
}

// weightedHoeffdingAccept restates the weighted Hoeffding bound of
// plan/verdict (Hoeffding 1963, Theorem 2): accept when
// p̂ + √(ln(1/α)·Σ W_h²/n_h / 2) < ceiling, p̂ = Σ W_h x_h/n_h.
func weightedHoeffdingAccept(d Design, ceiling, alpha float64) func(x []int) bool {
	N := float64(d.Population())
	var s2 float64
	for _, s := range d.Strata {
		W := float64(s.Population) / N
		s2 += W * W / float64(s.Sample)
	}
	r := math.Sqrt(math.Log(1/alpha) * s2 / 2)
	return func(x []int) bool {
		var p float64
		for h, s := range d.Strata {
			p += float64(s.Population) / N * float64(x[h]) / float64(s.Sample)
		}
		return p+r < ceiling
	}
}

// fisherAccept is the SUITE-style test: Fisher's combination of the exact
// per-stratum hypergeometric p-values, minimised over the spreads of D*
// errors, against the χ² with 2H degrees of freedom. Costs are tabulated
// per stratum and count for speed.
func fisherAccept(d Design, ceiling, alpha float64) func(x []int) bool {
	total := d.BadLotErrors(ceiling)
	w := make([]float64, len(d.Strata))
	for h := range w {
		w[h] = 1
	}
	crit := newExpSum(w).Quantile(alpha)
	tabs := make([]map[int]tableCost, len(d.Strata))
	for h := range tabs {
		tabs[h] = map[int]tableCost{}
	}
	return func(x []int) bool {
		cs := make([]cost, len(x))
		for h := range x {
			tab, ok := tabs[h][x[h]]
			if !ok {
				tab = tabulate(fisherCost{s: d.Strata[h], x: x[h], w: 1, cap: total})
				tabs[h][x[h]] = tab
			}
			cs[h] = tab
		}
		v, _ := newSpreadSolver(cs).minTotal(total)
		return v >= crit
	}
}

// tableCost is a cost tabulated on its whole range.
type tableCost struct {
	lo int64
	v  []float64
}

func (t tableCost) bounds() (int64, int64) { return t.lo, t.lo + int64(len(t.v)) - 1 }
func (t tableCost) at(d int64) float64     { return t.v[d-t.lo] }

func tabulate(c cost) tableCost {
	b, top := c.bounds()
	v := make([]float64, top-b+1)
	for d := b; d <= top; d++ {
		v[d-b] = c.at(d)
	}
	return tableCost{b, v}
}

// TestPowerTable prints the comparison of the package doc (see the top of
// this file).
func TestPowerTable(t *testing.T) {
	if os.Getenv("PROBITY_POWER_TABLE") == "" {
		t.Skip("set PROBITY_POWER_TABLE=1 for the full power table (about ten minutes)")
	}
	const conf, alpha = 0.95, 0.05
	var out strings.Builder
	fmt.Fprintf(&out, "labels for 90 %% acceptance at p0 = ceiling/2, confidence 0.95, N = 100 000, shares 0.45/0.35/0.18/0.02\n")
	fmt.Fprintf(&out, "%-8s %-28s %8s %8s %8s %8s %8s %8s\n", "ceiling", "allocation", "SRS", "count", "count*", "fisher", "mixture", "w-hoeff")
	for _, ceiling := range []float64{0.02, 0.05} {
		srs, _ := srsBinomialN(ceiling, alpha, ceiling/2)
		for _, pd := range powerDesigns(ceiling) {
			count := smallestN(countPower(pd, ceiling, conf, true), srs, true)
			all := smallestN(countPower(pd, ceiling, conf, false), srs, true)
			fisher := smallestN(func(n int) float64 {
				d, ant := pd.setup(n)
				return staircase(d, ant, fisherAccept(d, ceiling, alpha))
			}, 2*srs, false)
			mixture := smallestN(func(n int) float64 {
				d, ant := pd.setup(n)
				seq := Sequential{Design: d, Ceiling: ceiling, Confidence: conf, Priors: make([]Prior, 4)}
				for h := range seq.Priors {
					seq.Priors[h] = AnticipatedPrior(pd.rates[h])
				}
				p, err := MonteCarloAccept(d, ant, 400, rand.NewPCG(uint64(n), 7), func(x []int) bool {
					v, err := seq.Judge(x)
					if err != nil {
						panic(err)
					}
					return v.Accepted
				})
				if err != nil {
					panic(err)
				}
				return p
			}, 4*srs, false)
			hoeff := smallestN(func(n int) float64 {
				d, ant := pd.setup(n)
				return staircase(d, ant, weightedHoeffdingAccept(d, ceiling, alpha))
			}, 4*srs, false)
			fmt.Fprintf(&out, "%-8v %-28s %8d %8d %8d %8d %8d %8d\n", ceiling, pd.name, srs, count, all, fisher, mixture, hoeff)
		}
	}
	fmt.Fprintf(&out, "count: the count rule with the counted sub-sample chosen for power (the chosen method); count*: every labeled item counted;\n")
	fmt.Fprintf(&out, "fisher: Fisher's combination of exact per-stratum p-values, maximised over spreads (SUITE);\n")
	fmt.Fprintf(&out, "mixture: product of per-stratum prior-posterior martingales (Sequential; Monte Carlo, 400 runs per n);\n")
	fmt.Fprintf(&out, "w-hoeff: the weighted Hoeffding bound. SRS: the exact binomial plan of a simple random sample.\n")
	t.Log("\n" + out.String())
}

// TestFailurePopulationsLabels gives, for the populations of
// failure_test.go, the labels needed for 90 % acceptance at p0 =
// ceiling/2 (ceiling 5 %, plan allows 10 %) under the count rule and the
// weighted Hoeffding bound, for proportional, equal and Neyman allocation
// (Neyman with per-stratum rates ×0.5/1/2/3 of p0, normalised), also with
// a minimum of one item per stratum, and the
// smallest zero-failure sample (c ≥ 0). Weighted Hoeffding is exact by
// enumeration for four strata and Monte Carlo (1000 runs) for 100.
// PROBITY_POWER_TABLE=1 runs it.
func TestFailurePopulationsLabels(t *testing.T) {
	if os.Getenv("PROBITY_POWER_TABLE") == "" {
		t.Skip("set PROBITY_POWER_TABLE=1")
	}
	ceiling, conf := failureCeiling, failureConfidence
	alpha, p0 := 1-conf, failureCeiling/2
	srs, _ := srsBinomialN(ceiling, alpha, p0)
	var out strings.Builder
	fmt.Fprintf(&out, "labels for 90 %% acceptance at p0 = 2.5 %%, ceiling 5 %%, α = 10 %% (simple random sample: %d)\n", srs)
	fmt.Fprintf(&out, "%-34s %-20s %8s %8s %10s\n", "population", "allocation", "count", "w-hoeff", "zero-fail")
	pops := []struct {
		name string
		N    []int64
	}{
		{"four strata 6000/3000/800/200", []int64{6000, 3000, 800, 200}},
		{"four strata 5360/2340/980/320", []int64{5360, 2340, 980, 320}},
		{"100 strata, 43 small", manySmallStrata()},
	}
	for _, pop := range pops {
		var w float64
		for h, N := range pop.N {
			w += float64(N) * []float64{0.5, 1, 2, 3}[h%4]
		}
		var total int64
		for _, N := range pop.N {
			total += N
		}
		vary := make([]float64, len(pop.N))
		flat := make([]float64, len(pop.N))
		for h := range vary {
			vary[h] = p0 * []float64{0.5, 1, 2, 3}[h%4] * float64(total) / w
			flat[h] = p0
		}
		for _, pd := range []struct {
			name  string
			rule  allocRule
			rates []float64
		}{{"proportional", proportional, flat}, {"equal", equal, flat}, {"neyman", neyman, vary},
			{"proportional, min 1", withMin(proportional, 1), flat}, {"neyman, min 1", withMin(neyman, 1), vary}} {
			setup := func(n int) (Design, []int64) {
				d := design(pop.N, allocate(pop.N, n, pd.rule, pd.rates))
				ant := make([]int64, len(pop.N))
				for h := range ant {
					ant[h] = int64(math.Round(pd.rates[h] * float64(pop.N[h])))
				}
				return d, ant
			}
			count := smallestN(func(n int) float64 {
				d, ant := setup(n)
				_, r, err := CountedForPower(d, ant, ceiling, conf)
				if err != nil {
					panic(err)
				}
				p, _ := r.AcceptProbability(ant)
				return p
			}, srs, true)
			hoeff := smallestN(func(n int) float64 {
				d, ant := setup(n)
				for _, s := range d.Strata {
					if s.Sample == 0 {
						return 0 // the bound needs every stratum sampled
					}
				}
				acc := weightedHoeffdingAccept(d, ceiling, alpha)
				if len(d.Strata) <= 4 {
					return staircase(d, ant, acc)
				}
				p, _ := MonteCarloAccept(d, ant, 1000, rand.NewPCG(uint64(n), 3), acc)
				return p
			}, 4*srs, false)
			zero := 1
			for {
				d, _ := setup(zero)
				if r := mustRule(t, d, nil, ceiling, conf); r.Accept >= 0 {
					break
				}
				zero++
			}
			fmt.Fprintf(&out, "%-34s %-20s %8d %8d %10d\n", pop.name, pd.name, count, hoeff, zero)
		}
	}
	t.Log("\n" + out.String())
}

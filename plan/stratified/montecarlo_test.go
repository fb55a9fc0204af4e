package stratified

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strings"
	"testing"

	"probity/plan"
)

// A spread puts D errors into the strata of a design: fill orders the
// strata, and each takes as many errors as it holds, in that order. A new
// adversarial spread is one line in spreads.
type spread struct {
	name string
	// key orders the strata (smallest key filled first)
	key func(d Design, r *CountRule, h int) float64
}

var spreads = []spread{
	{"evenly (proportional to N_h)", nil},
	{"smallest stratum first", func(d Design, _ *CountRule, h int) float64 { return float64(d.Strata[h].Population) }},
	{"largest stratum first", func(d Design, _ *CountRule, h int) float64 { return -float64(d.Strata[h].Population) }},
	{"empty strata first", func(d Design, _ *CountRule, h int) float64 { return float64(d.Strata[h].Sample) }},
	{"highest weight N_h/n_h first", func(d Design, _ *CountRule, h int) float64 {
		return -float64(d.Strata[h].Population) / math.Max(float64(d.Strata[h].Sample), 0.5)
	}},
	{"fewest counted items per decision first", func(_ Design, r *CountRule, h int) float64 { return r.fraction(h) }},
}

// place spreads D errors over the strata.
func (sp spread) place(d Design, r *CountRule, D int64) []int64 {
	out := make([]int64, len(d.Strata))
	if sp.key == nil {
		N := d.Population()
		var got int64
		for h, s := range d.Strata {
			out[h] = D * s.Population / N
			got += out[h]
		}
		for h := 0; got < D; h = (h + 1) % len(out) {
			if out[h] < d.Strata[h].Population {
				out[h]++
				got++
			}
		}
		return out
	}
	order := make([]int, len(d.Strata))
	for h := range order {
		order[h] = h
	}
	sort.SliceStable(order, func(i, j int) bool { return sp.key(d, r, order[i]) < sp.key(d, r, order[j]) })
	rest := D
	for _, h := range order {
		out[h] = min(rest, d.Strata[h].Population)
		rest -= out[h]
	}
	return out
}

// pipeline runs the whole judgement once: each stratum's decisions are put
// in a uniformly random order (the worksheet's key order within a stratum),
// the first n_h are labeled, the errors among the first k_h counted, and
// the rule judges them. Decision i of stratum h is an error when i < D[h];
// perm[h] is the identity on entry and on return (the partial
// Fisher–Yates shuffle is undone), so a run costs O(n), not O(N).
func pipeline(rng *rand.Rand, r *CountRule, D []int64, perm [][]int32) bool {
	errs := make([]int, len(D))
	for h, s := range r.Design.Strata {
		p := perm[h]
		js := make([]int, s.Sample)
		for i := 0; i < s.Sample; i++ {
			j := i + rng.IntN(len(p)-i)
			js[i] = j
			p[i], p[j] = p[j], p[i]
		}
		for i := 0; i < r.Counted[h]; i++ {
			if int64(p[i]) < D[h] {
				errs[h]++
			}
		}
		for i := s.Sample - 1; i >= 0; i-- {
			p[i], p[js[i]] = p[js[i]], p[i]
		}
	}
	v, err := r.Judge(errs)
	if err != nil {
		panic(err)
	}
	return v.Accepted
}

// mcPopulation is an invented population for the Monte Carlo check.
type mcPopulation struct {
	name    string
	N       []int64
	n       int
	ceiling float64
}

func manySmallStrata() []int64 {
	N := make([]int64, 100)
	for h := range N {
		if h < 57 {
			N[h] = 150 + int64(h)*7
		} else {
			N[h] = 6 + int64(h%5)
		}
	}
	return N
}

var mcPopulations = []mcPopulation{
	{"four strata 8000/5000/1500/300", []int64{8000, 5000, 1500, 300}, 600, 0.02},
	{"six strata, shares from 40 % to 1 %", []int64{6000, 4000, 2500, 1500, 800, 150}, 400, 0.05},
	{"100 strata, 43 small ones", manySmallStrata(), 700, 0.03},
}

// TestMonteCarloRiskAtCeiling runs the whole pipeline many times on
// invented populations holding exactly D* = ⌈ceiling·N⌉ errors, spread the
// adversarial ways above, for proportional (rounded), equal, Neyman and
// minimum-per-stratum allocations, with every item counted and with the
// sub-sample chosen for power. Validity fails when the acceptance count is
// improbably high for a rate of α: P(Bin(R, α) ≥ observed) < 0.001 (a
// one-sided binomial test at level 0.001). The simulated rate must also
// agree with the exact AcceptProbability (two-sided, same level). R = 2000
// per cell with a fixed seed; PROBITY_DEEP_MC=1 runs 20 000 with a seed
// from PROBITY_MC_SEED (default 1).
func TestMonteCarloRiskAtCeiling(t *testing.T) {
	reps, seed := 2000, uint64(1)
	if os.Getenv("PROBITY_DEEP_MC") != "" {
		reps = 20000
		if s := os.Getenv("PROBITY_MC_SEED"); s != "" {
			fmt.Sscan(s, &seed)
		}
	}
	if testing.Short() {
		reps = 300
	}
	const conf = 0.9
	alpha := 1 - conf
	rng := rand.New(rand.NewPCG(seed, 13))
	var table strings.Builder
	fmt.Fprintf(&table, "%-36s %-22s %-8s %-40s %8s %8s\n", "population", "allocation", "counted", "spread of D* errors", "MC rate", "exact")
	for _, pop := range mcPopulations {
		rates := make([]float64, len(pop.N))
		for h := range rates {
			rates[h] = pop.ceiling / 2 * (1 + float64(h%3)) / 2
		}
		perm := make([][]int32, len(pop.N))
		for h, N := range pop.N {
			perm[h] = make([]int32, N)
			for i := range perm[h] {
				perm[h][i] = int32(i)
			}
		}
		for _, rule := range []allocRule{proportional, equal, neyman, withMin(proportional, 5)} {
			nh := allocate(pop.N, pop.n, rule, rates)
			d := design(pop.N, nh)
			ant := make([]int64, len(pop.N))
			for h := range ant {
				ant[h] = plan.GoodLotErrors(pop.N[h], rates[h])
			}
			thinned, _, err := CountedForPower(d, ant, pop.ceiling, conf)
			if err != nil {
				t.Fatal(err)
			}
			for ci, counted := range [][]int{nil, thinned} {
				r, err := NewCountRule(d, counted, pop.ceiling, conf)
				if err != nil {
					t.Fatal(err)
				}
				for _, sp := range spreads {
					D := sp.place(d, r, r.BadLot)
					hits := 0
					for i := 0; i < reps; i++ {
						if pipeline(rng, r, D, perm) {
							hits++
						}
					}
					exact, err := r.AcceptProbability(D)
					if err != nil {
						t.Fatal(err)
					}
					label := []string{"all", "thinned"}[ci]
					fmt.Fprintf(&table, "%-36s %-22s %-8s %-40s %8.4f %8.4f\n", pop.name, rule.name, label, sp.name, float64(hits)/float64(reps), exact)
					if p := plan.BinomialSF(hits-1, reps, alpha); p < 0.001 {
						t.Errorf("%s, %s, %s, %s: %d of %d accepted at the ceiling; P(Bin(%d, %.2g) ≥ %d) = %.3g < 0.001",
							pop.name, rule.name, label, sp.name, hits, reps, reps, alpha, hits, p)
					}
					if exact > alpha+1e-12 {
						t.Errorf("%s, %s, %s, %s: exact acceptance %.6g exceeds α", pop.name, rule.name, label, sp.name, exact)
					}
					lo, hi := plan.BinomialCDF(hits, reps, exact), plan.BinomialSF(hits-1, reps, exact)
					if math.Min(lo, hi) < 0.0005 {
						t.Errorf("%s, %s, %s, %s: simulated %d of %d, exact %.5g: the pipeline disagrees with the convolution (tail %.3g)",
							pop.name, rule.name, label, sp.name, hits, reps, exact, math.Min(lo, hi))
					}
				}
			}
		}
	}
	t.Logf("acceptance at the ceiling, %d runs per row, α = %.2g:\n%s", reps, alpha, table.String())
}

package verdict

import (
	"math"
	"probity/plan"
	"testing"
)

// TestHoeffdingAndChernoffBounds checks the closed forms and their
// defining equations.
func TestHoeffdingAndChernoffBounds(t *testing.T) {
	// Self-weighting: Σ W_h²/n_h = 1/n, bound p̂ + √(ln(1/α)/(2n))
	// (Hoeffding 1963, Theorem 1; arithmetic by hand: ln 20 = 2.99573…).
	e := Estimate{Rate: 0.01, SumW2n: 1.0 / 1000}
	want := 0.01 + math.Sqrt(math.Log(20)/2000)
	if got := WeightedHoeffdingUpper(e, 0.95); !close(got, want, 1e-15) {
		t.Errorf("hoeffding %v, want %v", got, want)
	}
	// p-value at the ceiling equal to the bound is α.
	if got := WeightedHoeffdingPValue(e, want); !close(got, 0.05, 1e-12) {
		t.Errorf("hoeffding p-value at the bound %v, want 0.05", got)
	}
	// Chernoff: n·KL(p̂ ‖ u) = ln(1/α) at the bound, and the bound is
	// tighter than Hoeffding's.
	for _, c := range []struct{ x, n int }{{0, 100}, {5, 1000}, {40, 200}} {
		u := ChernoffUpper(c.x, c.n, 0.95)
		p := float64(c.x) / float64(c.n)
		if got := float64(c.n) * plan.BernoulliKL(p, u); !close(got, math.Log(20), 1e-9) {
			t.Errorf("%+v: n·KL at the bound %v, want ln 20", c, got)
		}
		h := WeightedHoeffdingUpper(Estimate{Rate: p, SumW2n: 1 / float64(c.n)}, 0.95)
		if !(u < h) {
			t.Errorf("%+v: chernoff %v not below hoeffding %v", c, u, h)
		}
		if got := ChernoffPValue(c.x, c.n, u); !close(got, 0.05, 1e-8) {
			t.Errorf("%+v: chernoff p-value at the bound %v", c, got)
		}
	}
}

// TestWeightedHoeffdingCoverage is a Monte Carlo check of the rigorous
// bound on a stratified design with unequal weights: over 20 000 simulated
// samples (fixed seed) at a true rate the bound must cover at least 1 − α;
// Hoeffding is conservative, so coverage far above is expected. Threshold:
// coverage ≥ 0.95 − 3·√(0.95·0.05/20000) ≈ 0.9454.
func TestWeightedHoeffdingCoverage(t *testing.T) {
	d := Design{Strata: []Stratum{{"a", 100000, 50}, {"b", 20000, 50}, {"c", 5000, 50}}}
	rates := []float64{0.02, 0.08, 0.2}
	var N float64
	truth := 0.0
	for h, s := range d.Strata {
		N += float64(s.Population)
		truth += float64(s.Population) * rates[h]
	}
	truth /= N
	state := uint64(12345)
	next := func() float64 { // splitmix64, a fixed-seed uniform source
		state += 0x9e3779b97f4a7c15
		z := state
		z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
		z = (z ^ (z >> 27)) * 0x94d049bb133111eb
		z ^= z >> 31
		return float64(z>>11) / (1 << 53)
	}
	covered := 0
	const runs = 20000
	x := make([]int, 3)
	for r := 0; r < runs; r++ {
		for h, s := range d.Strata {
			x[h] = 0
			for i := 0; i < s.Sample; i++ {
				if next() < rates[h] {
					x[h]++
				}
			}
		}
		e, _ := d.Stratified(x)
		if WeightedHoeffdingUpper(e, 0.95) >= truth {
			covered++
		}
	}
	if cov := float64(covered) / runs; cov < 0.9454 {
		t.Errorf("coverage %v below 0.9454", cov)
	}
}

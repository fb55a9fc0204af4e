package plan

import (
	"math"
	"math/rand/v2"
	"testing"
)

// binomialErrors simulates one audit of n independent decisions with error
// rate p and counts the errors, by jumping from error to error with
// geometric gaps (exact: the gap before the next error is Geometric(p)).
func binomialErrors(rng *rand.Rand, n int, p float64) int {
	if p <= 0 {
		return 0
	}
	lq := math.Log1p(-p)
	count := 0
	for pos := -1; ; count++ {
		u := 1 - rng.Float64() // (0, 1]
		pos += int(math.Floor(math.Log(u)/lq)) + 1
		if pos >= n {
			return count
		}
	}
}

// lotErrors simulates one audit of n decisions drawn without replacement
// from a lot of N holding d errors (an urn, draw by draw).
func lotErrors(rng *rand.Rand, n int, N, d int64) int {
	count := 0
	for i := 0; i < n; i++ {
		if rng.Int64N(N-int64(i)) < d-int64(count) {
			count++
		}
	}
	return count
}

// Monte Carlo check of the guarantee: 100 000 simulated audits per plan at
// the ceiling and at p0. The acceptance rate must (a) agree with the exact
// OC value within 4 standard errors and (b) stay below the allowed risk
// plus 4 standard errors — a false alarm about once in 30 000 runs, and
// the seed is fixed, so the test is deterministic.
func TestMonteCarloGuarantee(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation skipped with -short")
	}
	const audits = 100_000
	type point struct {
		name    string
		errRate float64
		// accept = true: the rate of acceptance is bounded (consumer);
		// false: the rate of rejection (producer).
		accept bool
	}
	base := inputs(0.02, 0.95)
	base.Anticipated = ptr(0.01)
	multi := base
	multi.CandidateCount, multi.Confidence = 5, 0.9
	zero := inputs(0.05, 0.9)
	lot := base
	lot.Population = 20000
	kl := base
	kl.Method = MethodKL
	for _, in := range []Inputs{base, multi, zero, lot, kl} {
		r, _, err := Size(in)
		if err != nil {
			t.Fatal(err)
		}
		f := &File{Inputs: in, Rule: r}
		rng := rand.New(rand.NewPCG(2026, uint64(r.SampleSize)))
		pts := []point{{"ceiling", in.Ceiling, true}}
		if in.Anticipated != nil {
			pts = append(pts, point{"p0", *in.Anticipated, false})
		}
		for _, pt := range pts {
			accepted := 0
			for i := 0; i < audits; i++ {
				var x int
				if in.Population > 0 {
					d := BadLotErrors(in.Population, pt.errRate)
					if !pt.accept {
						d = GoodLotErrors(in.Population, pt.errRate)
					}
					x = lotErrors(rng, r.SampleSize, in.Population, d)
				} else {
					x = binomialErrors(rng, r.SampleSize, pt.errRate)
				}
				if x <= r.AcceptanceNumber {
					accepted++
				}
			}
			rate := float64(accepted) / audits
			exact, bound := f.AcceptProbability(pt.errRate), r.PerCandidateRisk
			if !pt.accept {
				rate, exact, bound = 1-rate, 1-exact, in.ProducerRisk
			}
			se := math.Sqrt(exact*(1-exact)/audits) + 1/float64(audits)
			if math.Abs(rate-exact) > 4*se || rate > bound+4*se {
				t.Errorf("%+v (n %d, c %d) at %s: simulated rate %.5f, exact %.5f, bound %.5f (4 s.e. = %.5f)",
					in, r.SampleSize, r.AcceptanceNumber, pt.name, rate, exact, bound, 4*se)
			}
		}
	}
}

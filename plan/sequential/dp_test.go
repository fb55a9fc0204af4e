package sequential

import (
	"errors"
	"math"
	"math/rand/v2"
	"os/exec"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"probity/plan"
	"probity/plan/testkit/needs"
)

// Curtailment leaves the fixed plan's OC unchanged: the dynamic programme
// over the curtailed paths gives exactly P(X ≤ c) for X ~ Binomial(n, p),
// which is computed here twice more by independent routes — the full
// (uncurtailed) error-count distribution after n items (finalCDF, an
// absorbing-state recursion that never stops early) and gonum's
// distuv.Binomial (regularized incomplete beta). Tolerance: 1e-12
// relative against the recursion (same arithmetic, different paths),
// 1e-9 relative against gonum.
func TestCurtailmentKeepsFixedOC(t *testing.T) {
	plans := [][2]int{{1271, 17}, {2229, 28}, {150, 0}, {59, 0}, {20, 19}, {1, 0}, {506, 17}, {5000, 60}}
	for _, nc := range plans {
		n, c := nc[0], nc[1]
		r, err := Curtailed(n, c)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range []float64{0.0005, 0.005, 0.01, 0.02, 0.05, 0.3, 0.9} {
			perf, err := Evaluate(r, Binomial{P: p})
			if err != nil {
				t.Fatal(err)
			}
			full := finalCDF(Binomial{P: p}, n, c)[c]
			if d := math.Abs(perf.Accept - full); d > 1e-12*math.Max(full, 1e-300) && d > 1e-300 {
				t.Errorf("n %d c %d p %v: curtailed P(accept) %.17g, full %.17g", n, c, p, perf.Accept, full)
			}
			g := distuv.Binomial{N: float64(n), P: p}.CDF(float64(c))
			if g > 1e-280 && math.Abs(perf.Accept-g) > 1e-9*g {
				t.Errorf("n %d c %d p %v: curtailed P(accept) %.17g, gonum %.17g", n, c, p, perf.Accept, g)
			}
			if s := perf.Accept + perf.Reject; math.Abs(s-1) > 1e-12 {
				t.Errorf("n %d c %d p %v: accept + reject = %.17g", n, c, p, s)
			}
			if perf.ASN > float64(n)+1e-9 {
				t.Errorf("n %d c %d: ASN %v above n", n, c, perf.ASN)
			}
		}
	}
}

// The same for a finite lot: curtailed sampling without replacement keeps
// the hypergeometric acceptance probability P(X ≤ c | N, D, n).
func TestCurtailmentKeepsFixedOCHypergeometric(t *testing.T) {
	for _, cs := range []struct {
		N, D int64
		n, c int
	}{{5000, 100, 1000, 17}, {200, 10, 50, 2}, {1000, 0, 300, 0}, {300, 300, 20, 5}} {
		r, _ := Curtailed(cs.n, cs.c)
		m := Hypergeometric{N: cs.N, D: cs.D}
		perf, err := Evaluate(r, m)
		if err != nil {
			t.Fatal(err)
		}
		full := finalCDF(m, cs.n, cs.c)[cs.c]
		if math.Abs(perf.Accept-full) > 1e-12*math.Max(full, 1e-300) && math.Abs(perf.Accept-full) > 1e-300 {
			t.Errorf("%+v: curtailed %.17g, full %.17g", cs, perf.Accept, full)
		}
		// direct sum of the hypergeometric pmf by log-gamma (independent
		// route; common practice, no source)
		want := 0.0
		for x := 0; x <= cs.c; x++ {
			want += hyperPMF(cs.N, cs.D, int64(cs.n), int64(x))
		}
		if math.Abs(perf.Accept-want) > 1e-9*math.Max(want, 1e-300) && math.Abs(perf.Accept-want) > 1e-300 {
			t.Errorf("%+v: curtailed %.17g, pmf sum %.17g", cs, perf.Accept, want)
		}
	}
}

func hyperPMF(N, D, n, x int64) float64 {
	if x < 0 || x > D || n-x > N-D || x > n {
		return 0
	}
	lc := func(a, b int64) float64 {
		la, _ := math.Lgamma(float64(a + 1))
		lb, _ := math.Lgamma(float64(b + 1))
		lab, _ := math.Lgamma(float64(a - b + 1))
		return la - lb - lab
	}
	return math.Exp(lc(D, x) + lc(N-D, n-x) - lc(N, n))
}

// Against scipy (Debian's python3-scipy): the curtailed plans' P(accept)
// equals scipy.stats.binom.cdf and scipy.stats.hypergeom.cdf, relative
// tolerance 1e-9.
func TestCurtailmentAgainstScipy(t *testing.T) {
	py := needs.PythonModules(t, "scipy")
	script := `import sys
from scipy.stats import binom, hypergeom
for line in sys.stdin:
    k, a, b, c, d = line.split()
    if k == "b":
        print(repr(float(binom.cdf(int(c), int(a), float(b)))))
    else:
        print(repr(float(hypergeom.cdf(int(d), int(a), int(b), int(c)))))
`
	type q struct {
		kind string
		n, c int
		p    float64
		N, D int64
	}
	qs := []q{{"b", 1271, 17, 0.02, 0, 0}, {"b", 1271, 17, 0.01, 0, 0}, {"b", 2229, 28, 0.02, 0, 0}, {"b", 45968, 29, 0.001, 0, 0},
		{"h", 1000, 17, 0, 5000, 100}, {"h", 50, 2, 0, 200, 10}}
	var in strings.Builder
	for _, x := range qs {
		if x.kind == "b" {
			in.WriteString("b " + strconv.Itoa(x.n) + " " + strconv.FormatFloat(x.p, 'g', -1, 64) + " " + strconv.Itoa(x.c) + " 0\n")
		} else {
			// hypergeom.cdf(k, M=N, n=D, N=draws)
			in.WriteString("h " + strconv.FormatInt(x.N, 10) + " " + strconv.FormatInt(x.D, 10) + " " + strconv.Itoa(x.n) + " " + strconv.Itoa(x.c) + "\n")
		}
	}
	cmd := exec.Command(py, "-c", script)
	cmd.Stdin = strings.NewReader(in.String())
	out, err := cmd.Output()
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Fields(string(out))
	for i, x := range qs {
		want, _ := strconv.ParseFloat(lines[i], 64)
		r, _ := Curtailed(x.n, x.c)
		var m Model = Binomial{P: x.p}
		if x.kind == "h" {
			m = Hypergeometric{N: x.N, D: x.D}
		}
		perf, _ := Evaluate(r, m)
		if math.Abs(perf.Accept-want) > 1e-9*want {
			t.Errorf("%+v: curtailed %.15g, scipy %.15g", x, perf.Accept, want)
		}
	}
}

// simulate runs audits of rule r with error rate p and returns the
// acceptances and the sum and sum of squares of the stopping times.
func simulate(r *Rule, p float64, runs int, rng *rand.Rand) (acc int, sum, sum2 float64) {
	for i := 0; i < runs; i++ {
		e := 0
		for t := 1; t <= r.MaxSampleSize(); t++ {
			if rng.Float64() < p {
				e++
			}
			if d := r.At(t, e); d != Continue {
				if d == Accept {
					acc++
				}
				sum += float64(t)
				sum2 += float64(t) * float64(t)
				break
			}
		}
	}
	return acc, sum, sum2
}

// The dynamic programme's OC and ASN agree with a Monte Carlo simulation
// of the designed plan for the example (ceiling 0.02, anticipated
// 0.01, per-candidate risk 0.05, producer's risk 0.10): 100 000 audits per
// error rate, seed fixed, tolerance 4.5 standard errors (a false alarm
// about once in 150 000 runs of the test). The fixed-seed counts are
// locked as a regression guard.
func TestDesignedPlanDPAgreesWithMonteCarlo(t *testing.T) {
	d, err := Search(Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271})
	if err != nil {
		t.Fatal(err)
	}
	r, err := NewRule(d.Rule)
	if err != nil {
		t.Fatal(err)
	}
	const runs = 100_000
	rng := rand.New(rand.NewPCG(2026, 8))
	got := map[float64]int{}
	for _, p := range []float64{0.01, 0.015, 0.02} {
		exact, _ := Evaluate(d.Rule, Binomial{P: p})
		acc, sum, sum2 := simulate(r, p, runs, rng)
		got[p] = acc
		pa := float64(acc) / runs
		se := math.Sqrt(exact.Accept * (1 - exact.Accept) / runs)
		asn := sum / runs
		seN := math.Sqrt((sum2/runs - asn*asn) / runs)
		if math.Abs(pa-exact.Accept) > 4.5*se {
			t.Errorf("p %v: simulated P(accept) %.5f, DP %.5f (se %.5f)", p, pa, exact.Accept, se)
		}
		if math.Abs(asn-exact.ASN) > 4.5*seN {
			t.Errorf("p %v: simulated ASN %.2f, DP %.2f (se %.2f)", p, asn, exact.ASN, seN)
		}
		t.Logf("p %v: DP P(accept) %.5f ASN %.2f; simulated %.5f ASN %.2f", p, exact.Accept, exact.ASN, pa, asn)
	}
	// regression guard: acceptances with this seed and this plan
	locked := map[float64]int{0.01: 90112, 0.015: 38109, 0.02: 5014}
	for p, want := range locked {
		if got[p] != want {
			t.Errorf("fixed-seed acceptances at p %v: %d, locked %d (the plan, the DP or the generator changed)", p, got[p], want)
		}
	}
}

func TestEvaluateRejectsBadRules(t *testing.T) {
	two := 2
	one := 1
	cases := []struct {
		name string
		r    *plan.SequentialRule
	}{
		{"nil", nil},
		{"empty", &plan.SequentialRule{}},
		{"short arrays", &plan.SequentialRule{MaxSampleSize: 2, AcceptIfErrorsAtMost: []int{-1}, RejectIfErrorsAtLeast: []*int{nil}}},
		{"not meeting at T", &plan.SequentialRule{MaxSampleSize: 2, AcceptIfErrorsAtMost: []int{-1, 0}, RejectIfErrorsAtLeast: []*int{nil, &two}}},
		{"open at T", &plan.SequentialRule{MaxSampleSize: 2, AcceptIfErrorsAtMost: []int{-1, 0}, RejectIfErrorsAtLeast: []*int{nil, nil}}},
		{"reject not above accept", &plan.SequentialRule{MaxSampleSize: 2, AcceptIfErrorsAtMost: []int{1, 0}, RejectIfErrorsAtLeast: []*int{&one, &one}}},
		{"accept above t", &plan.SequentialRule{MaxSampleSize: 2, AcceptIfErrorsAtMost: []int{2, 0}, RejectIfErrorsAtLeast: []*int{nil, &one}}},
	}
	for _, c := range cases {
		if _, err := Evaluate(c.r, Binomial{P: 0.1}); !errors.Is(err, ErrDomain) {
			t.Errorf("%s: err = %v, want ErrDomain", c.name, err)
		}
	}
	r, _ := Curtailed(10, 1)
	if _, err := Evaluate(r, Binomial{P: 1.5}); !errors.Is(err, ErrDomain) {
		t.Errorf("p = 1.5: err = %v", err)
	}
	if _, err := Evaluate(r, Hypergeometric{N: 5, D: 1}); !errors.Is(err, ErrDomain) {
		t.Errorf("T above lot: err = %v", err)
	}
	if _, err := Curtailed(10, 10); !errors.Is(err, ErrDomain) {
		t.Errorf("c = n: err = %v", err)
	}
}

package plan

import (
	"errors"
	"math"
	"math/rand/v2"
	"probity/plan/inputerr"
	"testing"
)

func ptr(v float64) *float64 { return &v }

// inputs returns valid default inputs for tests.
func inputs(ceiling, confidence float64) Inputs {
	return Inputs{Ceiling: ceiling, Confidence: confidence, CandidateCount: 1, ProducerRisk: DefaultProducerRisk,
		Method: MethodExact, Multiplicity: Bonferroni, Design: DesignFixed, Require: RequireAll}
}

// Issue 2's example: ceiling 2%, 95% confidence, p0 = 1%, producer's risk
// 10% → n = 1271, c = 17 (checked independently with scipy.stats.binom by
// scanning every n, see TestSearchAgainstScipy).
func TestIssueExample(t *testing.T) {
	in := inputs(0.02, 0.95)
	in.Anticipated = ptr(0.01)
	r, cmp, err := Size(in)
	if err != nil {
		t.Fatal(err)
	}
	if r.SampleSize != 1271 || r.AcceptanceNumber != 17 {
		t.Fatalf("plan = (n %d, c %d), want (1271, 17)", r.SampleSize, r.AcceptanceNumber)
	}
	if !(r.ConsumerRisk <= 0.05) || r.ProducerRisk == nil || !(*r.ProducerRisk <= 0.10) {
		t.Errorf("risks: consumer %v, producer %v", r.ConsumerRisk, r.ProducerRisk)
	}
	// n−1 with its best c must fail one of the two risks (minimality).
	c := AcceptanceNumberFor(1270, in)
	if BinomialSF(c, 1270, 0.01) <= 0.10 {
		t.Errorf("n = 1270 with c = %d already meets both risks", c)
	}
	want := map[string]int64{RuleExactBinomial: 1271}
	for _, row := range cmp {
		if w, ok := want[row.Rule]; ok && row.SampleSize != w {
			t.Errorf("comparison %s = %d, want %d", row.Rule, row.SampleSize, w)
		}
	}
	// Hoeffding holds to the same 10% producer's risk: more than the
	// textbook ln(1/α)/(2(ceiling−p0)²) = 14 979, which gives a model at p0
	// only even odds (common practice, no source).
	f := &File{Inputs: in, Rule: r, Comparison: cmp}
	if h, _ := f.ComparisonSize(RuleHoeffding); h < 14979 || h > 25000 {
		t.Errorf("hoeffding n = %d, want above 14 979 and well below 25 000", h)
	}
}

// Zero-failure plans: the success-run relation n = ⌈ln(1 − C)/ln(R)⌉ with
// reliability R = 1 − ceiling and confidence C, and its commonly tabulated
// values (95/95 → 59, 90/90 → 22, 95/99 → 299, 99/99 → 459; e.g. the
// success-run tables of reliability demonstration testing). Exact.
func TestZeroFailureSuccessRun(t *testing.T) {
	for _, tc := range []struct {
		conf, rel float64
		n         int
	}{
		{0.95, 0.95, 59}, {0.90, 0.90, 22}, {0.95, 0.99, 299}, {0.99, 0.99, 459},
		{0.999, 0.999, 6905},
	} {
		in := inputs(1-tc.rel, tc.conf)
		r, _, err := Size(in)
		if err != nil {
			t.Fatal(err)
		}
		succ := int(math.Ceil(math.Log(1-tc.conf) / math.Log(tc.rel)))
		if r.SampleSize != tc.n || r.AcceptanceNumber != 0 || succ != tc.n {
			t.Errorf("C=%v R=%v: plan (n %d, c %d), success-run formula %d, table %d", tc.conf, tc.rel, r.SampleSize, r.AcceptanceNumber, succ, tc.n)
		}
	}
}

// NIST/SEMATECH e-Handbook of Statistical Methods §6.2.3.2, OC table of the
// single-sampling plan (n = 52, c = 3) (quoted from memory, 3 decimals;
// tolerance 0.0015 for the handbook's rounding).
func TestNISTSingleSamplingOC(t *testing.T) {
	f := &File{Rule: Rule{SampleSize: 52, AcceptanceNumber: 3}, Inputs: inputs(0.05, 0.95)}
	for _, tc := range []struct{ p, pa float64 }{
		{0.01, 0.998}, {0.02, 0.980}, {0.03, 0.930}, {0.04, 0.845}, {0.05, 0.739}, {0.06, 0.620},
		{0.07, 0.502}, {0.08, 0.394}, {0.09, 0.300}, {0.10, 0.223}, {0.12, 0.115}, {0.14, 0.055},
	} {
		if got := f.AcceptProbability(tc.p); math.Abs(got-tc.pa) > 0.0015 {
			t.Errorf("P(accept | p = %v) = %.4f, handbook %.3f", tc.p, got, tc.pa)
		}
	}
	// The same plan read as a design: with AQL = 0.01 at its actual
	// producer's risk and LTPD = 0.10 at its actual consumer's risk, the
	// search must return (52, 3) or a smaller plan meeting both.
	in := inputs(0.10, 1-BinomialCDF(3, 52, 0.10))
	in.Anticipated = ptr(0.01)
	in.ProducerRisk = BinomialSF(3, 52, 0.01) + 1e-12
	r, _, err := Size(in)
	if err != nil {
		t.Fatal(err)
	}
	if r.SampleSize > 52 {
		t.Errorf("search for the (52, 3) requirements gave n = %d", r.SampleSize)
	}
}

func TestMultiplicity(t *testing.T) {
	base := inputs(0.02, 0.95)
	base.Anticipated = ptr(0.01)
	sizes := map[Multiplicity]int{}
	for _, m := range Multiplicities() {
		in := base
		in.CandidateCount = 5
		in.Multiplicity = m
		r, _, err := Size(in)
		if err != nil {
			t.Fatal(err)
		}
		sizes[m] = r.SampleSize
		wantAlpha := 0.05 / 5
		if m == FixedSequence {
			wantAlpha = 0.05
		}
		if math.Abs(r.PerCandidateRisk-wantAlpha) > 1e-15 || !(r.ConsumerRisk <= r.PerCandidateRisk) {
			t.Errorf("%s: per-candidate risk %v (want %v), consumer risk %v", m, r.PerCandidateRisk, wantAlpha, r.ConsumerRisk)
		}
	}
	if sizes[Holm] != sizes[Bonferroni] || sizes[FixedSequence] != 1271 || sizes[Bonferroni] <= 1271 {
		t.Errorf("sizes by multiplicity: %v", sizes)
	}
}

func TestValidateAndLimits(t *testing.T) {
	bad := []struct {
		field string
		edit  func(*Inputs)
	}{
		{"ceiling", func(in *Inputs) { in.Ceiling = 0 }},
		{"ceiling", func(in *Inputs) { in.Ceiling = 1 }},
		{"confidence", func(in *Inputs) { in.Confidence = 1.2 }},
		{"candidates", func(in *Inputs) { in.CandidateCount = 0 }},
		{"anticipated", func(in *Inputs) { in.Anticipated = ptr(0.02) }},
		{"producer-risk", func(in *Inputs) { in.ProducerRisk = 0 }},
		{"method", func(in *Inputs) { in.Method = Method(99) }},
		{"multiplicity", func(in *Inputs) { in.Multiplicity = Multiplicity(99) }},
		{"ceiling", func(in *Inputs) { in.Ceiling = math.NaN() }},
	}
	for _, tc := range bad {
		in := inputs(0.02, 0.95)
		tc.edit(&in)
		_, _, err := Size(in)
		var ie *inputerr.Error
		if !errors.As(err, &ie) || ie.Field != tc.field {
			t.Errorf("%s: error %v, want an input error on %s", tc.field, err, tc.field)
		}
	}
	// more than 10^8 labels: which input to relax.
	in := inputs(1e-9, 0.999)
	_, _, err := Size(in)
	var tl *TooLargeError
	if !errors.As(err, &tl) || tl.Relax[0] != "ceiling" {
		t.Errorf("tiny ceiling: %v, want TooLargeError relaxing the ceiling", err)
	}
	in = inputs(0.02, 0.95)
	in.Anticipated = ptr(0.019999)
	_, _, err = Size(in)
	if !errors.As(err, &tl) || tl.Relax[0] != "anticipated" {
		t.Errorf("p0 next to the ceiling: %v, want TooLargeError relaxing anticipated", err)
	}
	// a lot too small for any sample: α = 0.001 < 1/N.
	in = inputs(0.001, 0.999)
	in.Population = 500
	_, _, err = Size(in)
	if !errors.As(err, &tl) || tl.Population != 500 {
		t.Errorf("tiny lot: %v, want TooLargeError naming the population", err)
	}
}

// The plan of a finite lot never needs more than the binomial plan, and its
// risks hold at D1 = ⌈ceiling·N⌉ and D0 = ⌊p0·N⌋.
func TestPopulationPlans(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for i := 0; i < 60; i++ {
		in := inputs(0.005+0.1*rng.Float64(), 0.8+0.19*rng.Float64())
		if i%2 == 0 {
			in.Anticipated = ptr(in.Ceiling * (0.1 + 0.5*rng.Float64()))
		}
		in.Population = int64(2000 + rng.IntN(200000))
		r, cmp, err := Size(in)
		if err != nil {
			t.Fatal(err)
		}
		alpha := 1 - in.Confidence
		if got := HypergeometricCDF(r.AcceptanceNumber, in.Population, r.BadLotErrors, r.SampleSize); got > alpha || got != r.ConsumerRisk {
			t.Errorf("%+v: consumer risk %v (recorded %v) above %v", in, got, r.ConsumerRisk, alpha)
		}
		if in.Anticipated != nil && *r.ProducerRisk > in.ProducerRisk {
			t.Errorf("%+v: producer risk %v", in, *r.ProducerRisk)
		}
		f := &File{Comparison: cmp}
		if b, _ := f.ComparisonSize(RuleExactBinomial); int64(r.SampleSize) > b {
			t.Errorf("%+v: lot plan n = %d above the binomial plan's %d", in, r.SampleSize, b)
		}
	}
}

// Invariants on random inputs, extremes included: the rule keeps both
// risks, and one label fewer cannot (its best c misses one of them) —
// minimality checked directly at n − 1.
func TestSizeInvariants(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	for i := 0; i < 300; i++ {
		in := inputs(math.Pow(10, -3.5*rng.Float64()), 1-math.Pow(10, -0.3-4*rng.Float64()))
		if in.Ceiling >= 1 {
			in.Ceiling = 0.5
		}
		in.CandidateCount = 1 + rng.IntN(20)
		in.Multiplicity = Multiplicities()[rng.IntN(3)]
		in.ProducerRisk = 0.01 + 0.5*rng.Float64()
		if i%3 != 0 {
			in.Anticipated = ptr(in.Ceiling * rng.Float64() * 0.8)
		}
		if i%4 == 1 {
			in.Population = int64(100 + rng.IntN(1_000_000))
		}
		r, _, err := Size(in)
		var tl *TooLargeError
		if errors.As(err, &tl) {
			continue
		}
		if err != nil {
			t.Fatalf("%+v: %v", in, err)
		}
		alpha := in.PerCandidateRisk()
		if !(r.ConsumerRisk <= alpha) || (r.ProducerRisk != nil && !(*r.ProducerRisk <= in.ProducerRisk)) {
			t.Errorf("%+v: risks %v / %v", in, r.ConsumerRisk, r.ProducerRisk)
		}
		n := r.SampleSize - 1
		if n < 1 {
			continue
		}
		c := AcceptanceNumberFor(n, in)
		ok := c >= 0
		if ok && in.Anticipated != nil {
			if in.Population > 0 {
				ok = HypergeometricSF(c, in.Population, GoodLotErrors(in.Population, *in.Anticipated), n) <= in.ProducerRisk
			} else {
				ok = BinomialSF(c, n, *in.Anticipated) <= in.ProducerRisk
			}
		}
		if ok {
			t.Errorf("%+v: plan n = %d, but n − 1 with c = %d already keeps both risks", in, r.SampleSize, c)
		}
	}
}

package sequential

import (
	"errors"
	"math"
	"testing"
	"time"

	"probity/plan"
)

func exampleInputs(design plan.Design) plan.Inputs {
	p0 := 0.01
	return plan.Inputs{Ceiling: 0.02, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.10,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: design, Require: plan.RequireAll}
}

// Apply on the example keeps the fixed plan (1271, 17) for
// comparison, makes the truncation point the draw's sample size, and
// survives a Marshal/Parse round trip.
func TestApplyPlanFile(t *testing.T) {
	f, err := plan.Build(exampleInputs(plan.DesignSequential), plan.Meta{ToolVersion: "test", Created: time.Unix(0, 0), Seed: "ab"})
	if err != nil {
		t.Fatal(err)
	}
	if f.Rule.SampleSize != 1271 || f.Rule.AcceptanceNumber != 17 {
		t.Fatalf("fixed plan (%d, %d), want (1271, 17)", f.Rule.SampleSize, f.Rule.AcceptanceNumber)
	}
	d, err := Apply(f, 0)
	if err != nil {
		t.Fatal(err)
	}
	s := f.Sequential
	if s.FixedSampleSize != 1271 || s.FixedAcceptanceNumber != 17 || f.Rule.SampleSize != s.MaxSampleSize || f.Rule.AcceptanceNumber != s.AcceptIfErrorsAtMost[s.MaxSampleSize-1] {
		t.Errorf("plan file not updated: rule %+v, sequential T %d fixed (%d, %d)", f.Rule, s.MaxSampleSize, s.FixedSampleSize, s.FixedAcceptanceNumber)
	}
	if f.Rule.ConsumerRisk != d.ConsumerRisk || *f.Rule.ProducerRisk != d.ProducerRisk || f.Inputs.Design != plan.DesignSequential {
		t.Errorf("risks or design not stored")
	}
	data, err := f.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	g, src, err := plan.Decode(data, "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if err := g.Check(src); err != nil {
		t.Fatal(err)
	}
	if err := Check(g, src); err != nil {
		t.Fatal(err)
	}
	if err := Validate(g.Sequential); err != nil {
		t.Fatal(err)
	}
	perf, _ := Evaluate(g.Sequential, Binomial{P: 0.02})
	if perf.Accept != d.ConsumerRisk || g.Sequential.ASNAtCeiling != d.ASNAtCeiling {
		t.Errorf("round trip changed the rule")
	}
	oc, err := OC(g.Sequential, []float64{0, 0.01, 0.02, 1})
	if err != nil {
		t.Fatal(err)
	}
	if oc[0] != 1 || math.Abs(oc[1]-(1-d.ProducerRisk)) > 1e-12 || oc[2] != d.ConsumerRisk || oc[3] != 0 {
		t.Errorf("OC = %v", oc)
	}
}

func TestApplyNeedsAnticipatedAndExact(t *testing.T) {
	in := exampleInputs(plan.DesignSequential)
	f, _ := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Unix(0, 0), Seed: "ab"})
	f.Inputs.Anticipated = nil
	if _, err := Apply(f, 0); !errors.Is(err, ErrNeedsAnticipated) {
		t.Errorf("err = %v", err)
	}
	f, _ = plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Unix(0, 0), Seed: "ab"})
	f.Inputs.Method = plan.MethodHoeffding
	if _, err := Apply(f, 0); !errors.Is(err, ErrNeedsExact) {
		t.Errorf("err = %v", err)
	}
}

// A finite lot: the sequential boundaries are designed and judged on the
// hypergeometric model with D1 and D0 from the plan.
func TestApplyFiniteLot(t *testing.T) {
	in := exampleInputs(plan.DesignSequential)
	in.Population = 30000
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Unix(0, 0), Seed: "ab"})
	if err != nil {
		t.Fatal(err)
	}
	n := f.Rule.SampleSize
	d, err := Apply(f, 0)
	if err != nil {
		t.Fatal(err)
	}
	bad, _ := Evaluate(f.Sequential, Hypergeometric{N: 30000, D: f.Rule.BadLotErrors})
	good, _ := Evaluate(f.Sequential, Hypergeometric{N: 30000, D: f.Rule.GoodLotErrors})
	if bad.Accept > f.Rule.PerCandidateRisk || good.Reject > 0.10 || bad.Accept != d.ConsumerRisk {
		t.Errorf("lot risks %v %v", bad.Accept, good.Reject)
	}
	t.Logf("lot 30000: fixed n %d, T %d, ASN %.0f / %.0f", n, f.Rule.SampleSize, d.ASNAtAnticipated, d.ASNAtCeiling)
}

// Issue 13: a sequential plan on a batch prints its OC from the
// hypergeometric model, so the ceiling and anticipated rows agree with the
// stated risks (the binomial OC at the ceiling could exceed the allowed
// risk). 40 000 · 2 % = 800 = D1, ⌊40 000 · 1 %⌋ = 400 = D0.
func TestPlanOCFiniteLotAgreesWithRisks(t *testing.T) {
	in := exampleInputs(plan.DesignSequential)
	in.Population = 40000
	f, err := plan.Build(in, plan.Meta{ToolVersion: "test", Created: time.Unix(0, 0), Seed: "ab"})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Apply(f, 0); err != nil {
		t.Fatal(err)
	}
	p0, _ := f.AnticipatedPoint()
	oc, err := PlanOC(f, []float64{f.CeilingPoint(), p0})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(oc[0]-f.Rule.ConsumerRisk) > 1e-12 || oc[0] > f.Rule.PerCandidateRisk {
		t.Errorf("OC at the ceiling %v, stated consumer's risk %v (allowed %v)", oc[0], f.Rule.ConsumerRisk, f.Rule.PerCandidateRisk)
	}
	if math.Abs(1-oc[1]-*f.Rule.ProducerRisk) > 1e-12 {
		t.Errorf("1 − OC at p0 %v, stated producer's risk %v", 1-oc[1], *f.Rule.ProducerRisk)
	}
	stream, _ := OC(f.Sequential, []float64{f.CeilingPoint()})
	t.Logf("batch of 40000: OC at the ceiling %.5f hypergeometric, %.5f binomial; stated %.5f", oc[0], stream[0], f.Rule.ConsumerRisk)
}

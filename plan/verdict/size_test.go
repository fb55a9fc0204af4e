package verdict

import (
	"math"
	"testing"

	"probity/plan"
)

// TestSizeStratified sizes the power population of plan/stratified (four
// strata with shares 0.45/0.35/0.18/0.02 of 100 000, ceiling 2 %,
// confidence 0.95, p0 = 1 %, producer's risk 10 %) for equal allocation:
// the n found keeps both risks under the count rule, and no n in the 50
// below does (checked directly). The stratified package's power table
// gives 2285 labels for this design (from memory of its doc table: the
// same computation by another search).
func TestSizeStratified(t *testing.T) {
	p0 := 0.01
	in := plan.Inputs{Ceiling: 0.02, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.1,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	p, err := plan.Build(in, plan.Meta{Seed: "s"})
	if err != nil {
		t.Fatal(err)
	}
	strata := []Stratum{{Label: "a", Population: 45000}, {Label: "b", Population: 35000}, {Label: "c", Population: 18000}, {Label: "d", Population: 2000}}
	equal := func(n int) ([]int, error) {
		out := make([]int, 4)
		for h := range out {
			out[h] = n / 4
			if h < n%4 {
				out[h]++
			}
		}
		return out, nil
	}
	n, d, a, err := SizeStratified(p, strata, nil, equal, p.Rule.SampleSize, 100000)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("equal allocation: n = %d (%v), c = %d of %d counted, producer's risk %.4f, consumer's bound %.4f; simple random sample %d",
		n, d.Strata, a.Count.Accept, a.Count.CountedSize(), a.ProducerRisk, a.Count.ConsumerRiskBound(), p.Rule.SampleSize)
	if a.ProducerRisk > 0.1 || a.Count.ConsumerRiskBound() > 0.05 {
		t.Errorf("n = %d misses a risk: producer's %v, consumer's bound %v", n, a.ProducerRisk, a.Count.ConsumerRiskBound())
	}
	if math.Abs(float64(n)-2285) > 0.05*2285 {
		t.Errorf("n = %d, far from the power table's 2285", n)
	}
	for m := n - 50; m < n; m++ {
		nh, _ := equal(m)
		dm := Design{Strata: append([]Stratum(nil), strata...)}
		for h := range dm.Strata {
			dm.Strata[h].Sample = nh[h]
		}
		am := &Applied{Design: dm.stratified()}
		if err := am.count(p, dm, nil, p.Rule.PerCandidateRisk); err != nil {
			t.Fatal(err)
		}
		if am.ProducerRisk <= 0.1 {
			t.Errorf("n = %d < %d already keeps the producer's risk (%v)", m, n, am.ProducerRisk)
		}
	}
}

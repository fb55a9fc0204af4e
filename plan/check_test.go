package plan

import (
	"os"
	"testing"
	"time"
)

// Every plan Build makes passes Check, and its rule, as a record repeats
// it, passes CheckStatedRule; the stated rule with n or c edited does not.
func TestBuiltPlansPassTheirChecks(t *testing.T) {
	for _, method := range Methods() {
		for _, pop := range []int64{0, 30000} {
			for _, p0 := range []*float64{nil, ptr(0.004)} {
				for _, m := range []Multiplicity{Bonferroni, Holm, FixedSequence} {
					in := inputs(0.02, 0.95)
					in.Method, in.Population, in.Anticipated, in.Multiplicity, in.CandidateCount = method, pop, p0, m, 3
					f, err := Build(in, Meta{ToolVersion: "t", Created: time.Unix(1, 0), Seed: "s"})
					if err != nil {
						t.Fatal(err)
					}
					data, err := f.Marshal()
					if err != nil {
						t.Fatal(err)
					}
					if _, err := parse(data, "p.yaml"); err != nil {
						t.Errorf("%s %d %v %s: %v", method, pop, p0 != nil, m, err)
					}
					if err := CheckStatedRule(in, f.Rule, nil); err != nil {
						t.Errorf("%s %d %v %s: stated rule: %v", method, pop, p0 != nil, m, err)
					}
					r := f.Rule
					r.SampleSize--
					if err := CheckStatedRule(in, r, nil); err == nil {
						t.Errorf("%s %d %v %s: n − 1 passed", method, pop, p0 != nil, m)
					}
					r = f.Rule
					r.AcceptanceNumber++
					if err := CheckStatedRule(in, r, nil); err == nil {
						t.Errorf("%s %d %v %s: c + 1 passed", method, pop, p0 != nil, m)
					}
				}
			}
		}
	}
}

// A stated rule whose risks were recomputed for an edited n still fails
// when (n, c) does not keep the consumer's guarantee.
func TestStatedRuleKeepsTheGuarantee(t *testing.T) {
	in := inputs(0.02, 0.95)
	r := Rule{Model: ModelBinomial, SampleSize: 60, AcceptanceNumber: 5, PerCandidateRisk: in.PerCandidateRisk()}
	r.ConsumerRisk = BinomialCDF(5, 60, 0.02)
	err := CheckStatedRule(in, r, nil)
	if err == nil || err.Error() != "sample_size accepting at most 5 errors in 60 does not keep the consumer's risk 0.050000000000000044 (exact test)" {
		t.Errorf("%v", err)
	}
}

func benchParse(b *testing.B, data []byte) {
	for b.Loop() {
		if _, err := parse(data, "plan.yaml"); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCheck* time loading a plan (Decode and Check, the search run
// again): the draw folder's test plan, a lot plan, and the strictest plan
// of the sizing benchmarks (ceiling 0.001, confidence 0.999, M = 100,
// p0 = 0.0005, a lot of 5 000 000).
func BenchmarkCheckDrawPlan(b *testing.B) {
	data, err := os.ReadFile("../testdata/draw/plan.yaml")
	if err != nil {
		b.Fatal(err)
	}
	benchParse(b, data)
}

func BenchmarkCheckLot(b *testing.B) {
	data, err := examplePlan(b).Marshal()
	if err != nil {
		b.Fatal(err)
	}
	benchParse(b, data)
}

func BenchmarkCheckStrictLot(b *testing.B) {
	in := inputs(0.001, 0.999)
	in.CandidateCount = 100
	in.Anticipated = ptr(0.0005)
	in.Population = 5_000_000
	f, err := Build(in, Meta{ToolVersion: "t", Created: time.Unix(1, 0), Seed: "s"})
	if err != nil {
		b.Fatal(err)
	}
	data, err := f.Marshal()
	if err != nil {
		b.Fatal(err)
	}
	benchParse(b, data)
}

package verdict

import (
	"testing"

	"probity/plan"
	"probity/plan/record"
)

// TestVerdictAgreesWithBuiltPlans: on plans sized by plan.Build (the code
// `probity plan` runs), the verdict is "accept iff errors ≤ c" for every x
// from 0 to n (for the large Hoeffding and KL plans: 0 … c + 40 and n).
func TestVerdictAgreesWithBuiltPlans(t *testing.T) {
	p0 := 0.01
	p05 := 0.005
	inputs := []plan.Inputs{
		{Ceiling: 0.02, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.10, Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll},
		{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 1, ProducerRisk: 0.10, Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll},
		{Ceiling: 0.03, Confidence: 0.99, CandidateCount: 3, Anticipated: &p05, ProducerRisk: 0.2, Method: plan.MethodExact, Multiplicity: plan.Holm, Design: plan.DesignFixed, Require: plan.RequireAll},
		{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.10, Population: 3000, Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll},
		{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.10, Method: plan.MethodHoeffding, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll},
		{Ceiling: 0.05, Confidence: 0.95, CandidateCount: 1, Anticipated: &p0, ProducerRisk: 0.10, Method: plan.MethodKL, Multiplicity: plan.FixedSequence, Design: plan.DesignFixed, Require: plan.RequireAll},
	}
	for _, in := range inputs {
		meta := plan.Meta{Seed: "00112233445566778899aabbccddeeff", Classes: []string{"ok", "defect"}}
		for i := 0; i < in.CandidateCount; i++ {
			meta.Candidates = append(meta.Candidates, plan.Candidate{Name: string(rune('a' + i)), Column: "p"})
		}
		f, err := plan.Build(in, meta)
		if err != nil {
			t.Fatalf("%+v: %v", in, err)
		}
		n, c := f.Rule.SampleSize, f.Rule.AcceptanceNumber
		N := int64(10_000_000)
		if in.Population > 0 {
			N = in.Population
		}
		d := Design{Strata: []Stratum{{Label: "all", Population: N, Sample: n}}}
		last := n
		if n > 2000 {
			last = c + 40
		}
		xs := []int{}
		for x := 0; x <= last; x++ {
			xs = append(xs, x)
		}
		if last < n {
			xs = append(xs, n)
		}
		for _, x := range xs {
			errs := make([][]int, in.CandidateCount)
			for k := range errs {
				errs[k] = []int{x}
			}
			r := judge(t, Input{Plan: f, Design: d, Items: itemsWithErrors(d, errs)})
			cand := r.Candidates[0]
			if (cand.Verdict == record.Accept) != (x <= c) {
				t.Fatalf("%s plan n=%d c=%d (%s): x=%d gives %s (%s)", f.Rule.Model, n, c, in.Multiplicity, x, cand.Verdict, cand.Reason)
			}
		}
		t.Logf("%s/%s plan n = %d, c = %d: verdict = (x ≤ c) for %d values of x", f.Rule.Model, in.Multiplicity, n, c, len(xs))
	}
}

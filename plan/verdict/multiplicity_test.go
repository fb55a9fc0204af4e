package verdict

import (
	"testing"

	"probity/plan"
	"probity/plan/record"
)

func pTests(ps []float64) []Test {
	out := make([]Test, len(ps))
	for i, p := range ps {
		p := p
		out[i] = Test{PValue: p, Accept: func(lv float64) bool { return p <= lv }}
	}
	return out
}

// TestAdjustedPValuesAgainstStatsmodels compares the Holm and Bonferroni
// adjusted p-values and decisions with
// statsmodels.stats.multitest.multipletests.
func TestAdjustedPValuesAgainstStatsmodels(t *testing.T) {
	ps := []float64{0.012, 0.0004, 0.03, 0.2, 0.011, 0.0125}
	var want struct {
		Holm, Bonf       []float64
		HoldRej, BonfRej []bool
	}
	python(t, `
import json
from statsmodels.stats.multitest import multipletests
p=[0.012,0.0004,0.03,0.2,0.011,0.0125]
h=multipletests(p, alpha=0.05, method='holm'); b=multipletests(p, alpha=0.05, method='bonferroni')
print(json.dumps(dict(Holm=[float(v) for v in h[1]], Bonf=[float(v) for v in b[1]], HoldRej=[bool(v) for v in h[0]], BonfRej=[bool(v) for v in b[0]])))`, &want)
	holm := Holm(pTests(ps), 0.05)
	bonf := Bonferroni(pTests(ps), 0.05)
	for i := range ps {
		if !close(holm[i].Adjusted, want.Holm[i], 1e-12) || holm[i].Accepted != want.HoldRej[i] {
			t.Errorf("holm %d: adjusted %v accepted %v; statsmodels %v %v", i, holm[i].Adjusted, holm[i].Accepted, want.Holm[i], want.HoldRej[i])
		}
		if !close(bonf[i].Adjusted, want.Bonf[i], 1e-12) || bonf[i].Accepted != want.BonfRej[i] {
			t.Errorf("bonferroni %d: adjusted %v accepted %v; statsmodels %v %v", i, bonf[i].Adjusted, bonf[i].Accepted, want.Bonf[i], want.BonfRej[i])
		}
	}
}

// TestFixedSequenceStopsAtFirstFailure: testing in declared order at the
// full δ; after the first failure the rest are rejected as not reached,
// even one whose own p-value is tiny (common practice, no source).
func TestFixedSequenceStopsAtFirstFailure(t *testing.T) {
	got := FixedSequence(pTests([]float64{0.01, 0.04, 0.06, 0.001}), 0.05)
	wantAcc := []bool{true, true, false, false}
	wantNR := []bool{false, false, false, true}
	wantAdj := []float64{0.01, 0.04, 0.06, 0.06}
	for i := range got {
		if got[i].Accepted != wantAcc[i] || got[i].NotReached != wantNR[i] || got[i].Adjusted != wantAdj[i] {
			t.Errorf("%d: %+v", i, got[i])
		}
	}
}

// TestJudgeMultiplicityReasons runs the rules through Judge and checks the
// verdicts and the words a reviewer reads.
func TestJudgeMultiplicityReasons(t *testing.T) {
	n := 400
	d := oneStratum(n)
	// Fixed-sequence at δ = 0.05: m1 passes, m2 fails, m3 (perfect) is
	// not reached.
	c := largestC(n, 0.03, 0.05)
	p := testPlan(n, c, 0.03, 0.95, 3, plan.FixedSequence)
	r := judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{c}, {c + 1}, {0}})})
	want := []string{record.Accept, record.Reject, record.Reject}
	for i, cand := range r.Candidates {
		if cand.Verdict != want[i] {
			t.Errorf("fixed-sequence %s: %s (%s)", cand.Name, cand.Verdict, cand.Reason)
		}
	}
	if r.Candidates[2].Reason != "not reached: m2 was rejected earlier in the fixed sequence" {
		t.Errorf("reason %q", r.Candidates[2].Reason)
	}
	if r.Overall != record.Reject {
		t.Errorf("overall %s with require all", r.Overall)
	}
	p.Inputs.Require = plan.RequireAny
	if r := judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{c}, {c + 1}, {0}})}); r.Overall != record.Accept {
		t.Errorf("overall %s with require any", r.Overall)
	}

	// Holm at δ = 0.05 over 2: the first step tests at 0.025 (the plan's
	// c); the second at 0.05 can accept a candidate with more than c
	// errors.
	c2 := largestC(n, 0.03, 0.025)
	c1 := largestC(n, 0.03, 0.05)
	if c1 <= c2 {
		t.Fatalf("test needs c(0.05) > c(0.025): %d %d", c1, c2)
	}
	p = testPlan(n, c2, 0.03, 0.95, 2, plan.Holm)
	r = judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{0}, {c1}})})
	if r.Candidates[0].Verdict != record.Accept || r.Candidates[1].Verdict != record.Accept {
		t.Errorf("holm: %+v", r.Candidates)
	}
	if r.Candidates[1].Reason == "" || !containsStr(r.Candidates[1].Reason, "Holm step 2") || !containsStr(r.Candidates[1].Reason, "≤ level 0.05") {
		t.Errorf("holm reason %q", r.Candidates[1].Reason)
	}
	// Issue 13: the Holm-accepted candidate's bound is at the level of the
	// step that accepted it (0.05 here), below the ceiling, not at the
	// first step's 0.025 (where it lies above it).
	if h := r.Candidates[1]; h.BoundConfidence != 0.95 || !(h.UpperBound < 0.03) {
		t.Errorf("holm step 2: bound %v at confidence %v", h.UpperBound, h.BoundConfidence)
	}
	if u := plan.ClopperPearsonUpper(c1, n, 0.975); !(u >= 0.03) {
		t.Fatalf("test needs the first step's bound above the ceiling: %v", u)
	}
	if r.Candidates[0].BoundConfidence != 0.975 {
		t.Errorf("holm step 1: bound at confidence %v", r.Candidates[0].BoundConfidence)
	}
	// Bonferroni with the same data rejects the second.
	p.Inputs.Multiplicity = plan.Bonferroni
	r = judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{0}, {c1}})})
	if r.Candidates[1].Verdict != record.Reject {
		t.Errorf("bonferroni accepted %d errors > c = %d", c1, c2)
	}
}

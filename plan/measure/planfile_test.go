package measure

import (
	"math"
	"testing"

	"probity/plan"
)

// TestSolveAnticipated: two anticipated values fix a candidate's
// confusion shares (hand arithmetic, exact): prevalence 0.03, fnr 0.1
// gives TP = 0.027; fpr 0.01 gives FP = 0.0097; then error = 0.0097 +
// 0.003 = 0.0127, fdr = 0.0097/0.0367, for = 0.003/(0.003 + 0.9603).
func TestSolveAnticipated(t *testing.T) {
	gs, err := ParseAnticipated([]string{"fnr:0.1", "fpr:0.01"}, 1)
	if err != nil {
		t.Fatal(err)
	}
	an, err := solve(0.03, gs[0])
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		m    Measure
		want float64
	}{{Error, 0.0127}, {FNR, 0.1}, {FPR, 0.01}, {FDR, 0.0097 / 0.0367}, {FOR, 0.003 / 0.9633}} {
		if got := an.Value(c.m, 0.03); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s = %v, want %v (hand arithmetic)", c.m, got, c.want)
		}
	}
	// the same matrix from error and fdr
	gs, _ = ParseAnticipated([]string{"0.0127", "fdr:" + ftoa(0.0097/0.0367)}, 1)
	an2, err := solve(0.03, gs[0])
	if err != nil || math.Abs(an2.TP-an.TP) > 1e-12 || math.Abs(an2.FP-an.FP) > 1e-12 {
		t.Errorf("error and fdr give %+v (%v), want %+v", an2, err, an)
	}
	// inconsistent, and too few
	gs, _ = ParseAnticipated([]string{"fnr:0.1", "fpr:0.01", "error:0.05"}, 1)
	if _, err := solve(0.03, gs[0]); err == nil {
		t.Error("error 0.05 disagreeing with fnr 0.1 and fpr 0.01 was accepted")
	}
	gs, _ = ParseAnticipated([]string{"fnr:0.1"}, 1)
	if _, err := solve(0.03, gs[0]); err == nil {
		t.Error("one anticipated value was enough")
	}
}

func ftoa(v float64) string { return fmtFloat(v) }

// TestBuildPlanThresholds: three thresholds cut four cells, nested; the
// plan rechecks itself and a hand edit is refused.
func TestBuildPlanThresholds(t *testing.T) {
	th := func(v float64) *float64 { return &v }
	cands := []plan.Candidate{
		{Name: "s>=0.35", ScoreColumn: "s", Threshold: th(0.35), Positive: "d", Negative: "o"},
		{Name: "s>=0.65", ScoreColumn: "s", Threshold: th(0.65), Positive: "d", Negative: "o"},
	}
	spec := Spec{Candidates: cands, Positive: "d", Prevalence: 0.03, Decisions: 100000,
		Anticipated: []string{"fnr:0.02,0.15", "error:0.03,0.018"},
		Claims:      []plan.MeasureClaim{{Candidate: "s>=0.35", Measure: "fnr", Ceiling: 0.3}, {Candidate: "s>=0.65", Measure: "fnr", Ceiling: 0.3}},
		Confidence:  0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}
	m, err := BuildPlan(spec)
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Cells) != 3 || m.Cells[0].Label != "s<0.35" || len(m.Cells[2].Flagged) != 2 {
		t.Fatalf("cells %+v", m.Cells)
	}
	// positives: below 0.35 the misses of 0.35 (0.02·3000), above 0.65
	// the hits of 0.65 (0.85·3000)
	if m.Cells[0].Positives != 60 || m.Cells[2].Positives != 2550 {
		t.Errorf("positives %d, %d; want 60, 2550", m.Cells[0].Positives, m.Cells[2].Positives)
	}
	if m.Design.Total > m.Design.Uniform {
		t.Errorf("design %d above uniform %d", m.Design.Total, m.Design.Uniform)
	}
	f := &plan.File{Candidates: cands, Inputs: plan.Inputs{Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}, Measures: m}
	if err := Recheck(f); err != nil {
		t.Fatalf("recheck of an unedited plan: %v", err)
	}
	m.Cells[0].Sample--
	if err := Recheck(f); err == nil {
		t.Error("an edited design passed the recheck")
	}
}

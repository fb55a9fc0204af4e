package measure

import (
	"math"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/inputerr"

	"gopkg.in/yaml.v3"
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
	// each edit is refused: a cell's labels, a claim's counted items, its
	// floor, its producer's risk, the uniform comparison, a cell's
	// anticipated positives
	edits := []struct {
		name string
		edit func(m *plan.Measures)
	}{
		{"cells[0].sample", func(m *plan.Measures) { m.Cells[0].Sample-- }},
		{"cells[0].sample up", func(m *plan.Measures) { m.Cells[0].Sample++; m.Design.Total++ }},
		{"claims[1].design.counted", func(m *plan.Measures) { m.Claims[1].Design.Counted[0] -= 10 }},
		{"claims[0].design.floor", func(m *plan.Measures) { m.Claims[0].Design.Floor += 5 }},
		{"claims[0].producer_risk", func(m *plan.Measures) { m.Claims[0].ProducerRisk /= 2 }},
		{"claims[1].uniform_producer_risk", func(m *plan.Measures) { m.Claims[1].UniformProducerRisk /= 2 }},
		{"cells[1].uniform", func(m *plan.Measures) { m.Cells[1].Uniform++; m.Design.Uniform++ }},
		{"cells[2].positives", func(m *plan.Measures) { m.Cells[2].Positives++ }},
		{"design.saving", func(m *plan.Measures) { m.Design.Saving *= 2 }},
		{"assumes", func(m *plan.Measures) { m.Assumes = "nothing" }},
	}
	for _, e := range edits {
		data, err := yaml.Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		var edited plan.Measures
		if err := yaml.Unmarshal(data, &edited); err != nil {
			t.Fatal(err)
		}
		if err := Recheck(&plan.File{Candidates: cands, Inputs: f.Inputs, Measures: &edited}); err != nil {
			t.Fatalf("the plan read back from YAML fails its recheck: %v", err)
		}
		e.edit(&edited)
		if err := Recheck(&plan.File{Candidates: cands, Inputs: f.Inputs, Measures: &edited}); err == nil {
			t.Errorf("edited %s: passed the recheck", e.name)
		}
	}
}

// threeThresholds are the demo's kind of candidates: thresholds 0.35, 0.5
// and 0.65 on one score.
func threeThresholds() []plan.Candidate {
	th := func(v float64) *float64 { return &v }
	var cands []plan.Candidate
	for _, v := range []float64{0.35, 0.5, 0.65} {
		cands = append(cands, plan.Candidate{Name: "s>=" + fmtFloat(v), ScoreColumn: "s", Threshold: th(v), Positive: "d", Negative: "o"})
	}
	return cands
}

// TestBandComposition: one anticipated fnr and fpr per threshold fix the
// bands' decisions and positives. Hand arithmetic, exact: N = 100 000 at
// prevalence 0.03 holds P = 3 000 positives and 97 000 negatives; fnr
// 0.04, 0.10, 0.25 leave FN = 120, 300, 750 (TP = 2 880, 2 700, 2 250);
// fpr 0.03, 0.005, 0.001 flag FP = 2 910, 485, 97; so the thresholds flag
// 5 790, 3 185 and 2 347 decisions, and the bands hold
//
//	s<0.35        100 000 − 5 790 = 94 210 decisions, 3 000 − 2 880 = 120 positives
//	0.35<=s<0.5     5 790 − 3 185 =  2 605,             2 880 − 2 700 = 180
//	0.5<=s<0.65     3 185 − 2 347 =    838,             2 700 − 2 250 = 450
//	s>=0.65                          2 347,                             2 250
func TestBandComposition(t *testing.T) {
	spec := Spec{Candidates: threeThresholds(), Positive: "d", Prevalence: 0.03, Decisions: 100000,
		Anticipated: []string{"fnr:0.04,0.10,0.25", "fpr:0.03,0.005,0.001"},
		Claims:      []plan.MeasureClaim{{Candidate: "s>=0.5", Measure: "fnr", Ceiling: 0.2}},
		Confidence:  0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}
	pr, cl, _, pos, err := spec.problem()
	if err != nil {
		t.Fatal(err)
	}
	wantN := []int64{94210, 2605, 838, 2347}
	wantP := []int64{120, 180, 450, 2250}
	for i := range cl.Labels {
		if pr.Strata[i].Population != wantN[i] || pos[i] != wantP[i] {
			t.Errorf("band %s: %d decisions, %d positives; want %d, %d (hand arithmetic)", cl.Labels[i], pr.Strata[i].Population, pos[i], wantN[i], wantP[i])
		}
	}
	// the candidates given out of order take their values in declared order
	rev := spec
	rev.Candidates = []plan.Candidate{spec.Candidates[2], spec.Candidates[0], spec.Candidates[1]}
	rev.Anticipated = []string{"fnr:0.25,0.04,0.10", "fpr:0.001,0.03,0.005"}
	_, _, _, pos2, err := rev.problem()
	if err != nil || !slicesEqual(pos2, wantP) {
		t.Errorf("declared out of order: positives %v (%v), want %v", pos2, err, wantP)
	}
}

func slicesEqual(a, b []int64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// TestBandCompositionRefusals: anticipated values that no nested
// composition satisfies are input errors on --anticipated that name the
// values given and carry a hint.
func TestBandCompositionRefusals(t *testing.T) {
	for _, c := range []struct {
		anticipated []string
		want        string
	}{
		{[]string{"fnr:0.10,0.05,0.25", "error:0.03,0.01,0.01"}, "miss fewer positives"},    // fnr falls as the threshold rises
		{[]string{"fnr:0.04,0.10,0.25", "fpr:0.03,0.04,0.001"}, "raise more false alarms"},  // fpr rises with the threshold
		{[]string{"fnr:0.04,0.10,0.25", "error:0.01,0.02,0.03"}, "raise more false alarms"}, // error rising faster than the misses
	} {
		spec := Spec{Candidates: threeThresholds(), Positive: "d", Prevalence: 0.03, Decisions: 100000, Anticipated: c.anticipated,
			Claims: []plan.MeasureClaim{{Candidate: "s>=0.5", Measure: "fnr", Ceiling: 0.3}}, Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}
		_, _, _, _, err := spec.problem()
		e, ok := inputerr.As(err)
		if !ok || e.Field != "anticipated" || !strings.Contains(e.Msg, c.want) || !strings.Contains(e.Msg, c.anticipated[0]) || !strings.Contains(e.Msg, c.anticipated[1]) || e.Hint == "" {
			t.Errorf("%v: %v, want an input error on anticipated saying %q, naming the values, with a hint", c.anticipated, err, c.want)
		}
	}
}

// TestBuildPlanExpectedFailures: a claim anticipated at or above its
// ceiling is planned as an expected failure (judged on what the design
// labels, producer's risk near 1), the others are sized as usual and the
// plan rechecks; a plan where every claim is so is refused.
func TestBuildPlanExpectedFailures(t *testing.T) {
	spec := Spec{Candidates: threeThresholds(), Positive: "d", Prevalence: 0.03, Decisions: 100000,
		Anticipated: []string{"fnr:0.04,0.10,0.25", "fpr:0.03,0.005,0.001"},
		Claims: []plan.MeasureClaim{{Candidate: "s>=0.35", Measure: "fnr", Ceiling: 0.2}, {Candidate: "s>=0.5", Measure: "fnr", Ceiling: 0.2},
			{Candidate: "s>=0.65", Measure: "fnr", Ceiling: 0.2}},
		Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}
	m, err := BuildPlan(spec)
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []bool{false, false, true} {
		c := m.Claims[i]
		if c.Unplanned != want || (!want && c.ProducerRisk > 0.1) || (want && c.ProducerRisk < 0.5) {
			t.Errorf("claim %s: unplanned %v with producer's risk %v", c.Candidate, c.Unplanned, c.ProducerRisk)
		}
	}
	if m.Design.Family != 3 || math.Abs(m.Design.Level-0.05/3) > 1e-15 {
		t.Errorf("family %d at level %v: the expected failure shares δ", m.Design.Family, m.Design.Level)
	}
	f := &plan.File{Candidates: spec.Candidates, Inputs: plan.Inputs{Confidence: 0.95, ProducerRisk: 0.1, Multiplicity: plan.Bonferroni}, Measures: m}
	if err := Recheck(f); err != nil {
		t.Fatal(err)
	}
	spec.Claims = spec.Claims[2:]
	if _, err := BuildPlan(spec); err == nil {
		t.Error("a plan whose every claim is anticipated above its ceiling was built")
	}
}

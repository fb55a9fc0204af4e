package plan

import (
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

func TestEffectiveCandidates(t *testing.T) {
	for _, tc := range []struct {
		m    int
		mult Multiplicity
		want int
	}{
		{5, Bonferroni, 5}, {5, Holm, 5}, {5, FixedSequence, 1}, {1, Bonferroni, 1}, {0, Bonferroni, 1},
	} {
		if got := tc.mult.EffectiveCandidates(tc.m); got != tc.want {
			t.Errorf("EffectiveCandidates(%d, %s) = %d, want %d", tc.m, tc.mult, got, tc.want)
		}
	}
	f := &File{Inputs: Inputs{Confidence: 0.95, CandidateCount: 4, Multiplicity: Bonferroni}}
	if got := f.PerCandidateConfidence(); got != 1-(1-0.95)/4 {
		t.Errorf("PerCandidateConfidence = %v", got)
	}
	f.Inputs.Multiplicity = FixedSequence
	if got := f.PerCandidateConfidence(); got != 1-(1-0.95) {
		t.Errorf("fixed-sequence PerCandidateConfidence = %v", got)
	}
}

// TestPerCandidateRiskHasNoFloatNoise (issue 16 item 15): 1 − 0.95 is
// 0.050000000000000044 in binary; the per-candidate risk written to
// plan.yaml is the decimal the user means (exact decimals, from the
// definition α = δ/M').
func TestPerCandidateRiskHasNoFloatNoise(t *testing.T) {
	ninetyFive := 0.95 // a variable: the float64 arithmetic, not Go's exact constants
	for _, c := range []struct {
		m          Multiplicity
		confidence float64
		candidates int
		want       float64
	}{
		{Bonferroni, 0.95, 2, 0.025},
		{Bonferroni, 0.95, 1, 0.05},
		{Holm, 0.95, 3, (1 - ninetyFive) / 3}, // more than 12 figures: left as it is
		{FixedSequence, 0.9, 4, 0.1},
		{Bonferroni, 0.99, 5, 0.002},
	} {
		if got := c.m.PerCandidateRisk(1-c.confidence, c.candidates); got != c.want {
			t.Errorf("%v, confidence %v, %d candidates: per-candidate risk %v, want %v", c.m, c.confidence, c.candidates, got, c.want)
		}
	}
	var b strings.Builder
	if err := yaml.NewEncoder(&b).Encode(map[string]float64{"per_candidate_risk": Bonferroni.PerCandidateRisk(1-0.95, 2)}); err != nil {
		t.Fatal(err)
	}
	if got := b.String(); got != "per_candidate_risk: 0.025\n" {
		t.Errorf("plan.yaml would say %q", got)
	}
}

package plan

import "testing"

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

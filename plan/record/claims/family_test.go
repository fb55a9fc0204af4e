package claims

import (
	"slices"
	"testing"

	"probity/plan"
)

// Hand-worked cases of the three procedures (common practice, no source:
// Holm, Scand. J. Statist. 6, 1979, applied by hand).
func TestFamily(t *testing.T) {
	p := []float64{0.030, 0.010, 0.020, 0.200}
	for _, c := range []struct {
		m    plan.Multiplicity
		want []bool
	}{
		// δ/K = 0.0125: only 0.010
		{plan.Bonferroni, []bool{false, true, false, false}},
		// sorted 0.010 ≤ 0.0125, 0.020 ≤ 0.01667? no: stop
		{plan.Holm, []bool{false, true, false, false}},
		// declared order at δ = 0.05: 0.030, 0.010, 0.020 pass, 0.200 stops
		{plan.FixedSequence, []bool{true, true, true, false}},
	} {
		if got := Family(c.m, 0.05, p); !slices.Equal(got, c.want) {
			t.Errorf("%v: got %v, want %v", c.m, got, c.want)
		}
	}
	// Holm beyond Bonferroni: 0.010 ≤ 0.0125, 0.015 ≤ 0.01667, 0.024 ≤ 0.025, 0.04 ≤ 0.05
	if got := Family(plan.Holm, 0.05, []float64{0.04, 0.015, 0.024, 0.010}); !slices.Equal(got, []bool{true, true, true, true}) {
		t.Errorf("holm: got %v", got)
	}
	// monotone: lowering p-values never loses an acceptance
	for _, m := range []plan.Multiplicity{plan.Bonferroni, plan.Holm, plan.FixedSequence} {
		hi := []float64{0.02, 0.3, 0.011, 0.04}
		lo := []float64{0.001, 0.3, 0.011, 0.02}
		a, b := Family(m, 0.05, hi), Family(m, 0.05, lo)
		for i := range a {
			if a[i] && !b[i] {
				t.Errorf("%v: claim %d accepted at %v but not at the lower %v", m, i, hi, lo)
			}
		}
	}
}

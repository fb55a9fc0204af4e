package measure

import (
	"math"
	"testing"
)

// TestAnticipate: each anticipated measure, with the prevalence, gives the
// composition whose measures are those values (rounding to whole
// decisions aside: tolerance 1e-3); error and impossible values are
// refused.
func TestAnticipate(t *testing.T) {
	p := binary(4000, 96000)
	for _, c := range []struct {
		m      Measure
		v      float64
		wantTP int64
		wantFN int64
	}{
		{FNR, 0.1, 2700, 300},
		{FOR, 0.003125, 2700, 300},
		{FDR, 0.325, 2700, 300},
		{FPR, 1300.0 / 97000, 2700, 300},
	} {
		comp, err := Anticipate(p, 0, 0.03, c.m, c.v)
		if err != nil {
			t.Fatalf("%s %v: %v", c.m, c.v, err)
		}
		if comp.Positives[0] != c.wantTP || comp.Positives[1] != c.wantFN {
			t.Errorf("%s %v: positives %v, want [%d %d]", c.m, c.v, comp.Positives, c.wantTP, c.wantFN)
		}
		got, _ := trueValue(p, Claim{0, c.m, 0.5}, comp.Positives)
		if math.Abs(got-c.v) > 1e-3 {
			t.Errorf("%s: anticipated %v, the composition has %v", c.m, c.v, got)
		}
	}
	for _, bad := range []struct {
		m    Measure
		v    float64
		prev float64
	}{
		{Error, 0.01, 0.03}, // does not split the positives
		{FNR, 0.1, 0.5},     // half the log positive, only 4 % flagged: ρ₊ > 1
		{FDR, 0.1, 0.03},    // 3600 flagged positives of 3000: ρ₋ < 0
		{FOR, 1.2, 0.03},    // not a rate
		{FNR, 0.1, 0},       // no prevalence
	} {
		if _, err := Anticipate(p, 0, bad.prev, bad.m, bad.v); err == nil {
			t.Errorf("%s %v at prevalence %v: accepted", bad.m, bad.v, bad.prev)
		}
	}
}

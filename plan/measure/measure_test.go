package measure

import (
	"errors"
	"testing"

	"probity/plan/inputerr"
)

// TestMeasureNames: the names are kept exactly (the issue pins them), parse
// back, and an unknown name is an input error on the field "measure".
func TestMeasureNames(t *testing.T) {
	want := []string{"error", "fnr", "fpr", "for", "fdr"}
	for i, m := range Measures() {
		if m.String() != want[i] {
			t.Errorf("measure %d is named %q, want %q", i, m, want[i])
		}
		got, err := ParseMeasure(want[i])
		if err != nil || got != m {
			t.Errorf("ParseMeasure(%q) = %v, %v", want[i], got, err)
		}
		b, err := m.MarshalText()
		if err != nil || string(b) != want[i] {
			t.Errorf("MarshalText(%v) = %q, %v", m, b, err)
		}
		var back Measure
		if err := back.UnmarshalText(b); err != nil || back != m {
			t.Errorf("UnmarshalText(%q) = %v, %v", b, back, err)
		}
	}
	for _, bad := range []string{"", "FNR", "recall", "fnr "} {
		_, err := ParseMeasure(bad)
		var ie *inputerr.Error
		if !errors.As(err, &ie) || ie.Field != "measure" {
			t.Errorf("ParseMeasure(%q): %v, want an input error on the field measure", bad, err)
		}
	}
	var unset Measure
	if err := unset.UnmarshalText(nil); err != nil || unset != MeasureUnset {
		t.Errorf("the empty name decodes to %v, %v", unset, err)
	}
	if !FNR.Ratio() || !FPR.Ratio() || FOR.Ratio() || FDR.Ratio() || Error.Ratio() {
		t.Error("only fnr and fpr are ratios of unknown denominators")
	}
	if !FNR.Critical() || !FOR.Critical() || FPR.Critical() || FDR.Critical() || Error.Critical() {
		t.Error("only fnr and for count missed positives")
	}
}

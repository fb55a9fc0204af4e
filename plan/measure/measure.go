package measure

import (
	"fmt"
	"strings"

	"probity/plan/inputerr"
)

// Measure names an error rate a plan certifies for a declared positive
// (critical) class. It is written in plan.yaml and record.json by its name
// ("error", "fnr", "fpr", "for", "fdr"); the zero value is unset ("").
type Measure int

// The measures. With TP, FP, FN, TN the population counts of the
// one-vs-rest confusion matrix for the positive class:
const (
	// MeasureUnset: no measure named.
	MeasureUnset Measure = iota
	// Error is the overall error: decisions whose prediction differs from
	// the label, among all decisions (multi-class: any wrong class).
	Error
	// FNR is the false-negative (miss) rate FN / (FN + TP): positives the
	// model missed, among the true positives.
	FNR
	// FPR is the false-positive (false-alarm) rate FP / (FP + TN): among
	// the true negatives.
	FPR
	// FOR is the false omission rate FN / (FN + TN): positives among the
	// decisions the model cleared (predicted negative).
	FOR
	// FDR is the false discovery rate FP / (FP + TP): negatives among the
	// decisions the model flagged (predicted positive).
	FDR
)

var measureNames = []string{"", "error", "fnr", "fpr", "for", "fdr"}

// Measures lists the measures in their fixed order.
func Measures() []Measure { return []Measure{Error, FNR, FPR, FOR, FDR} }

// ParseMeasure returns the measure named s ("error", "fnr", "fpr", "for"
// or "fdr", exactly), or an input error on the field "measure".
func ParseMeasure(s string) (Measure, error) {
	for i, n := range measureNames {
		if i > 0 && n == s {
			return Measure(i), nil
		}
	}
	return MeasureUnset, &inputerr.Error{Field: "measure", Msg: fmt.Sprintf("%q is not one of %s", s, strings.Join(measureNames[1:], ", "))}
}

// String is the name as written in plan.yaml ("" when unset).
func (m Measure) String() string {
	if m >= 0 && int(m) < len(measureNames) {
		return measureNames[m]
	}
	return fmt.Sprintf("measure(%d)", int(m))
}

// MarshalText writes the name; an unknown value is an error.
func (m Measure) MarshalText() ([]byte, error) {
	if m < 0 || int(m) >= len(measureNames) {
		return nil, fmt.Errorf("measure(%d) has no name", int(m))
	}
	return []byte(measureNames[m]), nil
}

// UnmarshalText reads a name; the empty string is MeasureUnset.
func (m *Measure) UnmarshalText(b []byte) error {
	if len(b) == 0 {
		*m = MeasureUnset
		return nil
	}
	v, err := ParseMeasure(string(b))
	if err != nil {
		return err
	}
	*m = v
	return nil
}

// Title names the measure in a report.
func (m Measure) Title() string {
	switch m {
	case Error:
		return "error rate"
	case FNR:
		return "false-negative rate (miss rate)"
	case FPR:
		return "false-positive rate (false-alarm rate)"
	case FOR:
		return "false omission rate"
	case FDR:
		return "false discovery rate"
	}
	return m.String()
}

// Ratio reports whether the measure's denominator is itself unknown (a
// ratio of stratum totals: fnr and fpr), as opposed to a proportion of a
// known set of decisions (error, for, fdr).
func (m Measure) Ratio() bool { return m == FNR || m == FPR }

// OnNumerator reports whether the strata a candidate predicts positive
// (pos) or negative are on the measure's numerator side, where its events
// are counted: every stratum for error, the predicted negatives for for and
// fnr, the predicted positives for fdr and fpr.
func (m Measure) OnNumerator(pos bool) bool {
	switch m {
	case FOR, FNR:
		return !pos
	case FDR, FPR:
		return pos
	}
	return true
}

// Critical reports whether the measure counts the critical error type, a
// missed positive (fnr, for).
func (m Measure) Critical() bool { return m == FNR || m == FOR }

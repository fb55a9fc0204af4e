package trend

import (
	"fmt"
	"strconv"

	"probity/plan"
	"probity/plan/record"
)

// Class is what makes two audits comparable on one trend: the same kind of
// rule judging against the same requirement. Records of one trend must
// agree on every field:
//
//   - Model: the probability model behind the risks — "binomial" (an
//     unbounded stream), "hypergeometric" (a finite lot: the month's rows),
//     or a distribution-free bound ("hoeffding", "kl");
//   - Method: the decision rule ("exact", "hoeffding", "kl");
//   - Design: "fixed" (label n, count errors) or "sequential" (stop on
//     boundaries), whose samples and stopping differ in kind;
//   - Ceiling: the error that must not be exceeded;
//   - Confidence: 1 − δ, the level of every bound on the chart.
//
// Everything else may change from period to period and is reported as a
// warning rather than refused: the plan file itself (its fingerprint), the
// candidate set and with it the multiplicity split, the sample size, the
// anticipated error and the lot size.
type Class struct {
	Model      plan.Model  `json:"model"`
	Method     plan.Method `json:"method"`
	Design     plan.Design `json:"design"`
	Ceiling    float64     `json:"ceiling"`
	Confidence float64     `json:"confidence"`
}

// ClassOf returns the class of the plan a record was judged under.
func ClassOf(r *record.Record) Class {
	return Class{
		Model:      r.Plan.Model,
		Method:     r.Plan.Method,
		Design:     r.Plan.Design,
		Ceiling:    r.Plan.Ceiling,
		Confidence: r.Plan.Confidence,
	}
}

// MixedClassError reports two records of one trend judged under plans of
// different classes: Field is the record key that differs.
type MixedClassError struct {
	Field         string
	First, Second string // the values
	FirstFile     string
	SecondFile    string
	FirstPeriod   string
	SecondPeriod  string
}

// Error names the field, both values and both files.
func (e *MixedClassError) Error() string {
	return fmt.Sprintf("%s: %s is %s here but %s in %s (period %s): records of different classes of plan cannot share a trend",
		e.SecondFile, e.Field, e.Second, e.First, e.FirstFile, e.FirstPeriod)
}

// Hint suggests the fix.
func (e *MixedClassError) Hint() string {
	return "a trend compares audits of one model, method, design, ceiling and confidence; run a separate trend for each plan"
}

// differ returns the first field in which b's class differs from a's, with
// both values formatted, or ok = false when they agree.
func (a Class) differ(b Class) (field, va, vb string, ok bool) {
	num := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	switch {
	case a.Model != b.Model:
		return "plan.model", a.Model.String(), b.Model.String(), true
	case a.Method != b.Method:
		return "plan.method", a.Method.String(), b.Method.String(), true
	case a.Design != b.Design:
		return "plan.design", a.Design.String(), b.Design.String(), true
	case a.Ceiling != b.Ceiling:
		return "plan.ceiling", num(a.Ceiling), num(b.Ceiling), true
	case a.Confidence != b.Confidence:
		return "plan.confidence", num(a.Confidence), num(b.Confidence), true
	}
	return "", "", "", false
}

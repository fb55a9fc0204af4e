package templates

import (
	"bytes"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"text/template"
)

// Markers filled into the decision rule to see which values it prints:
// text no real wording holds.
const (
	markCeiling    = "⟦ceiling⟧"
	markBoundConf  = "⟦bound-confidence⟧"
	markConfidence = "⟦confidence⟧"
	markRecordID   = "⟦record-id⟧"
	markSampleSize = 7340519
	markAcceptance = 681327
)

// decisionRuleCases are the kinds of plan whose rule the decision-rule
// wording must state: a fixed count rule (n, c), a weighted bound, a
// sequential plan, and several candidates under each multiplicity rule.
func decisionRuleCases() map[string]Fields {
	base := func() Fields {
		f := sampleFields()
		f.Ceiling, f.BoundConfidence, f.Confidence = markCeiling, markBoundConf, markConfidence
		f.SampleSize, f.AcceptanceNumber = markSampleSize, markAcceptance
		f.Sequential, f.Weighted, f.Candidates, f.MultiplicityRule = false, false, 1, "bonferroni"
		f.CountRule, f.StepLevels = false, false
		f.Measures, f.Claims, f.ReleaseRule, f.Released, f.NoRelease = false, 0, "", "", false
		return f
	}
	fixed := base()
	weighted := base()
	weighted.Weighted = true
	sequential := base()
	sequential.Sequential = true
	count := base()
	count.Weighted, count.CountRule = true, true
	out := map[string]Fields{"a fixed plan": fixed, "a plan with unequal weights": weighted, "a sequential plan": sequential,
		"a stratified count rule": count}
	for _, m := range []string{"bonferroni", "holm", "fixed-sequence"} {
		f := base()
		f.Candidates, f.MultiplicityRule = 3, m
		out["three candidates under "+m] = f
	}
	measures := base()
	measures.Weighted, measures.Measures, measures.Claims, measures.Candidates = true, true, 6, 3
	measures.ReleaseRule, measures.Released = "the accepted candidate with the lowest estimated fnr", "candidate"
	out["with measures: six claims on three candidates"] = measures
	steps := base()
	steps.Candidates, steps.MultiplicityRule, steps.StepLevels = 3, "holm", true
	out["three candidates under holm, bounds at each step's confidence"] = steps
	return out
}

// checkDecisionRule refuses a decision rule that, for some kind of plan,
// does not state the numeric rule: the ceiling ({{.Ceiling}}), the
// confidence of the bound ({{.BoundConfidence}} or {{.Confidence}}), the
// sample size ({{.SampleSize}}) and, for a fixed count rule, the
// acceptance number ({{.AcceptanceNumber}}; under the stratified count rule
// the wording should state {{.CountAcceptance}}, which older reworded files
// lack, so it is not demanded). It returns the missing
// element in words, or "".
func checkDecisionRule(t *template.Template) (string, error) {
	cases := decisionRuleCases()
	kinds := make([]string, 0, len(cases))
	for k := range cases {
		kinds = append(kinds, k)
	}
	// A fixed order, so the same file always gets the same message.
	sort.Strings(kinds)
	for _, kind := range kinds {
		f := cases[kind]
		var buf bytes.Buffer
		if err := t.Execute(&buf, f); err != nil {
			return "", err
		}
		out := buf.String()
		missing := func(what string) string { return what + " for " + kind }
		switch {
		case !strings.Contains(out, markCeiling):
			return missing("the ceiling ({{.Ceiling}})"), nil
		case !strings.Contains(out, markBoundConf) && !strings.Contains(out, markConfidence):
			return missing("the confidence ({{.BoundConfidence}} or {{.Confidence}})"), nil
		case !strings.Contains(out, strconv.Itoa(markSampleSize)):
			return missing("the number of decisions labeled ({{.SampleSize}})"), nil
		case !f.Sequential && !f.Weighted && !strings.Contains(out, strconv.Itoa(markAcceptance)):
			return missing("the acceptance number ({{.AcceptanceNumber}})"), nil

		}
	}
	return "", nil
}

// safetyElements are what the cautions of a safety-relevant use (safety,
// medical, vehicle) must keep: the deferral to codes, to the regulator and
// to licensed professionals. Each is found by a pattern (case ignored).
var safetyElements = []struct {
	what string
	re   *regexp.Regexp
}{
	{"the deferral to the applicable codes and standards (\"defer to the applicable local codes and standards\")",
		regexp.MustCompile(`(?i)\bdefer\b[^.]*\bcodes?\b`)},
	{"the regulator (\"the clearance of the competent regulator\", \"authority\" or \"regulation\")",
		regexp.MustCompile(`(?i)\b(regulators?|regulations?|regulatory|authority|authorities)\b`)},
	{"the review by licensed professionals (\"review by qualified and licensed professionals\")",
		regexp.MustCompile(`(?i)\blicen[sc]ed\b`)},
}

// checkSafetyCaution returns the first required element a safety-relevant
// caution lacks, or "".
func checkSafetyCaution(text string) string {
	flat := strings.Join(strings.Fields(text), " ")
	for _, e := range safetyElements {
		if !e.re.MatchString(flat) {
			return e.what
		}
	}
	return ""
}

// namesRecordID reports whether a template prints the record id.
func namesRecordID(t *template.Template) (bool, error) {
	for _, f := range []Fields{sampleFields(), {}} {
		f.RecordID = markRecordID
		var buf bytes.Buffer
		if err := t.Execute(&buf, f); err != nil {
			return false, err
		}
		if strings.Contains(buf.String(), markRecordID) {
			return true, nil
		}
	}
	return false, nil
}

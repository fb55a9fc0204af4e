package record

import (
	"encoding/json"
	"strings"
)

// MeasureVerdict is the judgement of one claim of a plan with measures: a
// measure of a candidate against its ceiling (plan/measure).
type MeasureVerdict struct {
	Candidate string  `json:"candidate"`
	Measure   string  `json:"measure"`
	Ceiling   float64 `json:"ceiling"`
	// Labeled items of the claim's strata were counted and Events of them
	// are its events; for a ratio (fnr, fpr) also LabeledOther and
	// EventsOther on the denominator's other side.
	Labeled      int `json:"labeled"`
	Events       int `json:"events"`
	LabeledOther int `json:"labeled_other"`
	EventsOther  int `json:"events_other"`
	// Estimate is the weighted estimate (null when undefined).
	Estimate *float64 `json:"estimate"`
	// UpperBound is the one-sided upper bound at 1 − Level.
	UpperBound float64 `json:"upper_bound"`
	Level      float64 `json:"level"`
	PValue     float64 `json:"p_value"`
	Verdict    string  `json:"verdict"`
	// Planned is false when the period's design was not sized for the
	// claim's producer's risk (its consumer's risk holds all the same).
	Planned bool `json:"planned"`
}

// EstimatedConfusion is a candidate's one-vs-rest confusion matrix as
// estimated population counts (each stratum's labeled rates weighted by
// its size), with the estimated prevalence.
type EstimatedConfusion struct {
	Candidate  string  `json:"candidate"`
	TP         float64 `json:"tp"`
	FP         float64 `json:"fp"`
	FN         float64 `json:"fn"`
	TN         float64 `json:"tn"`
	Prevalence float64 `json:"prevalence"`
}

// MeasurePlan is what a plan with measures declared before any label
// that the record states beside the claims.
type MeasurePlan struct {
	// Positive is the positive (critical) class: the rates are
	// one-vs-rest for it.
	Positive string `json:"positive"`
	// Prevalence is the share of true positives the plan anticipated
	// (EstimatedConfusion holds the estimated one).
	Prevalence float64 `json:"prevalence"`
}

// Released names the candidate a plan's release rule picks; it is written
// as the candidate's name, or null when none qualifies.
type Released struct {
	Candidate string
}

// MarshalJSON writes the name, or null.
func (r Released) MarshalJSON() ([]byte, error) {
	if r.Candidate == "" {
		return []byte("null"), nil
	}
	return json.Marshal(r.Candidate)
}

// UnmarshalJSON reads a name or null.
func (r *Released) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		r.Candidate = ""
		return nil
	}
	return json.Unmarshal(b, &r.Candidate)
}

// fixReleased restores "released": null after decoding, which JSON's
// pointer decoding drops: a record with a release rule always names its
// release, or null.
func (r *Record) fixReleased() {
	if r.ReleaseRule != "" && r.Released == nil {
		r.Released = &Released{}
	}
}

// ReleaseRuleText says a release rule in words: "the accepted candidate
// with the lowest estimated fnr" for best:fnr, "the candidate NAME, when
// accepted" for a candidate's name, "" for no rule.
func ReleaseRuleText(rule string) string {
	if m, ok := strings.CutPrefix(rule, "best:"); ok {
		return "the accepted candidate with the lowest estimated " + m
	}
	if rule == "" {
		return ""
	}
	return "the candidate " + rule + ", when accepted"
}

// ReleaseStatement says what the record releases, for page 1 and the
// console: "released: NAME (RULE)", or "no candidate qualifies for
// release (RULE)"; "" when the plan declared no release rule.
func (r *Record) ReleaseStatement() string {
	if r.ReleaseRule == "" {
		return ""
	}
	rule := ReleaseRuleText(r.ReleaseRule)
	if r.Released == nil || r.Released.Candidate == "" {
		return "no candidate qualifies for release (" + rule + ")"
	}
	return "released: " + r.Released.Candidate + " (" + rule + ")"
}

// ReleaseFields are what the wording says of the release: the plan's
// release rule in words, the released candidate, and whether none
// qualified ("", "", false when the plan declares no release rule).
func (r *Record) ReleaseFields() (rule, released string, none bool) {
	if r.ReleaseRule == "" {
		return "", "", false
	}
	if r.Released != nil && r.Released.Candidate != "" {
		return ReleaseRuleText(r.ReleaseRule), r.Released.Candidate, false
	}
	return ReleaseRuleText(r.ReleaseRule), "", true
}

// Package record defines record.json, the machine-readable acceptance
// record: the judgement of every candidate, the plan it was judged under,
// the deviations, the sign-off and the fingerprints of every input. The PDF
// (package pdfreport) shows exactly what a Record holds and computes nothing
// new.
package record

import (
	"fmt"

	"probity/plan"
	"probity/plan/chrono"
)

// Format is the version of the record.json layout written by this code.
// Format 2 added the content-covering record id, the revision, the
// wording, the demonstration mark and the caveats.
const Format = 2

// Names of the files in a record folder (the signatures are in
// signature.FileName).
const (
	JSONFile = "record.json"
	PDFFile  = "record.pdf"
)

// Verdicts.
const (
	Accept = "ACCEPT"
	Reject = "REJECT"
)

// Record is record.json. Field order here is the key order on disk.
type Record struct {
	Format      int    `json:"format"`
	ToolVersion string `json:"tool_version"`
	// RecordID identifies the record: the first IDLength hex digits of the
	// SHA-256 of everything else it says (see ID), printed on every PDF
	// page. Two records differ in any field exactly when their ids do.
	RecordID string `json:"record_id"`
	// Revision counts the issues of a record: 1 for the first, 2 for a
	// record that supersedes it, and so on; Supersedes is the id of the
	// record this one replaces ("" for a first issue).
	Revision   int    `json:"revision"`
	Supersedes string `json:"supersedes"`
	// Demonstration marks a record made for the demonstration of the tool
	// on an invented scenario (sealed with a published demonstration
	// key); every PDF page says so.
	Demonstration bool `json:"demonstration"`
	// Date is the record's date, YYYY-MM-DD: the day it was issued (UTC).
	Date string `json:"date"`
	// Chronology states when the plan was made, the sample drawn and the
	// record issued, each with where its time came from (the system
	// clock, or the operator who supplied it); they are in that order.
	// Nil in records made before records were timed.
	Chronology *chrono.Chronology `json:"chronology,omitempty"`
	// Period is the audited period label ("" when none).
	Period        string `json:"period"`
	System        string `json:"system"`
	SystemVersion string `json:"system_version"`
	// Use is the declared use: general, safety, medical, vehicle, credit or
	// employment.
	Use  string   `json:"use"`
	Plan PlanInfo `json:"plan"`
	// Fingerprints are SHA-256 digests of the inputs.
	Fingerprints Fingerprints `json:"fingerprints"`
	// Completeness is what the log's time column said about the period
	// when the sample was drawn (the manifest's): the first and last time
	// and the days without a row. Nil, and absent, when the draw read no
	// time column.
	Completeness *chrono.Completeness `json:"completeness,omitempty"`
	Candidates   []Candidate          `json:"candidates"`
	Strata       []StratumCount       `json:"strata"`
	// OC is the plan's operating-characteristic curve, as plotted.
	OC         []OCPoint  `json:"oc"`
	Deviations Deviations `json:"deviations"`
	// Method names the bound used (plan.Bound: "clopper-pearson",
	// "korn-graubard (approximate)", "weighted-hoeffding", …) and its
	// assumptions in words.
	Method MethodInfo `json:"method"`
	// Wording identifies the wording the PDF was rendered with.
	Wording Wording   `json:"wording"`
	Signoff []Signoff `json:"signoff"`
	// SigningKey is the fingerprint of the public key that signed the
	// record ("" when unsigned).
	SigningKey string `json:"signing_key"`
	// OverallVerdict is ACCEPT when every candidate the plan requires is
	// accepted, else REJECT.
	OverallVerdict string `json:"overall_verdict"`
	// Caveats are the findings that change what a verdict means (label
	// error that consumes a candidate's margin; label error not measured
	// for a safety-relevant use), printed on page 1 beside the verdict.
	Caveats []Caveat `json:"caveats"`
	// LabelQuality is the double-labeling evidence (nil, and absent from
	// record.json, when no second worksheet was given).
	LabelQuality *LabelQuality `json:"label_quality,omitempty"`
	// LabelTrail is what the labeling's audit trail says (nil, and absent
	// from record.json, when the labels came from worksheets alone).
	LabelTrail *LabelTrail `json:"label_trail,omitempty"`
	// Measures are the claims of a plan with measures, judged by
	// plan/measure (the candidates' verdicts follow from them), with each
	// candidate's estimated confusion matrix.
	Measures           []MeasureVerdict     `json:"measures,omitempty"`
	EstimatedConfusion []EstimatedConfusion `json:"estimated_confusion,omitempty"`
	// ReleaseRule is the plan's release rule (a candidate, or
	// best:MEASURE); Released the candidate it picks, null when none
	// qualifies (the record then rejects).
	ReleaseRule string    `json:"release_rule,omitempty"`
	Released    *Released `json:"released,omitempty"`
	// MeasurePlan is what the plan with measures declared that the record
	// states beside the claims (nil, and absent, without measures).
	MeasurePlan *MeasurePlan `json:"measure_plan,omitempty"`
}

// LabelTrail summarises the audit trail the labels were derived from
// (label-trail.jsonl, whose SHA-256 is Fingerprints.Trail): who labeled,
// when, and how many labels were changed after they were given.
type LabelTrail struct {
	// Labelers are the names on the trail's label events, sorted.
	Labelers []string `json:"labelers"`
	// FirstLabel and LastLabel are the UTC times of the first and last
	// label event, to the millisecond ("" when the trail has none).
	FirstLabel string `json:"first_label"`
	LastLabel  string `json:"last_label"`
	// Events counts the label events (labels, notes, corrections);
	// Changed those that changed a label already given, each with its
	// reason in the trail.
	Events  int `json:"events"`
	Changed int `json:"changed"`
}

// Wording identifies the wording set (package templates) of the PDF.
type Wording struct {
	// Digest is the SHA-256 of the whole set (templates.Set.Fingerprint).
	Digest string `json:"digest"`
	// Replaced lists, sorted, the files that replaced the built-in
	// wording (empty for the built-in wording); page 1 flags them.
	Replaced []string `json:"replaced"`
}

// Kinds of caveat.
const (
	// CaveatLabelErrorMargin: the label error measured on the doubled
	// items is at least the distance between an accepted candidate's upper
	// bound and the ceiling.
	CaveatLabelErrorMargin = "label-error-consumes-margin"
	// CaveatLabelErrorUnmeasured: a safety, medical or vehicle use was
	// judged without a measure of label error (no double labeling, or no
	// doubled item labeled by both).
	CaveatLabelErrorUnmeasured = "label-error-not-measured"
	// CaveatIncompletePeriod: the log's time column shows days of the
	// period without a row, or rows dated outside it (see Completeness).
	CaveatIncompletePeriod = "incomplete-period"
)

// Caveat is a finding that changes what a verdict means.
type Caveat struct {
	// Kind is CaveatLabelErrorMargin or CaveatLabelErrorUnmeasured.
	Kind string `json:"kind"`
	// Candidate names the candidate it qualifies ("" for the record as a
	// whole).
	Candidate string `json:"candidate"`
	// Text says it in a sentence or two, with the record's numbers.
	Text string `json:"text"`
}

// PlanInfo repeats the plan's rule and inputs.
type PlanInfo struct {
	Fingerprint      string            `json:"fingerprint"`
	Method           plan.Method       `json:"method"`
	Model            plan.Model        `json:"model"`
	Design           plan.Design       `json:"design"`
	Multiplicity     plan.Multiplicity `json:"multiplicity"`
	Require          plan.Require      `json:"require"`
	Ceiling          float64           `json:"ceiling"`
	Confidence       float64           `json:"confidence"`
	CandidateCount   int               `json:"candidates"` // M; Record.Candidates lists them
	Anticipated      *float64          `json:"anticipated"`
	Population       LotSize           `json:"population"` // null: an unbounded stream
	SampleSize       int               `json:"sample_size"`
	AcceptanceNumber int               `json:"acceptance_number"`
	PerCandidateRisk float64           `json:"per_candidate_risk"`
	ConsumerRisk     float64           `json:"consumer_risk"`
	ProducerRisk     *float64          `json:"producer_risk"`
	Seed             string            `json:"seed"`
	SelectionSeed    string            `json:"selection_seed"`
}

// Fingerprints are lowercase hex SHA-256 digests.
type Fingerprints struct {
	Plan      string `json:"plan"`
	Log       string `json:"log"`
	Manifest  string `json:"manifest"`
	Ledger    string `json:"ledger"`
	Worksheet string `json:"worksheet"`
	Labels    string `json:"labels"`
	// Trail is the SHA-256 of the label trail the labels were derived
	// from ("", and absent, when there was none).
	Trail string `json:"trail,omitempty"`
}

// Candidate is the judgement of one candidate.
type Candidate struct {
	Name string `json:"name"`
	// Column, or ScoreColumn with Threshold, repeat how the plan defines
	// the candidate (a predicted-label column, or "score ≥ threshold" on a
	// score column), so the record names exactly what was judged.
	Column      string   `json:"column,omitempty"`
	ScoreColumn string   `json:"score_column,omitempty"`
	Threshold   *float64 `json:"threshold,omitempty"`
	// Labeled is the number of items that count toward the judgement (the
	// n of the bound; for a sequential plan, the labels up to the stopping
	// point); Errors counts mistakes among them. With --allow-incomplete
	// the missing or unsure items are included in both (see Missing).
	Labeled int `json:"labeled"`
	Errors  int `json:"errors"`
	// Missing is how many of the Labeled items were left unlabeled or
	// marked unsure and counted as errors (--allow-incomplete); they are
	// included in both Labeled (the n judged) and Errors.
	Missing int `json:"missing"`
	// Estimate is the point estimate of the error (stratified, weighted by
	// N_h/N, when weights are unequal).
	Estimate float64 `json:"estimate"`
	// UpperBound is the one-sided upper confidence bound at
	// BoundConfidence (1 − δ/M under Bonferroni).
	UpperBound      float64 `json:"upper_bound"`
	BoundConfidence float64 `json:"bound_confidence"`
	// PValue is the p-value of H0: error ≥ ceiling.
	PValue float64 `json:"p_value"`
	// AdjustedPValue is the multiplicity-adjusted p-value (Holm step-down,
	// Bonferroni) or nil where not defined.
	AdjustedPValue *float64 `json:"adjusted_p_value"`
	Verdict        string   `json:"verdict"`
	// Reason says in words why (e.g. "17 errors ≤ c = 17").
	Reason    string       `json:"reason"`
	Confusion Confusion    `json:"confusion"`
	Strata    []StratumErr `json:"strata"`
	// StoppedAt is, for a sequential plan, the number of labels at which
	// the boundaries decided (0 for a fixed plan).
	StoppedAt int `json:"stopped_at"`
	// CountedErrors is, under the stratified count rule, the errors among
	// the counted items (Method.Rule.Strata), which the verdict rests on;
	// nil under the other rules (absent from record.json).
	CountedErrors *int `json:"counted_errors,omitempty"`
	// KornGraubardUpper is, under the stratified count rule, the
	// Korn–Graubard bound on the stratified estimate at BoundConfidence: a
	// descriptive figure (approximate, and an empty stratum is left out of
	// it) that the verdict does not rest on; nil under the other rules.
	KornGraubardUpper *float64 `json:"korn_graubard_upper,omitempty"`
}

// Confusion is a confusion matrix: Counts[i][j] is how many items labeled
// Classes[i] the candidate predicted as Classes[j].
type Confusion struct {
	Classes []string `json:"classes"`
	Counts  [][]int  `json:"counts"`
}

// StratumCount is a stratum of the draw: N_h and n_h.
type StratumCount struct {
	Label      string  `json:"label"`
	Population int64   `json:"population"`
	Sample     int     `json:"sample"`
	Weight     float64 `json:"weight"`
}

// StratumErr is one candidate's errors in one stratum, with a two-sided
// exact (Clopper–Pearson) 95 % interval for the rate.
type StratumErr struct {
	Label   string  `json:"label"`
	Labeled int     `json:"labeled"`
	Errors  int     `json:"errors"`
	Rate    float64 `json:"rate"`
	Lower   float64 `json:"lower"`
	Upper   float64 `json:"upper"`
}

// Deviations lists departures from the plan. Empty lists mean "none".
type Deviations struct {
	SparesUsed      []string `json:"spares_used"`      // record ids
	Unlabeled       []string `json:"unlabeled"`        // record ids
	Unsure          []string `json:"unsure"`           // record ids
	AllowIncomplete bool     `json:"allow_incomplete"` // missing/unsure counted as errors
	Notes           []string `json:"notes"`
	// Replacements pairs each sample item marked unsure with the spare
	// that replaced it by the draw's fixed rule, with the reason (absent
	// when none was replaced).
	Replacements []SpareReplacement `json:"replacements,omitempty"`
	// SparesUnused are the labeled spares the rule gave no item to
	// replace (record ids): harmless, listed so nothing is unaccounted
	// for (absent when none).
	SparesUnused []string `json:"spares_unused,omitempty"`
	// DoubleNotLabeled is the number of items the draw set aside for a
	// second, independent label (the manifest's double) when the record
	// was made without second labels: the planned measure of label error
	// was not taken. 0, and absent, otherwise.
	DoubleNotLabeled int `json:"double_not_labeled,omitempty"`
	// NoMissMeasure is the plan's reason for claiming no measure on
	// missed positives (fnr, for) in a record of a safety, medical or
	// vehicle use, which needs one ("", and absent, otherwise): a
	// deviation stated on page 1.
	NoMissMeasure string `json:"no_miss_measure,omitempty"`
}

// SpareReplacement is a sample item marked unsure and the spare judged in
// its place (record ids), with the reason.
type SpareReplacement struct {
	Item   string `json:"item"`
	Spare  string `json:"spare"`
	Reason string `json:"reason"`
}

// DoubleNotLabeledText says in a sentence that the planned second
// labeling did not happen ("" when it did, or none was planned); the
// console and the PDF print it among the deviations.
func (d Deviations) DoubleNotLabeledText() string {
	switch k := d.DoubleNotLabeled; {
	case k == 1:
		return "1 item was drawn for a second, independent label, but the record was made without second labels: label error was not measured."
	case k > 1:
		return fmt.Sprintf("%d items were drawn for a second, independent label, but the record was made without second labels: label error was not measured.", k)
	}
	return ""
}

// MethodInfo states the method and its assumptions.
type MethodInfo struct {
	Bound       plan.Bound `json:"bound"`
	Approximate bool       `json:"approximate"`
	Statement   string     `json:"statement"`
	Assumptions []string   `json:"assumptions"`
	// Rule is the rule the verdicts rest on and why it applies (nil, and
	// absent, in records made before it was written).
	Rule *AppliedRule `json:"rule,omitempty"`
}

// Rule names in AppliedRule.Name.
const (
	// RulePlan: the plan's own rule — its (n, c) or its exact bound — on a
	// sample that is a simple random sample or an exactly proportional
	// stratified one.
	RulePlan = "plan"
	// RuleStratifiedCount: the stratified count rule (package
	// plan/stratified), for any other allocation.
	RuleStratifiedCount = "stratified-count"
	// RuleSequential: the plan's sequential boundaries on a simple random
	// sample labeled from the top.
	RuleSequential = "sequential"
)

// AppliedRule is the rule a record's verdicts rest on, fixed by the plan
// and the draw before any label was seen.
type AppliedRule struct {
	// Name is RulePlan, RuleStratifiedCount or RuleSequential.
	Name string `json:"name"`
	// Reason says why this rule applies to this draw.
	Reason string `json:"reason"`
	// Sources are the published results the rule rests on.
	Sources []string `json:"sources"`
	// The stratified count rule at the per-candidate risk (zero under the
	// other rules): a candidate passes when at most AcceptanceNumber of the
	// CountedSize counted items are errors. BadLotErrors is D* =
	// ⌈ceiling·N⌉ and LeastFavourableMean the expected number of counted
	// errors when D* errors sit where they are least likely to be found;
	// ConsumerRiskBound is the binomial bound on the chance of acceptance
	// at any spread of D* or more errors (at most the per-candidate risk).
	CountedSize         int     `json:"counted_size"`
	AcceptanceNumber    int     `json:"acceptance_number"`
	BadLotErrors        int64   `json:"bad_lot_errors"`
	LeastFavourableMean float64 `json:"least_favourable_mean"`
	ConsumerRiskBound   float64 `json:"consumer_risk_bound"`
	// ProducerRisk is the chance that a candidate with the anticipated
	// errors per stratum (AnticipatedFrom says which) is rejected under
	// this rule; nil when the plan's own rule applies (the plan states it).
	ProducerRisk    *float64 `json:"producer_risk"`
	AnticipatedFrom string   `json:"anticipated_from"`
	// Thinned is set when some strata count fewer items than they hold
	// (a sub-sample closer to proportional, fixed before labeling).
	Thinned bool `json:"thinned"`
	// Strata lists, per stratum in the record's order, how many of its
	// judged items count (empty under the plan's own rule).
	Strata []CountedStratum `json:"strata"`
}

// CountedStratum is one stratum under the stratified count rule: of its
// Judged items (in worksheet order, spares that replaced items last) the
// first Counted count, the last of them being worksheet item LastItem (0
// when none counts). Unknown is set for a stratum with no item: all of its
// decisions may be errors.
type CountedStratum struct {
	Label    string `json:"label"`
	Judged   int    `json:"judged"`
	Counted  int    `json:"counted"`
	LastItem int    `json:"last_item"`
	Unknown  bool   `json:"unknown"`
}

// Signoff is one line of the sign-off block.
type Signoff struct {
	Role    string `json:"role"`    // prepared, reviewed, approved
	Name    string `json:"name"`    // printed name ("" leaves the line blank)
	Title   string `json:"title"`   // the signer's role in the organisation
	Date    string `json:"date"`    // YYYY-MM-DD or ""
	Meaning string `json:"meaning"` // what the signature means
}

// OCPoint is one point of an operating-characteristic curve.
type OCPoint struct {
	Error             float64 `json:"error"`
	AcceptProbability float64 `json:"accept_probability"`
}

package templates

// Fields are the values a wording template can insert, already formatted
// for print by the caller (rates as percentages, probabilities as the
// record's number format). A string left "" makes {{if .Field}} false.
type Fields struct {
	// System and SystemVersion name the classifier under audit.
	System        string
	SystemVersion string
	// Period is the audited period label; Date the record's date.
	Period string
	Date   string
	// RecordID is the record's short fingerprint.
	RecordID string
	// Use is the declared use (general, safety, medical, …).
	Use string
	// Ceiling is the error ceiling, e.g. "2.000 %".
	Ceiling string
	// Confidence is the family-wise confidence 1 − δ, e.g. "95 %".
	Confidence string
	// FamilyRisk is δ, the risk that any candidate is falsely accepted.
	FamilyRisk string
	// BoundConfidence is the per-candidate confidence of the upper bounds.
	BoundConfidence string
	// PerCandidateRisk is the per-candidate false-accept risk (δ/M under
	// Bonferroni and Holm).
	PerCandidateRisk string
	// ConsumerRisk is the rule's exact P(accept | error = ceiling).
	ConsumerRisk string
	// Anticipated and ProducerRisk are p0 and P(reject | error = p0); ""
	// when the plan has no anticipated error.
	Anticipated  string
	ProducerRisk string
	// Candidates is M, the number of candidates judged on the sample.
	Candidates int
	// Multiplicity names the correction in words ("Bonferroni", "Holm",
	// "fixed-sequence"); "" for a single candidate.
	Multiplicity string
	// MultiplicityRule is the plan's rule as named in the plan file:
	// "bonferroni", "holm" or "fixed-sequence".
	MultiplicityRule string
	// Require is "all" or "any".
	Require string
	// Model and Rule name the probability model and the plan's method.
	Model string
	Rule  string
	// Sequential is true for a sequential design.
	Sequential bool
	// SampleSize is n and AcceptanceNumber is c.
	SampleSize       int
	AcceptanceNumber int
	// Population is N for a finite lot, formatted ("" for a stream).
	Population string
	// Bound names the upper-bound method (e.g. "Clopper–Pearson").
	Bound string
	// Approximate is true when the bound's coverage is approximate.
	Approximate bool
	// Weighted is true when the estimate weights strata by N_h/N.
	Weighted bool
	// Stratified is true when the draw had more than one stratum.
	Stratified bool
	// AllowIncomplete is true when missing or unsure labels were counted
	// as errors.
	AllowIncomplete bool
	// CountRule is true when the verdicts rest on the stratified count
	// rule: a candidate passes with at most CountAcceptance errors among
	// CountedSize counted items (Thinned: a sub-sample of some strata);
	// UnknownStrata strata had no item. CountRiskBound is the rule's bound
	// on the chance of accepting at the ceiling, wherever the errors sit,
	// and AnticipatedFrom says at which errors per stratum ProducerRisk is
	// computed ("" under the plan's rule).
	CountRule       bool
	CountedSize     int
	CountAcceptance int
	Thinned         bool
	UnknownStrata   int
	CountRiskBound  string
	AnticipatedFrom string
	// StepLevels is true when candidates were tested at different risks
	// (the steps of Holm's procedure), each bound at its own step's
	// confidence.
	StepLevels bool
	// Measures is true for a record of error measures with their own
	// denominators: every (measure, candidate) claim has its own ceiling
	// (Ceiling then lists them), Claims is their number and Positive the
	// positive (critical) class the rates are taken for; PerCandidateRisk
	// and BoundConfidence are each claim's risk and confidence.
	Measures bool
	Claims   int
	Positive string
	// ReleaseRule says in words which candidate the plan declared for
	// release ("" when none); Released names the candidate the rule picks
	// ("" when it picks none: NoRelease).
	ReleaseRule string
	Released    string
	NoRelease   bool
}

// sampleFields is a fully set Fields used to check templates at load time.
func sampleFields() Fields {
	return Fields{
		System: "system", SystemVersion: "1", Period: "period", Date: "2000-01-01",
		RecordID: "000000000000", Use: "general", Ceiling: "1 %", Confidence: "95 %",
		FamilyRisk: "5 %", BoundConfidence: "95 %", PerCandidateRisk: "5 %",
		ConsumerRisk: "4 %", Anticipated: "0.5 %", ProducerRisk: "10 %", Candidates: 2,
		Multiplicity: "Bonferroni", MultiplicityRule: "holm", Require: "all", Model: "binomial", Rule: "exact",
		Sequential: true, SampleSize: 100, AcceptanceNumber: 1, Population: "1000",
		Bound: "Clopper–Pearson", Approximate: true, Weighted: true, Stratified: true, AllowIncomplete: true,
		CountRule: true, CountedSize: 90, CountAcceptance: 1, Thinned: true, UnknownStrata: 1, CountRiskBound: "4 %",
		AnticipatedFrom: "the plan's anticipated error in every stratum", StepLevels: true,
		Measures: true, Claims: 6, Positive: "positive", ReleaseRule: "the accepted candidate with the lowest estimated fnr",
		Released: "candidate", NoRelease: true,
	}
}

package plan

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"time"

	"gopkg.in/yaml.v3"
)

// FileFormat is the version of the plan file layout written by this code.
const FileFormat = 1

// File is the plan file written by `probity plan --out plan.yaml`. It holds
// every input, the decision rule, the sizes the other rules would need, the
// pre-registered candidates and the selection seed. Its SHA-256 (see
// Fingerprint) identifies the plan in every later artifact.
type File struct {
	// Format is FileFormat at the time of writing.
	Format int `yaml:"format"`
	// ToolVersion is the probity version that wrote the plan.
	ToolVersion string `yaml:"tool_version"`
	// Created is when the plan was made (UTC).
	Created time.Time `yaml:"created"`
	// System and SystemVersion name the classifier under audit (optional).
	System        string `yaml:"system,omitempty"`
	SystemVersion string `yaml:"system_version,omitempty"`
	// Seed is the selection seed: 32 lowercase hex digits (128 bits) from
	// crypto/rand unless the user gave one. It is used exactly as written.
	Seed string `yaml:"seed"`
	// Inputs are the user's requirements, as given.
	Inputs Inputs `yaml:"inputs"`
	// Rule is the resulting acceptance rule.
	Rule Rule `yaml:"rule"`
	// Comparison lists the sample size each rule would need for the same
	// inputs, in a fixed order (exact first).
	Comparison []RuleSize `yaml:"comparison"`
	// Classes are the label values a labeler may give (for threshold
	// candidates: the positive and the negative label). Empty for a
	// sizing-only plan.
	Classes []string `yaml:"classes,omitempty"`
	// Candidates are the pre-registered models or thresholds, in the order
	// declared (the testing order under fixed-sequence). Empty for a
	// sizing-only plan.
	Candidates []Candidate `yaml:"candidates,omitempty"`
	// Sequential holds the boundaries of a sequential design (nil for a
	// fixed (n, c) plan).
	Sequential *SequentialRule `yaml:"sequential,omitempty"`
}

// Inputs are the requirements a plan is made from.
type Inputs struct {
	// Ceiling is the error rate that must not be exceeded, in (0, 1).
	Ceiling float64 `yaml:"ceiling"`
	// Confidence is 1 − δ, in (0, 1); δ is the family-wise risk of
	// accepting a candidate whose error is at or above the ceiling.
	Confidence float64 `yaml:"confidence"`
	// CandidateCount is M, the number of models or thresholds judged on
	// the same sample (≥ 1). It is written under the key candidates, as
	// the plan file has always had it; File.Candidates lists them.
	CandidateCount int `yaml:"candidates"`
	// Anticipated is p0, the error a good model is expected to have; nil
	// gives the zero-failure plan.
	Anticipated *float64 `yaml:"anticipated,omitempty"`
	// ProducerRisk is the bound on P(reject | error = p0), in (0, 1).
	ProducerRisk float64 `yaml:"producer_risk"`
	// Population is N for a finite lot (hypergeometric); 0 means an
	// unbounded stream (binomial).
	Population int64 `yaml:"population,omitempty"`
	// Method is the decision rule: exact, hoeffding or kl.
	Method Method `yaml:"method"`
	// Multiplicity shares δ among the candidates.
	Multiplicity Multiplicity `yaml:"multiplicity"`
	// Design is fixed (label n, count errors) or sequential.
	Design Design `yaml:"design"`
	// Require is all (every candidate must be accepted for the audit to
	// pass) or any (at least one must be, e.g. choosing among thresholds).
	Require Require `yaml:"require"`
}

// Rule is the acceptance rule of a plan: label SampleSize decisions and
// accept a candidate if it makes at most AcceptanceNumber errors.
type Rule struct {
	// Model is the probability model behind the risks: binomial,
	// hypergeometric, hoeffding or kl.
	Model Model `yaml:"model"`
	// SampleSize is n.
	SampleSize int `yaml:"sample_size"`
	// AcceptanceNumber is c: accept when errors ≤ c.
	AcceptanceNumber int `yaml:"acceptance_number"`
	// PerCandidateRisk is δ/M' (M' = M under Bonferroni and Holm, 1 under
	// fixed-sequence).
	PerCandidateRisk float64 `yaml:"per_candidate_risk"`
	// ConsumerRisk is the actual P(accept | error = ceiling) of the rule
	// (for a finite lot: at D1 = ⌈ceiling·N⌉ errors).
	ConsumerRisk float64 `yaml:"consumer_risk"`
	// ProducerRisk is the actual P(reject | error = p0); nil without p0.
	ProducerRisk *float64 `yaml:"producer_risk"`
	// BadLotErrors is D1 = ⌈ceiling·N⌉ for a finite lot, else 0.
	BadLotErrors int64 `yaml:"bad_lot_errors,omitempty"`
	// GoodLotErrors is D0 = ⌊p0·N⌋ for a finite lot with p0, else 0.
	GoodLotErrors int64 `yaml:"good_lot_errors,omitempty"`
}

// RuleSize is one row of a plan's comparison: the sample size a rule needs.
type RuleSize struct {
	// Rule is "exact-binomial", "exact-hypergeometric", "hoeffding", "kl"
	// or "chebyshev".
	Rule string `yaml:"rule"`
	// SampleSize is the smallest n that rule needs; 0 when it cannot reach
	// the guarantee within the search limit.
	SampleSize int64 `yaml:"sample_size"`
}

// SequentialRule is a truncated sequential plan: after t labels (t = 1 …
// MaxSampleSize) accept when errors ≤ AcceptIfErrorsAtMost[t−1] and reject
// when errors ≥ RejectIfErrorsAtLeast[t−1].
type SequentialRule struct {
	// MaxSampleSize is the truncation point.
	MaxSampleSize int `yaml:"max_sample_size"`
	// AcceptIfErrorsAtMost[t−1] is −1 where acceptance is not yet possible.
	AcceptIfErrorsAtMost []int `yaml:"accept_if_errors_at_most,flow"`
	// RejectIfErrorsAtLeast[t−1] is nil where rejection is not yet possible.
	RejectIfErrorsAtLeast []*int `yaml:"reject_if_errors_at_least,flow"`
	// ASNAtAnticipated and ASNAtCeiling are the exact average sample
	// numbers at p0 and at the ceiling.
	ASNAtAnticipated float64 `yaml:"asn_at_anticipated"`
	ASNAtCeiling     float64 `yaml:"asn_at_ceiling"`
	// FixedSampleSize and FixedAcceptanceNumber are the fixed (n, c) plan
	// for the same risks, which the sequential plan is compared with. (For
	// a sequential plan, File.Rule holds the truncation point as its
	// sample size — what a draw must select — with the final acceptance
	// number and the sequential plan's exact risks.)
	FixedSampleSize       int `yaml:"fixed_sample_size,omitempty"`
	FixedAcceptanceNumber int `yaml:"fixed_acceptance_number,omitempty"`
}

// Candidate is one pre-registered model or threshold. Exactly one of Column
// or (ScoreColumn, Threshold) is set.
type Candidate struct {
	// Name identifies the candidate in every report.
	Name string `yaml:"name"`
	// Column is a log column holding this model's predicted label.
	Column string `yaml:"column,omitempty"`
	// ScoreColumn and Threshold: predict Positive when score ≥ Threshold,
	// else Negative.
	ScoreColumn string   `yaml:"score_column,omitempty"`
	Threshold   *float64 `yaml:"threshold,omitempty"`
	Positive    string   `yaml:"positive,omitempty"`
	Negative    string   `yaml:"negative,omitempty"`
}

// ErrPlanFile is wrapped by every error about a plan file's content.
var ErrPlanFile = errors.New("invalid plan file")

// Marshal encodes the plan as YAML. Marshal then Parse is lossless.
func (f *File) Marshal() ([]byte, error) {
	var buf bytes.Buffer
	enc := yaml.NewEncoder(&buf)
	enc.SetIndent(2)
	if err := enc.Encode(f); err != nil {
		return nil, fmt.Errorf("encoding plan: %w", err)
	}
	if err := enc.Close(); err != nil {
		return nil, fmt.Errorf("encoding plan: %w", err)
	}
	return buf.Bytes(), nil
}

// Parse decodes a plan file. name is used in error messages, which are
// *inputerr.Error wrapping ErrPlanFile. Unknown keys
// are refused, so a typo in a hand-edited plan is not silently ignored.
func Parse(data []byte, name string) (*File, error) {
	if err := checkNotReport(data, name); err != nil {
		return nil, err
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	var f File
	if err := dec.Decode(&f); err != nil {
		return nil, planFileError(name, fileKeyError(err))
	}
	if err := f.validate(); err != nil {
		return nil, planFileError(name, err)
	}
	return &f, nil
}

// planFileError is the input error about a plan file's content: it names
// the file and wraps ErrPlanFile.
func planFileError(name string, err error) error {
	return inputerr.At(name, 0, "", "%w: %v", ErrPlanFile, err).WithHint("use the plan file written by probity plan, unedited")
}

// Load reads and parses a plan file and returns it with its fingerprint.
func Load(path string) (*File, string, error) {
	data, err := inputfile.ReadFile(path, "plan file", inputfile.SmallLimit)
	if err != nil {
		return nil, "", err
	}
	f, err := Parse(data, path)
	if err != nil {
		return nil, "", err
	}
	return f, Fingerprint(data), nil
}

// Fingerprint is the lowercase hex SHA-256 of a plan file's bytes.
func Fingerprint(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}

// IsSizingOnly reports whether the plan declares no candidates, so it can
// size an audit but not be drawn or judged.
func (f *File) IsSizingOnly() bool { return len(f.Candidates) == 0 }

// CandidateNames returns the declared candidates' names, in plan order
// (the ledger's prediction columns).
func (f *File) CandidateNames() []string {
	names := make([]string, len(f.Candidates))
	for i, c := range f.Candidates {
		names[i] = c.Name
	}
	return names
}

// LoadForJudging is Load for a plan a labeled sample is judged under: a
// sizing-only plan, which declares no candidates, is an input error.
func LoadForJudging(path string) (*File, string, error) {
	f, fp, err := Load(path)
	if err != nil {
		return nil, "", err
	}
	if f.IsSizingOnly() {
		return nil, "", inputerr.Errorf("%s: the plan declares no candidates, so there is nothing to judge", path).WithHint("use the plan the sample was drawn from")
	}
	return f, fp, nil
}

// validate checks the structural invariants a later step relies on.
func (f *File) validate() error {
	if f.Format != FileFormat {
		return fmt.Errorf("format %d is not supported (this probity reads format %d)", f.Format, FileFormat)
	}
	if f.Seed == "" {
		return errors.New("seed is empty")
	}
	in := f.Inputs
	if !(in.Ceiling > 0 && in.Ceiling < 1) {
		return fmt.Errorf("inputs.ceiling %v is outside (0, 1)", in.Ceiling)
	}
	if !(in.Confidence > 0 && in.Confidence < 1) {
		return fmt.Errorf("inputs.confidence %v is outside (0, 1)", in.Confidence)
	}
	if in.CandidateCount < 1 {
		return fmt.Errorf("inputs.candidates %d is below 1", in.CandidateCount)
	}
	if len(f.Candidates) > 0 && len(f.Candidates) != in.CandidateCount {
		return fmt.Errorf("inputs.candidates is %d but %d candidates are declared", in.CandidateCount, len(f.Candidates))
	}
	if p0 := in.Anticipated; p0 != nil && !(*p0 >= 0 && *p0 < in.Ceiling) {
		return fmt.Errorf("inputs.anticipated %v is outside [0, ceiling)", *p0)
	}
	if f.Rule.SampleSize < 1 {
		return fmt.Errorf("rule.sample_size %d is below 1", f.Rule.SampleSize)
	}
	if f.Rule.AcceptanceNumber < 0 || f.Rule.AcceptanceNumber >= f.Rule.SampleSize {
		return fmt.Errorf("rule.acceptance_number %d is outside [0, %d)", f.Rule.AcceptanceNumber, f.Rule.SampleSize)
	}
	seen := map[string]bool{}
	for i, c := range f.Candidates {
		if c.Name == "" {
			return fmt.Errorf("candidates[%d].name is empty", i)
		}
		if seen[c.Name] {
			return fmt.Errorf("candidates[%d].name %q is declared twice", i, c.Name)
		}
		seen[c.Name] = true
		byColumn := c.Column != ""
		byScore := c.ScoreColumn != "" || c.Threshold != nil
		if byColumn == byScore {
			return fmt.Errorf("candidates[%d] (%s) must set either column or score_column with threshold", i, c.Name)
		}
		if byScore && (c.ScoreColumn == "" || c.Threshold == nil || c.Positive == "" || c.Negative == "") {
			return fmt.Errorf("candidates[%d] (%s) needs score_column, threshold, positive and negative", i, c.Name)
		}
	}
	if len(f.Candidates) > 0 && len(f.Classes) < 2 {
		return errors.New("classes must list at least two labels when candidates are declared")
	}
	return nil
}

// fileKeyError rephrases a setting refused while decoding (an input error
// from UnmarshalText) with its key in the file: `inputs.method "exakt":
// must be one of exact, hoeffding, kl`. A setting left empty decodes as
// unset and is left to the reader's default.
func fileKeyError(err error) error {
	ie, ok := inputerr.As(err)
	if !ok || ie.Field == "" {
		return err
	}
	section := "inputs"
	if ie.Field == modelSpelling.field {
		section = "rule"
	}
	return fmt.Errorf("%s.%s %s", section, ie.Field, ie.Msg)
}

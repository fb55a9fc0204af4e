package plan

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"reflect"
	"regexp"
	"strconv"
	"strings"
	"time"

	"gopkg.in/yaml.v3"

	"probity/plan/chrono"
	"probity/plan/inputerr"
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
	// Created is when the plan was made (UTC, to the second), and
	// CreatedFrom where that time came from: the system clock, or the
	// operator who supplied it (unset in plans made before times had
	// sources).
	Created     time.Time     `yaml:"created"`
	CreatedFrom chrono.Source `yaml:"created_from,omitempty"`
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
	// TimeColumn is the log column that dates each decision, declared so
	// that every draw reads it and records the log's completeness (days
	// of the period without a row); "" when not declared.
	TimeColumn string `yaml:"time_column,omitempty"`
	// Sequential holds the boundaries of a sequential design (nil for a
	// fixed (n, c) plan).
	Sequential *SequentialRule `yaml:"sequential,omitempty"`
	// Stratification is the stratified design the plan was sized for (nil:
	// sized for a simple random sample).
	Stratification *Stratification `yaml:"stratification,omitempty"`
	// Measures, when set, certifies error measures with their own
	// denominators (fnr, fpr, for, fdr, error) instead of the overall
	// error alone: the candidates are judged by them.
	Measures *Measures `yaml:"measures,omitempty"`
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

// Decode reads a plan file's one YAML document into a File and indexes it
// as a Source (the line of every key, the text of every value). It
// refuses what cannot be a plan before anything looks at its content: a
// plan's JSON report (ErrJSONReport), an empty file, a second document, anchors and aliases, a key the plan has
// no field for (a typo in a hand-edited plan is not silently ignored), a
// value of the wrong type and a setting that is not one of its names —
// each an input error naming the file, the line and the field, wrapping
// ErrPlanFile.
//
// Decode does not check the plan's content: planfile.Load, the loader
// every command uses, runs Decode, then File.Check and the check of the
// sequential section.
func Decode(data []byte, name string) (*File, *Source, error) {
	if err := checkNotReport(data, name); err != nil {
		return nil, nil, err
	}
	src := &Source{Name: name}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, nil, src.Errorf("", "the file is empty")
		}
		return nil, nil, syntaxError(src, err)
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); !errors.Is(err, io.EOF) {
		line := extra.Line
		if err != nil {
			return nil, nil, syntaxError(src, err)
		}
		e := src.Errorf("", "a second YAML document follows the plan (line %d): a plan file holds exactly one", line)
		e.Line = line
		return nil, nil, e
	}
	src = newSource(name, &doc)
	if len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		e := src.Errorf("", "the document is not a plan (a mapping of keys)")
		e.Line = doc.Line
		return nil, nil, e
	}
	root := doc.Content[0]
	if line := aliasLine(root); line > 0 {
		e := src.Errorf(src.FieldAt(line), "anchors and aliases are not used in plan files")
		e.Line = line
		return nil, nil, e
	}
	if k := unknownKey("", root, reflect.TypeOf(File{})); k != "" {
		return nil, nil, src.Errorf(k, "is not a key of a plan file")
	}
	// every key is known (above), so the tree decodes as yaml.v3's
	// KnownFields would have it, without parsing the file again
	var f File
	if err := root.Decode(&f); err != nil {
		return nil, nil, decodeError(src, err)
	}
	return &f, src, nil
}

// aliasLine is the line of the first anchor or alias under n, 0 when none.
func aliasLine(n *yaml.Node) int {
	if n.Kind == yaml.AliasNode || n.Anchor != "" {
		return n.Line
	}
	for _, c := range n.Content {
		if l := aliasLine(c); l > 0 {
			return l
		}
	}
	return 0
}

// yamlLinePrefix matches the "line N: " that yaml.v3 puts before each of
// its messages; the number is moved into the error's line.
var yamlLinePrefix = regexp.MustCompile(`^(?:yaml: )?line (\d+): `)

// syntaxError is the input error for YAML that does not parse.
func syntaxError(src *Source, err error) error {
	e := src.Errorf("", "not a valid YAML document: %s", strings.TrimPrefix(err.Error(), "yaml: "))
	if m := yamlLinePrefix.FindStringSubmatch(err.Error()); m != nil {
		e.Line, _ = strconv.Atoi(m[1])
		e.Msg = "not a valid YAML document: " + err.Error()[len(m[0]):]
	}
	return e
}

// decodeError is the input error for a value the File cannot hold: a
// setting that is not one of its names (an input error from
// UnmarshalText, located by its key) or a value of the wrong type (the
// first of yaml.v3's messages, located by its line).
func decodeError(src *Source, err error) error {
	if ie, ok := inputerr.As(err); ok && ie.Field != "" {
		field := "inputs." + ie.Field
		switch ie.Field {
		case modelSpelling.field:
			field = "rule." + ie.Field
		case "source":
			field = "created_from"
		}
		return src.Errorf(field, "%s", ie.Msg)
	}
	var te *yaml.TypeError
	if errors.As(err, &te) && len(te.Errors) > 0 {
		msg := te.Errors[0]
		line := 0
		if m := yamlLinePrefix.FindStringSubmatch(msg); m != nil {
			line, _ = strconv.Atoi(m[1])
			msg = msg[len(m[0]):]
		}
		e := src.Errorf(src.FieldAt(line), "%s", msg)
		if line > 0 {
			e.Line = line
		}
		return e
	}
	return src.Errorf("", "%v", err)
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

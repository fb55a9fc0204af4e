package plan

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"probity/plan/inputerr"
)

// Check verifies a decoded plan file against what it can be recomputed
// from, so that no edit of a plan reaches a draw or a record:
//
//   - its structure: the format, the seed and creation time, the inputs
//     in their ranges and every setting named, the classes (distinct, usable as labels) and the
//     candidates (named once, each a column or a finite threshold whose
//     positive and negative labels are two different classes);
//   - the rule: the (n, c) search and the risks are run again from the
//     inputs and must match what the file states — whole numbers exactly,
//     risks to the digits the file holds (see Source.Agrees);
//   - the comparison rows, recomputed the same way;
//   - the design: a sequential section exactly when the design is
//     sequential, and then its fixed plan for comparison. The boundaries
//     themselves are checked by plan/sequential (which this package cannot
//     import); planfile.Parse runs both. A plan sized for a stratified
//     design states the simple random sample it was sized from here, and
//     its count rule is checked by plan/verdict (CheckStratification).
//
// The search costs well under a millisecond for any plan probity makes
// (BenchmarkCheck), so it is run again rather than trusted. The error is
// an input error naming the file, the field's line and the field (see
// Source.Errorf), wrapping ErrPlanFile.
func (f *File) Check(src *Source) error {
	if err := f.validate(); err != nil {
		return locate(src, err)
	}
	if f.Created.IsZero() {
		return src.Errorf("created", "the plan states no creation time")
	}
	// every setting named (Validate refuses an unset one): what a reader
	// would take an unset setting for is not guessed
	in := f.Inputs
	if err := in.Validate(); err != nil {
		return locate(src, inputsField(err))
	}
	rule, cmp, err := Size(in)
	if err != nil {
		var tl *TooLargeError
		if errors.As(err, &tl) {
			return src.Errorf("inputs", "no plan within %d labels meets these inputs, so the rule cannot have been made from them (%v)", tl.Limit, tl)
		}
		return locate(src, inputsField(err))
	}
	switch in.Design {
	case DesignSequential:
		if f.Sequential == nil {
			return src.Errorf("inputs.design", "the design is sequential but the file has no sequential section")
		}
		if err := f.checkCommonRule(src, rule); err != nil {
			return err
		}
		if err := checkInt(src, "sequential.fixed_sample_size", f.Sequential.FixedSampleSize, rule.SampleSize); err != nil {
			return err
		}
		if err := checkInt(src, "sequential.fixed_acceptance_number", f.Sequential.FixedAcceptanceNumber, rule.AcceptanceNumber); err != nil {
			return err
		}
	default:
		if f.Sequential != nil {
			return src.Errorf("sequential", "a sequential section is given but the design is %s", in.Design)
		}
		if f.Stratification != nil {
			// n, c and the risks are the stratified count rule's on the
			// planned strata, checked by plan/verdict (CheckStratification,
			// which planfile.Parse runs); here: the simple random sample
			// they were sized from.
			if err := f.checkCommonRule(src, rule); err != nil {
				return err
			}
			if err := checkInt(src, "stratification.simple_random_sample_size", f.Stratification.SimpleRandomSampleSize, rule.SampleSize); err != nil {
				return err
			}
			break
		}
		if err := f.checkFixedRule(src, rule); err != nil {
			return err
		}
	}
	return f.checkComparison(src, cmp)
}

// sizingDefaults is the inputs with every unset setting read as the plan
// is sized and judged: the exact method, Bonferroni, the fixed design,
// all candidates required.
func (in Inputs) sizingDefaults() Inputs {
	if in.Method == MethodUnset {
		in.Method = MethodExact
	}
	if in.Multiplicity == MultiplicityUnset {
		in.Multiplicity = Bonferroni
	}
	if in.Design == DesignUnset {
		in.Design = DesignFixed
	}
	if in.Require == RequireUnset {
		in.Require = RequireAll
	}
	return in
}

// checkFixedRule compares the fixed plan's rule with the recomputed one.
func (f *File) checkFixedRule(src *Source, want Rule) error {
	if err := f.checkCommonRule(src, want); err != nil {
		return err
	}
	got := f.Rule
	if err := checkInt(src, "rule.sample_size", got.SampleSize, want.SampleSize); err != nil {
		return err
	}
	if err := checkInt(src, "rule.acceptance_number", got.AcceptanceNumber, want.AcceptanceNumber); err != nil {
		return err
	}
	if err := checkFloat(src, "rule.consumer_risk", got.ConsumerRisk, want.ConsumerRisk); err != nil {
		return err
	}
	return checkOptional(src, "rule.producer_risk", got.ProducerRisk, want.ProducerRisk)
}

// checkCommonRule compares what a fixed and a sequential plan's rule
// share: the model, the per-candidate risk and the lot's error counts.
func (f *File) checkCommonRule(src *Source, want Rule) error {
	got := f.Rule
	if got.Model != want.Model {
		return src.Errorf("rule.model", "states %q, but the inputs give %q", got.Model, want.Model)
	}
	if err := checkFloat(src, "rule.per_candidate_risk", got.PerCandidateRisk, want.PerCandidateRisk); err != nil {
		return err
	}
	if err := checkInt64(src, "rule.bad_lot_errors", got.BadLotErrors, want.BadLotErrors); err != nil {
		return err
	}
	return checkInt64(src, "rule.good_lot_errors", got.GoodLotErrors, want.GoodLotErrors)
}

// checkComparison compares the comparison rows, in order.
func (f *File) checkComparison(src *Source, want []RuleSize) error {
	if len(f.Comparison) != len(want) {
		return src.Errorf("comparison", "lists %d rules, but the inputs give %d (%s)", len(f.Comparison), len(want), ruleNames(want))
	}
	for i, w := range want {
		g := f.Comparison[i]
		field := fmt.Sprintf("comparison[%d]", i)
		if g.Rule != w.Rule {
			return src.Errorf(field+".rule", "states %q, but row %d is %q (%s)", g.Rule, i+1, w.Rule, ruleNames(want))
		}
		if err := checkInt64(src, field+".sample_size", g.SampleSize, w.SampleSize); err != nil {
			return err
		}
	}
	return nil
}

func ruleNames(rows []RuleSize) string {
	names := make([]string, len(rows))
	for i, r := range rows {
		names[i] = r.Rule
	}
	return strings.Join(names, ", ")
}

func checkInt(src *Source, field string, got, want int) error {
	return checkInt64(src, field, int64(got), int64(want))
}

func checkInt64(src *Source, field string, got, want int64) error {
	if got != want {
		return src.Errorf(field, "states %d, but the inputs give %d", got, want)
	}
	return nil
}

func checkFloat(src *Source, field string, got, want float64) error {
	if !src.Agrees(field, got, want) {
		return src.Errorf(field, "states %s, but the inputs give %s", statedText(src, field, got), fmtNum(want))
	}
	return nil
}

func checkOptional(src *Source, field string, got, want *float64) error {
	switch {
	case got == nil && want == nil:
		return nil
	case got == nil:
		return src.Errorf(field, "is missing, but the inputs give %s", fmtNum(*want))
	case want == nil:
		return src.Errorf(field, "states %s, but the inputs give none (no anticipated error)", statedText(src, field, *got))
	}
	return checkFloat(src, field, *got, *want)
}

// statedText is a number as the file writes it (as decoded when the file
// is not at hand).
func statedText(src *Source, field string, v float64) string {
	if t := src.Text(field); t != "" {
		return t
	}
	return fmtNum(v)
}

// CheckFloat is Check's comparison of a stated number with its
// recomputation, for the sections of the plan file other packages check
// (plan/sequential): nil when they agree to the digits the file holds,
// else the located input error.
func CheckFloat(src *Source, field string, stated, recomputed float64) error {
	return checkFloat(src, field, stated, recomputed)
}

// CheckInt is CheckFloat for whole numbers, which must be equal.
func CheckInt(src *Source, field string, stated, recomputed int) error {
	return checkInt(src, field, stated, recomputed)
}

// locate gives an input error about a field of the plan (Field set, no
// file) the file's name and the field's line.
func locate(src *Source, err error) error {
	e, ok := err.(*inputerr.Error)
	if !ok {
		return src.Errorf("", "%v", err)
	}
	out := src.Errorf(e.Field, "%s", e.Msg)
	if e.Err != nil {
		out.Err = planFileCause(e.Err)
	}
	return out
}

// inputsField renames the field of an input error from Inputs.Validate
// (named as the command line spells the input, "producer-risk") to its
// key in the plan file ("inputs.producer_risk").
func inputsField(err error) error {
	e, ok := err.(*inputerr.Error)
	if !ok || e.Field == "" {
		return err
	}
	c := *e
	c.Field = "inputs." + strings.ReplaceAll(e.Field, "-", "_")
	if e.Field == "candidates" {
		c.Field = "inputs.candidates"
	}
	return &c
}

// fieldErr is a structural problem with one field of a plan: an input
// error with the field's path and no file, which Check locates.
func fieldErr(field, format string, args ...any) *inputerr.Error {
	e := inputerr.Errorf(format, args...)
	e.Field = field
	return e
}

// validate checks the structural invariants a later step relies on; Build
// runs it on what it makes and Check on what it reads. Errors name the
// field by its path in the file.
func (f *File) validate() error {
	if f.Format != FileFormat {
		return fieldErr("format", "%d is not supported (this probity reads format %d)", f.Format, FileFormat)
	}
	if f.Seed == "" {
		return fieldErr("seed", "is empty")
	}
	in := f.Inputs
	if !(in.Ceiling > 0 && in.Ceiling < 1) {
		return fieldErr("inputs.ceiling", "%v is outside (0, 1)", in.Ceiling)
	}
	if !(in.Confidence > 0 && in.Confidence < 1) {
		return fieldErr("inputs.confidence", "%v is outside (0, 1)", in.Confidence)
	}
	if in.CandidateCount < 1 {
		return fieldErr("inputs.candidates", "%d is below 1", in.CandidateCount)
	}
	if len(f.Candidates) > 0 && len(f.Candidates) != in.CandidateCount {
		return fieldErr("inputs.candidates", "is %d but %d candidates are declared", in.CandidateCount, len(f.Candidates))
	}
	if p0 := in.Anticipated; p0 != nil && !(*p0 >= 0 && *p0 < in.Ceiling) {
		return fieldErr("inputs.anticipated", "%v is outside [0, ceiling)", *p0)
	}
	if f.Rule.SampleSize < 1 {
		return fieldErr("rule.sample_size", "%d is below 1", f.Rule.SampleSize)
	}
	if f.Rule.AcceptanceNumber < 0 || f.Rule.AcceptanceNumber >= f.Rule.SampleSize {
		return fieldErr("rule.acceptance_number", "%d is outside [0, %d)", f.Rule.AcceptanceNumber, f.Rule.SampleSize)
	}
	if err := f.validateClasses(); err != nil {
		return err
	}
	if strings.TrimSpace(f.TimeColumn) != f.TimeColumn {
		return fieldErr("time_column", "%q has leading or trailing spaces", f.TimeColumn)
	}
	if s := f.Stratification; s != nil {
		if f.Sequential != nil || in.Design == DesignSequential {
			return fieldErr("stratification", "a sequential plan cannot have a stratification")
		}
		if f.Measures != nil {
			return fieldErr("stratification", "a plan with measures designs its own strata by prediction; it cannot also have a stratification")
		}
		if err := s.validate(f.Rule.SampleSize); err != nil {
			return err
		}
	}
	if err := f.validateCandidates(); err != nil {
		return err
	}
	if f.Measures != nil {
		if len(f.Candidates) == 0 {
			return fieldErr("measures", "need declared candidates")
		}
		if err := f.Measures.validate(f); err != nil {
			return fmt.Errorf("%w: %v", ErrMeasures, err)
		}
	}
	return nil
}

// validateClasses: every class is a label a labeler can write — not
// empty, without surrounding spaces (a label cell is read trimmed), not
// the word unsure in any case (it marks an undecided item) — and listed
// once; a plan with candidates has at least two.
func (f *File) validateClasses() error {
	seen := map[string]int{}
	for i, c := range f.Classes {
		field := fmt.Sprintf("classes[%d]", i)
		switch {
		case c == "":
			return fieldErr(field, "is empty")
		case strings.TrimSpace(c) != c:
			return fieldErr(field, "%q has leading or trailing spaces, which a label cell cannot keep", c)
		case strings.EqualFold(c, unsureLabel):
			return fieldErr(field, "%q is the word that marks an item the labeler cannot decide, not a class", c)
		}
		if j, dup := seen[c]; dup {
			return fieldErr(field, "%q is listed twice (also classes[%d])", c, j)
		}
		seen[c] = i
	}
	if len(f.Candidates) > 0 && len(f.Classes) < 2 {
		return fieldErr("classes", "must list at least two labels when candidates are declared")
	}
	return nil
}

// unsureLabel is the word a labeler writes for an item they cannot
// decide (read in any case); no class may be spelled so.
const unsureLabel = "unsure"

// validateCandidates: each candidate is named once and is either a
// predicted-label column or a score column with a finite threshold and
// two different classes as its positive and negative labels.
func (f *File) validateCandidates() error {
	seen := map[string]int{}
	for i, c := range f.Candidates {
		field := fmt.Sprintf("candidates[%d]", i)
		if c.Name == "" {
			return fieldErr(field+".name", "is empty")
		}
		if j, dup := seen[c.Name]; dup {
			return fieldErr(field+".name", "%q is declared twice (also candidates[%d])", c.Name, j)
		}
		seen[c.Name] = i
		byColumn := c.Column != ""
		byScore := c.ScoreColumn != "" || c.Threshold != nil || c.Positive != "" || c.Negative != ""
		if byColumn == byScore {
			return fieldErr(field, "(%s) must set either column, or score_column with threshold, positive and negative", c.Name)
		}
		if byColumn {
			continue
		}
		switch {
		case c.ScoreColumn == "":
			return fieldErr(field+".score_column", "(%s) is missing", c.Name)
		case c.Threshold == nil:
			return fieldErr(field+".threshold", "(%s) is missing", c.Name)
		case math.IsNaN(*c.Threshold) || math.IsInf(*c.Threshold, 0):
			return fieldErr(field+".threshold", "(%s) %v is not a finite number", c.Name, *c.Threshold)
		case c.Positive == "":
			return fieldErr(field+".positive", "(%s) is missing", c.Name)
		case c.Negative == "":
			return fieldErr(field+".negative", "(%s) is missing", c.Name)
		case c.Positive == c.Negative:
			return fieldErr(field+".negative", "(%s) %q is also the positive label: a threshold needs two different labels", c.Name, c.Negative)
		}
		for _, l := range []struct{ key, label string }{{"positive", c.Positive}, {"negative", c.Negative}} {
			if !contains(f.Classes, l.label) {
				return fieldErr(field+"."+l.key, "(%s) %q is not one of the classes (%s)", c.Name, l.label, strings.Join(f.Classes, ", "))
			}
		}
	}
	return nil
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// CheckStatedRule verifies a rule that another file repeats with the
// inputs it holds (record.json's plan section, which carries no
// producer's-risk requirement, so the search cannot be run again):
// directly, that the per-candidate risk is δ/M' for the inputs, the model
// the method's, 0 ≤ c < n (n below the lot), and — for a fixed design —
// that the consumer's and producer's risks are those of (n, c) and that
// (n, c) keeps the consumer's guarantee under the method; for a
// sequential design, whose boundaries are not repeated, that the stated
// consumer's risk is within the per-candidate risk. Errors are input
// errors whose Field is the rule's key ("sample_size", "consumer_risk").
// text returns a key's number as the file writes it, so that a risk is
// compared to the digits the file holds ("" when unknown: every digit up
// to maxCheckedDigits); nil is a lookup that knows none.
func CheckStatedRule(in Inputs, r Rule, text func(key string) string) error {
	if text == nil {
		text = func(string) string { return "" }
	}
	in = in.sizingDefaults()
	if !(in.Ceiling > 0 && in.Ceiling < 1) {
		return fieldErr("ceiling", "%v is outside (0, 1)", in.Ceiling)
	}
	if !(in.Confidence > 0 && in.Confidence < 1) {
		return fieldErr("confidence", "%v is outside (0, 1)", in.Confidence)
	}
	if in.CandidateCount < 1 {
		return fieldErr("candidates", "%d is below 1", in.CandidateCount)
	}
	if in.Population < 0 {
		return fieldErr("population", "%d is negative", in.Population)
	}
	if p0 := in.Anticipated; p0 != nil && !(*p0 >= 0 && *p0 < in.Ceiling) {
		return fieldErr("anticipated", "%v is outside [0, ceiling)", *p0)
	}
	n, c := r.SampleSize, r.AcceptanceNumber
	if n < 1 || n > MaxSampleSize || (in.Population > 0 && int64(n) >= in.Population) {
		return fieldErr("sample_size", "%d is not a sample size a plan can have (1 to %d, below the lot)", n, MaxSampleSize)
	}
	if c < 0 || c >= n {
		return fieldErr("acceptance_number", "%d is outside [0, %d)", c, n)
	}
	alpha := in.PerCandidateRisk()
	if !agrees(text("per_candidate_risk"), r.PerCandidateRisk, alpha) {
		return fieldErr("per_candidate_risk", "states %s, but the confidence and candidates give %s", fmtNum(r.PerCandidateRisk), fmtNum(alpha))
	}
	if want := in.Method.Model(in.Population); r.Model != want {
		return fieldErr("model", "states %q, but the method gives %q", r.Model, want)
	}
	if in.Design == DesignSequential {
		if !(r.ConsumerRisk >= 0 && r.ConsumerRisk <= alpha) {
			return fieldErr("consumer_risk", "%s is above the per-candidate risk %s", fmtNum(r.ConsumerRisk), fmtNum(alpha))
		}
		return nil
	}
	s := sizer{in: in, alpha: alpha}
	want := s.rule(searchResult{n: n, c: c})
	if !agrees(text("consumer_risk"), r.ConsumerRisk, want.ConsumerRisk) {
		return fieldErr("consumer_risk", "states %s, but accepting at most %d errors in %d gives %s", fmtNum(r.ConsumerRisk), c, n, fmtNum(want.ConsumerRisk))
	}
	switch {
	case (r.ProducerRisk == nil) != (want.ProducerRisk == nil):
		return fieldErr("producer_risk", "is stated exactly when there is an anticipated error")
	case r.ProducerRisk != nil && !agrees(text("producer_risk"), *r.ProducerRisk, *want.ProducerRisk):
		return fieldErr("producer_risk", "states %s, but accepting at most %d errors in %d gives %s", fmtNum(*r.ProducerRisk), c, n, fmtNum(*want.ProducerRisk))
	}
	if !s.methodRule(in.Method)(c, n) {
		return fieldErr("sample_size", "accepting at most %d errors in %d does not keep the consumer's risk %s (%s)", c, n, fmtNum(alpha), in.Method.Title())
	}
	return nil
}

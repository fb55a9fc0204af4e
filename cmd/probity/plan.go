package main

import (
	"encoding/hex"
	"errors"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"probity/plan"
	"probity/plan/inputerr"
)

// planOptions are the flags of probity plan. Numbers are read as strings
// so a malformed one gets a sentence naming its flag.
type planOptions struct {
	ceiling, confidence, candidates, producerRisk, population, budget string
	anticipated                                                       []string

	method, multiplicity, design, require string
	out                                   string
	force, json                           bool
	seed                                  string
	candidate                             []string
	classes, thresholds                   string
	positive, negative                    string
	system, systemVersion                 string
	date                                  string
	timeColumn                            string

	// strata holds the design flags (plan_strata.go).
	strata planStrataOptions

	// set by validate
	in          plan.Inputs
	budgetN     int
	hasCeiling  bool
	mSet        bool
	declared    []plan.Candidate
	classesList []string

	measures measureOptions // plan_measure.go
}

// newPlanCommand builds `probity plan`.
func newPlanCommand(d deps) *cobra.Command {
	o := &planOptions{}
	cmd := &cobra.Command{
		Use:   "plan --ceiling P --confidence C [flags]",
		Short: "Work out how many decisions to label, and what passes",
		Long: `plan works out the smallest labeling audit that shows, at the stated
confidence, that a classifier's error is below the ceiling: label n randomly
drawn decisions and accept a candidate when it makes at most c errors.

The consumer's risk — the chance that a candidate whose true error is at or
above --ceiling is accepted — is at most (1 − confidence)/M', where M' is the
number of candidates under bonferroni and holm and 1 under fixed-sequence.
With --anticipated p0, the producer's risk — the chance that a candidate whose
error is p0 is rejected — is at most --producer-risk; without it the plan is
the zero-failure plan (any error rejects), and plan says how often that
rejects a model at half the ceiling.

--method exact (the default) uses the exact binomial test, or with
--population N the exact hypergeometric test for that batch of N decisions (a
bad batch holds at least ⌈ceiling·N⌉ errors). hoeffding and kl use the
distribution-free Hoeffding and Chernoff relative-entropy bounds instead; the
n every rule needs for the same risks is always shown (with Chebyshev) so the
saving of the exact plan is plain. Every rule is held to the same risks: it
accepts at most its own number of errors and must reject a model at p0 no more
often than --producer-risk. (The textbook Hoeffding size ln(M'/δ)/(2(ceiling −
p0)²) is smaller, but passes a model at p0 only about half the time.)

--budget n answers the inverse question: with n labels and 0, 1, 2, …
errors, the lowest ceiling that can be certified.

--stratum-sizes LABEL=N,... sizes the plan for the stratified draw it will
be judged from (sizes, or shares that sum to 1): with --allocation
proportional (shares rounded up, or --rounding largest-remainder), equal or
neyman (with --stratum-anticipated LABEL=P,...), and --min-per-stratum k
(default 1 when the sample has room), n is the smallest sample for which the
stratified count rule — the rule record applies to any allocation that is not
exactly proportional — keeps the producer's risk at the anticipated error of
every stratum (--anticipated, or --stratum-anticipated). The consumer's risk
holds wherever the errors sit. The draw then uses the plan's allocation.

Candidates may be declared now, before any label is seen: --candidate
NAME=COLUMN (repeatable; the log column holding that model's predicted label,
with --classes listing the label values) and --thresholds COLUMN:t1,t2,… with
--positive and --negative (predict positive when score ≥ t). Both kinds may
be declared together: the --candidate ones come first (the order
fixed-sequence tests in), and --classes must then list the positive and the
negative label. M then follows from them.

--out writes the plan file (YAML): every input, the rule, the comparison, the
candidates, a 128-bit selection seed (random unless --seed), the time and the
tool version; its SHA-256 identifies the plan later.

` + exitHelp("success: the plan, or with --budget the table, was made", "", true),
		Example: `  probity plan --ceiling 0.02 --confidence 0.95 --anticipated 0.01
  probity plan --ceiling 0.02 --confidence 0.95 --anticipated 0.01 \
      --thresholds score:0.5,0.6,0.7 --positive fraud --negative ok \
      --multiplicity fixed-sequence --out plan.yaml
  probity plan --budget 500 --confidence 0.95 --json`,
		Args: cobra.NoArgs,
		PreRunE: func(cmd *cobra.Command, args []string) error {
			return o.validate(cmd)
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			if o.budgetN > 0 {
				return runPlanBudget(d, o)
			}
			return runPlan(d, o)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&o.ceiling, "ceiling", "", "the error rate `P` that must not be exceeded, in (0, 1)")
	fl.StringVar(&o.confidence, "confidence", "", "the confidence `C` = 1 − δ, in (0, 1), e.g. 0.95")
	fl.StringVar(&o.candidates, "candidates", "1", "`M`, the number of models or thresholds judged on the same sample")
	fl.StringArrayVar(&o.anticipated, "anticipated", nil, "`P0`, the error a good model is expected to have (below the ceiling); with --measure also NAME:VALUE for every candidate, or NAME:V1,V2,… one per candidate in declared order (repeatable; with --prevalence two measures fix each candidate's confusion matrix, e.g. fnr and error)")
	fl.StringVar(&o.producerRisk, "producer-risk", "0.10", "`RISK`: the largest allowed chance of rejecting a model whose error is p0")
	fl.StringVar(&o.population, "population", "", "`N`, when the audit covers one batch of N decisions (hypergeometric)")
	fl.StringVar(&o.method, "method", plan.MethodExact.String(), "the decision `RULE`: exact, hoeffding or kl")
	fl.StringVar(&o.multiplicity, "multiplicity", plan.Bonferroni.String(), "with several candidates, the `ADJUSTMENT`: bonferroni, holm or fixed-sequence")
	fl.StringVar(&o.design, "design", plan.DesignFixed.String(), "the `DESIGN`: fixed (label n, count errors) or sequential (stop early at boundaries)")
	fl.StringVar(&o.require, "require", plan.RequireAll.String(), "`RULE`: all candidates or any one must be accepted for the audit to pass")
	fl.StringVar(&o.budget, "budget", "", "with `n` labels: the ceiling each number of errors certifies (no plan is made)")
	fl.StringVar(&o.out, "out", "", "write the plan file (YAML) to `PATH`")
	fl.BoolVar(&o.force, "force", false, "replace an existing --out file")
	fl.BoolVar(&o.json, "json", false, "print one JSON object instead of the report")
	fl.StringVar(&o.seed, "seed", "", "the selection `SEED`, used exactly as written (default: 128 random bits in hex)")
	fl.StringArrayVar(&o.candidate, "candidate", nil, "declare a candidate: `NAME=COLUMN` of the log holding its predicted label (repeatable)")
	fl.StringVar(&o.classes, "classes", "", "the label values, comma-separated: `LABEL,LABEL,...` (with --candidate)")
	fl.StringVar(&o.thresholds, "thresholds", "", "declare threshold candidates: `COLUMN:t1,t2,...` (predict positive when score ≥ t)")
	fl.StringVar(&o.positive, "positive", "", "the positive `LABEL` (with --thresholds)")
	fl.StringVar(&o.negative, "negative", "", "the negative `LABEL` (with --thresholds)")
	fl.StringVar(&o.system, "system", "", "the `NAME` of the classifier under audit")
	fl.StringVar(&o.systemVersion, "system-version", "", "the `VERSION` of the classifier under audit")
	addMeasureFlags(fl, &o.measures) // plan_measure.go
	fl.StringVar(&o.date, "date", "", dateFlagUsage("the plan was made"))
	fl.StringVar(&o.timeColumn, "time-column", "", "the log `COLUMN` that dates each decision: every draw reads it and records the days of the period without rows")
	addPlanStrataFlags(cmd, &o.strata)
	return cmd
}

// parseProbability reads a flag's number in the open interval (0, 1).
func parseNumber(flag, s string) (float64, error) {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, inputerr.Errorf("--%s %q is not a number", flag, s)
	}
	return v, nil
}

func parseCount(flag, s string) (int64, error) {
	v, err := strconv.ParseInt(strings.TrimSpace(s), 10, 64)
	if err != nil {
		return 0, inputerr.Errorf("--%s %q is not a whole number", flag, s)
	}
	return v, nil
}

// validate turns the flags into plan inputs and declared candidates.
func (o *planOptions) validate(cmd *cobra.Command) error {
	changed := cmd.Flags().Changed
	if o.budget != "" {
		return o.validateBudget(changed)
	}
	if err := o.measures.validate(o, changed); err != nil {
		return err
	}
	if err := parseDateFlag(o.date); err != nil {
		return err
	}
	if strings.TrimSpace(o.timeColumn) != o.timeColumn {
		return inputerr.Errorf("--time-column %q has leading or trailing spaces", o.timeColumn)
	}
	if o.ceiling == "" {
		return inputerr.Errorf("--ceiling is required: the error rate that must not be exceeded").WithHint("e.g. --ceiling 0.02 for 2%")
	}
	if o.confidence == "" {
		return inputerr.Errorf("--confidence is required").WithHint("e.g. --confidence 0.95")
	}
	var in plan.Inputs
	var err error
	if in.Ceiling, err = parseNumber("ceiling", o.ceiling); err != nil {
		return err
	}
	if in.Confidence, err = parseNumber("confidence", o.confidence); err != nil {
		return err
	}
	if in.ProducerRisk, err = parseNumber("producer-risk", o.producerRisk); err != nil {
		return err
	}
	m, err := parseCount("candidates", o.candidates)
	if err != nil {
		return err
	}
	if m < 1 || m > 1_000_000 {
		return inputerr.Errorf("--candidates %d: must be between 1 and 1000000", m)
	}
	in.CandidateCount = int(m)
	o.mSet = changed("candidates")
	if p0, ok, err := o.legacyAnticipated(); err != nil {
		return err
	} else if ok {
		in.Anticipated = &p0
	}
	if o.population != "" {
		if in.Population, err = parseCount("population", o.population); err != nil {
			return err
		}
		if in.Population < 1 {
			return inputerr.Errorf("--population %d: must be at least 1", in.Population)
		}
	}
	if in.Design, err = plan.ParseDesign(o.design); err != nil {
		return planInputError(err)
	}
	if err := o.parseCandidates(); err != nil {
		return err
	}
	if len(o.declared) > 0 {
		if o.mSet && in.CandidateCount != len(o.declared) {
			return inputerr.Errorf("--candidates %d disagrees with the %d candidates declared", in.CandidateCount, len(o.declared)).WithHint("drop --candidates: M follows from the declared candidates")
		}
		in.CandidateCount = len(o.declared)
	}
	if in.Method, err = plan.ParseMethod(o.method); err != nil {
		return planInputError(err)
	}
	if in.Multiplicity, err = plan.ParseMultiplicity(o.multiplicity); err != nil {
		return planInputError(err)
	}
	if in.Require, err = plan.ParseRequire(o.require); err != nil {
		return planInputError(err)
	}
	if err := in.Validate(); err != nil {
		return planInputError(err)
	}
	if err := o.strata.validate(cmd, in); err != nil {
		return err
	}
	if o.seed != "" && (strings.TrimSpace(o.seed) != o.seed || len(o.seed) > 256 || strings.ContainsAny(o.seed, "\n\r\t")) {
		return inputerr.Errorf("--seed must be one line of at most 256 characters without surrounding spaces")
	}
	o.in = in
	return nil
}

// validateBudget reads the flags of the inverse question.
func (o *planOptions) validateBudget(changed func(string) bool) error {
	n, err := parseCount("budget", o.budget)
	if err != nil {
		return err
	}
	if n < 1 || n > plan.MaxSampleSize {
		return inputerr.Errorf("--budget %d: must be between 1 and %d", n, plan.MaxSampleSize)
	}
	// Every flag that only shapes a plan, or what is written with one,
	// is refused: none may be silently ignored. (--ceiling is used: it
	// says how many errors the budget allows at that ceiling.)
	for _, f := range []string{"out", "force", "anticipated", "producer-risk", "candidate", "classes", "thresholds",
		"positive", "negative", "design", "method", "require", "seed", "system", "system-version",
		"stratum-sizes", "allocation", "min-per-stratum", "rounding", "stratum-anticipated"} {
		if changed(f) {
			return inputerr.Errorf("--%s has no effect with --budget, which makes no plan", f).WithHint("drop --budget to make a plan")
		}
	}
	if o.confidence == "" {
		return inputerr.Errorf("--confidence is required").WithHint("e.g. --confidence 0.95")
	}
	var in plan.Inputs
	if in.Confidence, err = parseNumber("confidence", o.confidence); err != nil {
		return err
	}
	if !(in.Confidence > 0 && in.Confidence < 1) {
		return inputerr.Errorf("--confidence %s: must be between 0 and 1 (exclusive)", o.confidence)
	}
	m, err := parseCount("candidates", o.candidates)
	if err != nil {
		return err
	}
	if m < 1 || m > 1_000_000 {
		return inputerr.Errorf("--candidates %d: must be between 1 and 1000000", m)
	}
	in.CandidateCount = int(m)
	if in.Multiplicity, err = plan.ParseMultiplicity(o.multiplicity); err != nil {
		return planInputError(err)
	}
	if o.population != "" {
		if in.Population, err = parseCount("population", o.population); err != nil {
			return err
		}
		if in.Population < n {
			return inputerr.Errorf("--population %d: must be at least the budget %d", in.Population, n)
		}
	}
	if o.ceiling != "" {
		if in.Ceiling, err = parseNumber("ceiling", o.ceiling); err != nil {
			return err
		}
		if !(in.Ceiling > 0 && in.Ceiling < 1) {
			return inputerr.Errorf("--ceiling %s: must be between 0 and 1 (exclusive)", o.ceiling)
		}
		o.hasCeiling = true
	}
	o.in, o.budgetN = in, int(n)
	return nil
}

// planFlags names the flag of each plan input, by the name the plan
// package gives it.
var planFlags = map[string]string{
	"ceiling": "--ceiling", "confidence": "--confidence", "candidates": "--candidates", "anticipated": "--anticipated",
	"producer-risk": "--producer-risk", "population": "--population", "method": "--method",
	"multiplicity": "--multiplicity", "design": "--design", "require": "--require", "budget": "--budget",
}

// planInputError names the flags in a plan package error: the flag that
// gave an input out of range, and the flags to relax for a plan too large.
func planInputError(err error) error {
	var tl *plan.TooLargeError
	if errors.As(err, &tl) {
		flags := make([]string, len(tl.Relax))
		for i, r := range tl.Relax {
			flags[i] = "--" + r
		}
		what := map[string]string{
			"ceiling": "raise --ceiling", "confidence": "lower --confidence", "candidates": "judge fewer candidates (or use --multiplicity fixed-sequence)",
			"anticipated": "lower --anticipated (further below the ceiling)", "producer-risk": "allow a larger --producer-risk",
		}
		var hints []string
		for _, r := range tl.Relax {
			hints = append(hints, what[r])
		}
		if tl.Population > 0 {
			return inputerr.Errorf("--population %d is smaller than the plan needs: the guarantee would need every decision in the batch labeled", tl.Population).WithHint(strings.Join(hints, ", or ") + "; or label the whole batch").Wrap(err)
		}
		return inputerr.Errorf("the plan would need more than %d labels; relax %s", tl.Limit, strings.Join(flags, " or ")).WithHint(strings.Join(hints, ", or ")).Wrap(err)
	}
	return flagNames(err, planFlags)
}

// parseCandidates reads --candidate, --classes, --thresholds, --positive
// and --negative. Label-column and threshold candidates may be declared
// together: the --candidate ones come first, then the thresholds, and the
// threshold labels must then be among --classes.
func (o *planOptions) parseCandidates() error {
	seen := map[string]bool{}
	add := func(c plan.Candidate) error {
		if seen[c.Name] {
			return inputerr.Errorf("candidate %q is declared twice", c.Name)
		}
		seen[c.Name] = true
		o.declared = append(o.declared, c)
		return nil
	}
	for _, spec := range o.candidate {
		name, col, ok := strings.Cut(spec, "=")
		if !ok || name == "" || col == "" || strings.TrimSpace(name) != name || strings.TrimSpace(col) != col {
			return inputerr.Errorf("--candidate %q is not NAME=COLUMN", spec).WithHint("e.g. --candidate model-a=pred_a")
		}
		if err := add(plan.Candidate{Name: name, Column: col}); err != nil {
			return err
		}
	}
	switch {
	case o.thresholds != "":
		i := strings.LastIndex(o.thresholds, ":")
		if i <= 0 || i == len(o.thresholds)-1 {
			return inputerr.Errorf("--thresholds %q is not COLUMN:t1,t2,...", o.thresholds).WithHint("e.g. --thresholds score:0.5,0.6,0.7")
		}
		col := o.thresholds[:i]
		if o.positive == "" || o.negative == "" || o.positive == o.negative {
			return inputerr.Errorf("--thresholds needs --positive and --negative, two different labels").WithHint("e.g. --positive fraud --negative ok")
		}
		for _, ts := range strings.Split(o.thresholds[i+1:], ",") {
			ts = strings.TrimSpace(ts)
			v, err := strconv.ParseFloat(ts, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return inputerr.Errorf("--thresholds: %q is not a number", ts)
			}
			if err := add(plan.Candidate{Name: col + ">=" + ts, ScoreColumn: col, Threshold: &v, Positive: o.positive, Negative: o.negative}); err != nil {
				return err
			}
		}
	case o.negative == "" && o.positive != "" && o.measures.declared():
		// the positive (critical) class of the measures, checked below
		// against --classes
	case o.positive != "" || o.negative != "":
		return inputerr.Errorf("--positive and --negative go with --thresholds; with --candidate list the labels in --classes")
	}
	switch {
	case o.classes != "" && len(o.declared) == 0:
		return inputerr.Errorf("--classes, --positive and --negative describe declared candidates; add --candidate or --thresholds")
	case o.classes != "":
		for _, c := range strings.Split(o.classes, ",") {
			c = strings.TrimSpace(c)
			if c == "" || slices.Contains(o.classesList, c) {
				return inputerr.Errorf("--classes %q: each label must be non-empty and listed once", o.classes)
			}
			o.classesList = append(o.classesList, c)
		}
		if len(o.classesList) < 2 {
			return inputerr.Errorf("--classes %q: list at least two labels", o.classes)
		}
		if o.thresholds == "" && o.positive != "" && !slices.Contains(o.classesList, o.positive) {
			return inputerr.Errorf("--positive %q is not among --classes %q", o.positive, o.classes)
		}
		if o.thresholds != "" {
			for _, l := range []string{o.positive, o.negative} {
				if !slices.Contains(o.classesList, l) {
					return inputerr.Errorf("--classes %q does not list %q, a label the thresholds predict", o.classes, l).
						WithHint("list every label a labeler may give, the --positive and --negative ones included")
				}
			}
		}
	case len(o.candidate) > 0:
		return inputerr.Errorf("--classes is required with --candidate: the label values a labeler may give").WithHint("e.g. --classes spam,ham")
	case o.thresholds != "":
		o.classesList = []string{o.positive, o.negative}
	}
	return nil
}

// runPlan sizes the plan, writes it when asked and reports it.
func runPlan(d deps, o *planOptions) error {
	seed := o.seed
	if seed == "" {
		var b [16]byte
		if _, err := io.ReadFull(d.random, b[:]); err != nil {
			return &internalError{msg: "reading random seed: " + err.Error()}
		}
		seed = hex.EncodeToString(b[:])
	}
	created := stepTime(d, o.date)
	f, err := plan.Build(o.in, plan.Meta{
		ToolVersion: d.version, Created: created.Time, CreatedFrom: created.Source, Seed: seed,
		System: o.system, SystemVersion: o.systemVersion,
		Classes: o.classesList, Candidates: o.declared, TimeColumn: o.timeColumn,
	})
	if err != nil {
		return planInputError(err)
	}
	if err := applyDesign(f); err != nil {
		return err
	}
	if err := applyStrata(f, &o.strata); err != nil {
		return err
	}
	if err := applyMeasures(f, o); err != nil {
		return err
	}
	var fingerprint string
	if o.out != "" {
		data, err := f.Marshal()
		if err != nil {
			return &internalError{msg: err.Error()}
		}
		if err := writePlanFile(o.out, data, o.force); err != nil {
			return err
		}
		fingerprint = plan.Fingerprint(data)
	}
	if o.json {
		return writePlanJSON(d.stdout, f, o.out, fingerprint, &o.strata)
	}
	if f.Measures != nil {
		return writeMeasuresReport(d.stdout, f, o.out, fingerprint)
	}
	return writePlanReport(d.stdout, f, o.out, fingerprint, &o.strata)
}

// applyDesign is the hook for the plan's design: fixed keeps the
// (n, c) rule Build made; sequential turns it into boundaries
// (plan_sequential.go, plan/sequential).
func applyDesign(f *plan.File) error {
	switch f.Inputs.Design {
	case plan.DesignFixed:
		return nil
	case plan.DesignSequential:
		return applySequentialDesign(f)
	}
	return inputerr.Errorf("--design %q: must be fixed or sequential", f.Inputs.Design)
}

package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/sampling/safewrite"
)

// writePlanFile writes data to path through safewrite, so a reader never
// sees half a plan. Without force an existing file is refused; with it,
// only a regular file is replaced. The folder must exist.
func writePlanFile(path string, data []byte, force bool) error {
	err := safewrite.WriteFile(path, data, 0, safewrite.Options{Replace: force, InExistingFolder: true})
	switch {
	case errors.Is(err, safewrite.ErrExists):
		return inputerr.Errorf("--out %s already exists", path).WithHint("add --force to replace it, or choose another name").Wrap(err)
	case errors.Is(err, safewrite.ErrNoFolder):
		return inputerr.Errorf("--out %s: folder %s does not exist", path, filepath.Dir(path)).Wrap(err)
	}
	return err
}

// planJSON is the object `probity plan --json` prints; field order is the
// key order.
type planJSON struct {
	SampleSize             int                  `json:"sample_size"`
	AcceptanceNumber       int                  `json:"acceptance_number"`
	ConsumerRisk           float64              `json:"consumer_risk"`
	ProducerRisk           *float64             `json:"producer_risk"`
	PerCandidateRisk       float64              `json:"per_candidate_risk"`
	PerCandidateConfidence float64              `json:"per_candidate_confidence"`
	Method                 plan.Method          `json:"method"`
	Model                  plan.Model           `json:"model"`
	Multiplicity           plan.Multiplicity    `json:"multiplicity"`
	Design                 plan.Design          `json:"design"`
	Require                plan.Require         `json:"require"`
	Ceiling                float64              `json:"ceiling"`
	Confidence             float64              `json:"confidence"`
	Candidates             int                  `json:"candidates"`
	Anticipated            *float64             `json:"anticipated"`
	ProducerRiskAllowed    float64              `json:"producer_risk_allowed"`
	Population             *int64               `json:"population"`
	BadLotErrors           *int64               `json:"bad_lot_errors"`
	GoodLotErrors          *int64               `json:"good_lot_errors"`
	RejectAtHalfCeiling    *float64             `json:"reject_at_half_ceiling"`
	Comparison             map[string]*int64    `json:"comparison"`
	OC                     []plan.OCPoint       `json:"oc"`
	CandidateNames         []string             `json:"candidate_names"`
	Seed                   string               `json:"seed"`
	PlanFile               *string              `json:"plan_file"`
	Fingerprint            *string              `json:"fingerprint"`
	Sequential             *planSequentialJSON  `json:"sequential"`
	Stratification         *plan.Stratification `json:"stratification,omitempty"`
	Measures               *plan.Measures       `json:"measures,omitempty"`
}

// planOC is the plan's OC curve: 21 points, exact; for a sequential design
// the sequential rule's acceptance probabilities at the same errors.
func planOC(f *plan.File, so *planStrataOptions) ([]plan.OCPoint, error) {
	oc := f.OC(21)
	errs := make([]float64, len(oc))
	for i, p := range oc {
		errs[i] = p.Error
	}
	if st, ok, err := strataOC(so, errs); ok {
		if err != nil {
			return nil, err
		}
		for i := range oc {
			oc[i].AcceptProbability = st[i]
		}
		return oc, nil
	}
	seq, ok, err := sequentialOC(f, errs)
	if err != nil {
		return nil, err
	}
	if ok {
		for i := range oc {
			oc[i].AcceptProbability = seq[i]
		}
	}
	return oc, nil
}

func writePlanJSON(w io.Writer, f *plan.File, out, fingerprint string, so *planStrataOptions) error {
	r, in := f.Rule, f.Inputs
	j := planJSON{
		SampleSize: r.SampleSize, AcceptanceNumber: r.AcceptanceNumber,
		ConsumerRisk: r.ConsumerRisk, ProducerRisk: r.ProducerRisk,
		PerCandidateRisk: r.PerCandidateRisk, PerCandidateConfidence: f.PerCandidateConfidence(),
		Method: in.Method, Model: r.Model, Multiplicity: in.Multiplicity, Design: in.Design, Require: in.Require,
		Ceiling: in.Ceiling, Confidence: in.Confidence, Candidates: in.CandidateCount,
		Anticipated: in.Anticipated, ProducerRiskAllowed: in.ProducerRisk,
		Comparison: map[string]*int64{}, Seed: f.Seed, CandidateNames: []string{},
		Sequential: sequentialPlanJSON(f), Stratification: f.Stratification, Measures: f.Measures,
	}
	if in.Population > 0 {
		pop, d1 := in.Population, r.BadLotErrors
		j.Population, j.BadLotErrors = &pop, &d1
		if in.Anticipated != nil {
			d0 := r.GoodLotErrors
			j.GoodLotErrors = &d0
		}
	}
	if in.Anticipated == nil && f.Sequential == nil {
		v := 1 - f.HalfCeilingPoint().AcceptProbability
		j.RejectAtHalfCeiling = &v
	}
	for _, row := range f.Comparison {
		if row.SampleSize > 0 {
			n := row.SampleSize
			j.Comparison[row.Rule] = &n
		} else {
			j.Comparison[row.Rule] = nil
		}
	}
	oc, err := planOC(f, so)
	if err != nil {
		return err
	}
	j.OC = oc
	for _, c := range f.Candidates {
		j.CandidateNames = append(j.CandidateNames, c.Name)
	}
	if out != "" {
		j.PlanFile, j.Fingerprint = &out, &fingerprint
	}
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	return enc.Encode(j)
}

// ruleTitles are the comparison rows in words.
var ruleTitles = map[string]string{
	plan.RuleExactHypergeometric: "exact hypergeometric (this batch)",
	plan.RuleExactBinomial:       "exact binomial",
	plan.RuleKL:                  "Chernoff relative entropy (kl)",
	plan.RuleHoeffding:           "Hoeffding",
	plan.RuleChebyshev:           "Chebyshev (for comparison only)",
}

func writePlanReport(w io.Writer, f *plan.File, out, fingerprint string, so *planStrataOptions) error {
	r, in := f.Rule, f.Inputs
	m := in.CandidateCount
	who := "the model"
	if m > 1 {
		who = fmt.Sprintf("each of the %d candidates", m)
	}
	from := "drawn at random from the prediction log"
	if in.Population > 0 {
		from = fmt.Sprintf("drawn at random from the batch of %s", numfmt.Count(in.Population))
	}
	if st := f.Stratification; st != nil {
		counted := 0
		for _, k := range st.Counted {
			counted += k
		}
		fmt.Fprintf(w, "Label %d decisions drawn at random from the strata below; accept %s if at most %d of the %d counted items are errors.\n", r.SampleSize, who, r.AcceptanceNumber, counted)
	} else if f.Sequential != nil {
		fmt.Fprintf(w, "Label decisions %s one at a time, at most %d; stop at the first boundary reached (below).\n", from, r.SampleSize)
	} else if r.AcceptanceNumber == 0 {
		fmt.Fprintf(w, "Label %s %s; accept %s if none of them is an error.\n", decisions(r.SampleSize), from, who)
	} else {
		fmt.Fprintf(w, "Label %s decisions %s; accept %s if at most %d of them are errors.\n", numfmt.Count(r.SampleSize), from, who, r.AcceptanceNumber)
	}
	if f.Sequential != nil {
		fmt.Fprintln(w)
		writeSequentialSummary(w, f)
	}
	writeStrataReport(w, f, so)
	if m > 1 {
		req := "every candidate must be accepted for the audit to pass"
		if in.Require == plan.RequireAny {
			req = "the audit passes when at least one candidate is accepted"
		}
		fmt.Fprintf(w, "All %d candidates are judged on the same labels; %s.\n", m, req)
		switch in.Multiplicity {
		case plan.Bonferroni:
			fmt.Fprintf(w, "Bonferroni: each candidate is held to risk %s = (1 − %s)/%d.\n", numfmt.Chance(r.PerCandidateRisk), numfmt.Confidence(in.Confidence), m)
		case plan.Holm:
			fmt.Fprintf(w, "Holm: sized as Bonferroni (its first step tests each candidate at %s); later steps test at larger risks, up to %s.\n", numfmt.Chance(r.PerCandidateRisk), numfmt.Chance(1-in.Confidence))
		case plan.FixedSequence:
			fmt.Fprintf(w, "Fixed sequence: candidates are tested in the declared order at the full risk %s, stopping at the first rejected.\n", numfmt.Chance(r.PerCandidateRisk))
		}
	}
	for _, c := range f.Candidates {
		if c.Column != "" {
			fmt.Fprintf(w, "  candidate %s: predicted label in column %s\n", c.Name, c.Column)
		} else {
			fmt.Fprintf(w, "  candidate %s: %s when %s ≥ %s, else %s\n", c.Name, c.Positive, c.ScoreColumn, numfmt.Number(*c.Threshold), c.Negative)
		}
	}

	fmt.Fprintln(w)
	fmt.Fprintln(w, "What the plan guarantees")
	bad := fmt.Sprintf("a model whose true error is %s or more", numfmt.Setting(in.Ceiling))
	if in.Population > 0 {
		bad = fmt.Sprintf("a batch with %s or more errors (%s of %s)", numfmt.Count(r.BadLotErrors), numfmt.Setting(in.Ceiling), numfmt.Count(in.Population))
	}
	allowed := fmt.Sprintf("allowed %s: %s confidence", numfmt.Chance(r.PerCandidateRisk), numfmt.Confidence(in.Confidence))
	if in.Multiplicity.EffectiveCandidates(m) > 1 {
		allowed = fmt.Sprintf("allowed %s per candidate, so %s confidence for all %d together", numfmt.Chance(r.PerCandidateRisk), numfmt.Confidence(in.Confidence), m)
	}
	if in.Multiplicity == plan.Holm && m > 1 {
		fmt.Fprintf(w, "  consumer's risk: Holm's step-down keeps the chance that any candidate at or above the ceiling passes at most %s (%s confidence for all %d together).\n", numfmt.Chance(1-in.Confidence), numfmt.Confidence(in.Confidence), m)
		fmt.Fprintf(w, "    Its first step tests each candidate at %s (this rule's exact risk there: %s); later steps test at up to %s,\n", numfmt.Chance(r.PerCandidateRisk), numfmt.Chance(r.ConsumerRisk), numfmt.Chance(1-in.Confidence))
		fmt.Fprintf(w, "    so one candidate on its own may pass with probability up to %s when the others pass.\n", numfmt.Chance(1-in.Confidence))
	} else {
		fmt.Fprintf(w, "  consumer's risk: %s passes with probability at most %s (%s).\n", bad, numfmt.Chance(r.ConsumerRisk), allowed)
	}
	if in.Anticipated != nil {
		good := fmt.Sprintf("a model whose true error is the anticipated %s", numfmt.Setting(*in.Anticipated))
		if in.Population > 0 {
			good = fmt.Sprintf("a batch with %s errors (the anticipated %s)", numfmt.Count(r.GoodLotErrors), numfmt.Setting(*in.Anticipated))
		}
		fmt.Fprintf(w, "  producer's risk: %s fails with probability %s (allowed %s).\n", good, numfmt.Chance(*r.ProducerRisk), numfmt.Chance(in.ProducerRisk))
	} else if f.Sequential == nil {
		half := f.HalfCeilingPoint()
		if r.AcceptanceNumber == 0 {
			fmt.Fprintf(w, "  No anticipated error was given, so this is the zero-failure plan: a single error rejects.\n")
		} else {
			fmt.Fprintf(w, "  No anticipated error was given: this is the smallest plan any count can pass.\n")
		}
		if N := in.Population; N > 0 {
			d := int64(math.Round(half.Error * float64(N)))
			fmt.Fprintf(w, "  A batch with %s errors (%s, half the ceiling rounded down to a whole error) would be rejected %s of the time;\n", numfmt.Count(d), numfmt.Rate(half.Error), numfmt.Chance(1-half.AcceptProbability))
		} else {
			fmt.Fprintf(w, "  A model whose true error is half the ceiling (%s) would be rejected %s of the time;\n", numfmt.Setting(half.Error), numfmt.Chance(1-half.AcceptProbability))
		}
		fmt.Fprintf(w, "  give --anticipated to size a plan that passes a good model more reliably.\n")
	}

	fmt.Fprintln(w)
	fmt.Fprintln(w, "Labels each rule needs for the same risks")
	base := int64(r.SampleSize)
	if f.Sequential != nil {
		base = int64(f.Sequential.FixedSampleSize)
	}
	if st := f.Stratification; st != nil {
		base = int64(st.SimpleRandomSampleSize)
	}
	mine := in.Method.ComparisonRule(in.Population)
	for _, row := range f.Comparison {
		title := ruleTitles[row.Rule]
		switch {
		case row.SampleSize == 0 && in.Population > 0:
			fmt.Fprintf(w, "  %-36s %10s\n", title, "more than the batch")
		case row.SampleSize == 0:
			fmt.Fprintf(w, "  %-36s %10s\n", title, fmt.Sprintf("over %d", plan.MaxSampleSize))
		default:
			note, ref := "", "this plan"
			if f.Sequential != nil {
				ref = "the fixed plan"
			}
			if f.Stratification != nil {
				ref = "a simple random sample"
			}
			if row.Rule == mine {
				note = "  (" + ref + ")"
			} else if row.SampleSize == base {
				note = "  the same"
			} else if base > 0 {
				note = "  " + ratio(float64(row.SampleSize)/float64(base)) + " " + ref
			}
			fmt.Fprintf(w, "  %-36s %10s%s\n", title, numfmt.Count(row.SampleSize), note)
		}
	}
	if in.Anticipated != nil {
		fmt.Fprintln(w, "  (each rule accepts at most its own number of errors and meets the same producer's risk)")
	}

	fmt.Fprintln(w)
	fmt.Fprintln(w, "Chance that a model passes, by its true error (OC curve)")
	kp := f.KeyPoints()
	errs := make([]float64, len(kp))
	for i, p := range kp {
		errs[i] = p.Error
	}
	seq, isSeq, err := sequentialOC(f, errs)
	if err != nil {
		return err
	}
	if st, ok, err := strataOC(so, errs); ok {
		if err != nil {
			return err
		}
		seq, isSeq = st, true
	}
	fmt.Fprintf(w, "  %-12s %s\n", "true error", "passes")
	for i, p := range kp {
		a := p.AcceptProbability
		if isSeq {
			a = seq[i]
		}
		mark := ""
		p0, hasP0 := f.AnticipatedPoint()
		switch {
		case p.Error == f.CeilingPoint():
			mark = "  ceiling"
		case hasP0 && p.Error == p0:
			mark = "  anticipated"
		}
		rate := numfmt.Setting(p.Error)
		if N := in.Population; N > 0 {
			// a batch's rows are at whole error counts D/N
			rate = numfmt.Rate(p.Error)
			if mark != "" {
				mark += fmt.Sprintf(" (%s in the batch)", errorCount(int64(math.Round(p.Error*float64(N)))))
			}
		}
		fmt.Fprintf(w, "  %-12s %s%s\n", rate, numfmt.Chance(a), mark)
	}
	if out != "" {
		fmt.Fprintln(w)
		fmt.Fprintf(w, "Plan written to %s (seed %s, fingerprint sha256:%s).\n", out, f.Seed, fingerprint)
	}
	return nil
}

// runPlanBudget answers --budget: the ceiling each error count certifies.
func runPlanBudget(d deps, o *planOptions) error {
	in := o.in
	rows, err := plan.Budget(o.budgetN, in.Confidence, in.CandidateCount, in.Multiplicity, in.Population, 11)
	if err != nil {
		return planInputError(err)
	}
	alpha := in.PerCandidateRisk()
	var c *int
	if o.hasCeiling {
		v := plan.AcceptanceNumberFor(o.budgetN, in)
		c = &v
	}
	if o.json {
		type budgetJSON struct {
			Budget           int               `json:"budget"`
			Confidence       float64           `json:"confidence"`
			Candidates       int               `json:"candidates"`
			Multiplicity     plan.Multiplicity `json:"multiplicity"`
			PerCandidateRisk float64           `json:"per_candidate_risk"`
			Population       *int64            `json:"population"`
			Rows             []plan.BudgetRow  `json:"rows"`
			Ceiling          *float64          `json:"ceiling"`
			AcceptanceNumber *int              `json:"acceptance_number"`
		}
		j := budgetJSON{Budget: o.budgetN, Confidence: in.Confidence, Candidates: in.CandidateCount, Multiplicity: in.Multiplicity,
			PerCandidateRisk: alpha, Rows: rows, AcceptanceNumber: c}
		if in.Population > 0 {
			j.Population = &in.Population
		}
		if o.hasCeiling {
			j.Ceiling = &in.Ceiling
		}
		enc := json.NewEncoder(d.stdout)
		enc.SetEscapeHTML(false)
		enc.SetIndent("", "  ")
		return enc.Encode(j)
	}
	w := d.stdout
	src := "one-sided Clopper–Pearson upper bound"
	if in.Population > 0 {
		src = fmt.Sprintf("exact hypergeometric bound for the batch of %s", numfmt.Count(in.Population))
	}
	fmt.Fprintf(w, "With %s labels, at confidence %s per candidate (%s):\n", numfmt.Count(o.budgetN), numfmt.Confidence(1-alpha), src)
	fmt.Fprintf(w, "  %-8s %s\n", "errors", "certifies error below")
	for _, row := range rows {
		fmt.Fprintf(w, "  %-8d %s\n", row.Errors, numfmt.RateUp(row.Ceiling))
	}
	if c != nil {
		if *c < 0 {
			fmt.Fprintf(w, "%s labels cannot certify the ceiling %s even with no errors: at least %s would be needed with none.\n",
				numfmt.Count(o.budgetN), numfmt.Setting(in.Ceiling), numfmt.Count(zeroFailureN(in.Ceiling, alpha)))
		} else {
			fmt.Fprintf(w, "For the ceiling %s these labels allow at most %s.\n", numfmt.Setting(in.Ceiling), countOf(*c, "error", "errors"))
		}
	}
	return nil
}

// zeroFailureN is the smallest n with (1 − ceiling)^n ≤ α.
func zeroFailureN(ceiling, alpha float64) int {
	in := plan.Inputs{Ceiling: ceiling, Confidence: 1 - alpha, CandidateCount: 1, ProducerRisk: plan.DefaultProducerRisk,
		Method: plan.MethodExact, Multiplicity: plan.Bonferroni, Design: plan.DesignFixed, Require: plan.RequireAll}
	r, _, err := plan.Size(in)
	if err != nil {
		return 0
	}
	return r.SampleSize
}

// ratio formats a size ratio: "14×", "1.5×", "0.07×".
func ratio(x float64) string {
	switch {
	case x >= 10:
		return fmt.Sprintf("%.0f×", x)
	case x >= 1:
		return fmt.Sprintf("%.1f×", x)
	}
	return fmt.Sprintf("%.2g×", x)
}

// decisions is "1 decision" or "n decisions".
func decisions(n int) string {
	if n == 1 {
		return "1 decision"
	}
	return strconv.Itoa(n) + " decisions"
}

// errorCount is "1 error" or "k errors".
func errorCount(k int64) string {
	if k == 1 {
		return "1 error"
	}
	return strconv.FormatInt(k, 10) + " errors"
}

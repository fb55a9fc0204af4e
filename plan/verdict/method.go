package verdict

import (
	"fmt"
	"strings"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// boundWords names each bound in a sentence.
var boundWords = map[plan.Bound]string{
	plan.BoundClopperPearson:      "the exact Clopper–Pearson bound (binomial)",
	plan.BoundExactHypergeometric: "the exact hypergeometric bound for a lot of N decisions",
	plan.BoundHoeffding:           "Hoeffding's bound",
	plan.BoundChernoff:            "the Chernoff relative-entropy bound",
	plan.BoundStratifiedCount:     "the stratified count rule",
}

// methodInfo writes the method statement: the rule the verdicts rest on,
// the bound, its confidence and the multiplicity procedure, in a few
// factual sentences.
func methodInfo(p *plan.File, m judgeMethod, n int, level float64, res *Result) record.MethodInfo {
	var b strings.Builder
	if m.count != nil {
		countStatement(&b, p, m.count)
	} else {
		fmt.Fprintf(&b, "One-sided upper %s confidence bounds by %s", numfmt.Confidence(1-level), boundWords[m.bound])
		b.WriteString(". ")
		if m.ruleApplies {
			fmt.Fprintf(&b, "A candidate passes when it makes at most c = %d errors in the n = %d labeled decisions, which is the same as its bound lying below the ceiling of %s.", p.Rule.AcceptanceNumber, n, numfmt.Setting(p.Inputs.Ceiling))
		} else {
			fmt.Fprintf(&b, "A candidate passes when its upper bound lies below the ceiling of %s (%d decisions judged).", numfmt.Setting(p.Inputs.Ceiling), n)
		}
		if len(res.Applied.Design.Strata) > 1 {
			b.WriteString(" The allocation is exactly proportional, so the total count of errors is judged by the plan's rule: it is bounded by the binomial of a simple random sample (Hoeffding 1956, Theorem 4; Vatutin & Mikhailov 1982).")
		} else {
			b.WriteString(" The sample is a simple random sample (one stratum), so errors are counted directly.")
		}
	}
	b.WriteString(" ")
	b.WriteString(multiplicityStatement(p, level))
	return record.MethodInfo{Bound: m.bound, Approximate: m.bound.Approximate(), Statement: b.String()}
}

// countStatement describes the stratified count rule as applied.
func countStatement(b *strings.Builder, p *plan.File, a *Applied) {
	r := a.Count
	fmt.Fprintf(b, "The strata were not sampled in exact proportion to their sizes, so the verdicts rest on the stratified count rule: a candidate passes when at most c = %d of the %d counted items are errors", r.Accept, r.CountedSize())
	if r.Accept < 0 {
		fmt.Fprintf(b, " (here no count passes: too few items count for the ceiling)")
	}
	if a.Thinned {
		b.WriteString("; the counted items are, in each stratum, the first of its items in worksheet order, a sub-sample closer to proportional fixed before labeling (the other items still give the per-stratum rates)")
	}
	fmt.Fprintf(b, ". c is the largest count whose chance, when the population holds %d or more errors (the ceiling of %s of %d decisions) placed where they are least likely to be found, is at most %s by Hoeffding's comparison of a sum of independent trials with the binomial (Hoeffding 1956, Theorem 4; each stratum's hypergeometric count is such a sum, Vatutin & Mikhailov 1982): a union–intersection test over every spread of the errors, as in SUITE (Ottoboni, Stark, Lindeman & McBurnett 2018).",
		r.BadLot, numfmt.Setting(p.Inputs.Ceiling), r.Design.Population(), numfmt.Chance(1-r.Confidence))
	if len(a.Unknown) > 0 {
		b.WriteString(" A stratum with no item counts as unknown: all of its decisions may be errors.")
	}
	b.WriteString(" The upper bound is the largest error rate the counted errors do not rule out under the same rule. The estimate weights each stratum by its share N_h/N; the Korn–Graubard bound beside it is descriptive only.")
}

// multiplicityStatement says at which risk each candidate is tested and
// what the procedure controls.
func multiplicityStatement(p *plan.File, level float64) string {
	M := p.Inputs.CandidateCount
	delta := 1 - p.Inputs.Confidence
	switch {
	case M <= 1:
		return fmt.Sprintf("The candidate is tested at risk %s (confidence %s).", numfmt.Chance(level), numfmt.Confidence(1-level))
	case p.Inputs.Multiplicity == plan.Bonferroni:
		return fmt.Sprintf("Each candidate is tested at risk %s (Bonferroni for %d candidates), so the chance that any candidate whose error is at or above the ceiling is accepted is at most %s, and the bounds hold simultaneously at %s.", numfmt.Chance(level), M, numfmt.Chance(delta), numfmt.Confidence(p.Inputs.Confidence))
	case p.Inputs.Multiplicity == plan.Holm:
		return fmt.Sprintf("Candidates are accepted by Holm's step-down procedure: the candidate with the smallest p-value is tested at risk %s, each later one at a larger risk (δ/(M − k + 1) at step k, up to %s), stopping at the first not accepted. It keeps the chance that any candidate whose error is at or above the ceiling is accepted at most %s (family-wise); a single candidate tested at a later step is held to that step's risk, not to %s. Each candidate's bound is at the confidence of the step that tested it.", numfmt.Chance(level), numfmt.Chance(delta), numfmt.Chance(delta), numfmt.Chance(level))
	case p.Inputs.Multiplicity == plan.FixedSequence:
		return fmt.Sprintf("Candidates are tested in their declared order at risk %s and testing stops at the first rejection, so the chance that any candidate whose error is at or above the ceiling is accepted is at most %s.", numfmt.Chance(delta), numfmt.Chance(delta))
	}
	return ""
}

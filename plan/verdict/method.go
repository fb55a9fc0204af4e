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
	plan.BoundKornGraubard:        "the Korn–Graubard bound (Clopper–Pearson with the effective sample size; approximate) on the stratified estimate",
	plan.BoundWeightedHoeffding:   "the weighted Hoeffding bound (rigorous) on the stratified estimate",
}

// methodInfo writes the method statement: the bound, its confidence, the
// rule and the multiplicity correction, in one or two factual sentences.
func methodInfo(p *plan.File, m judgeMethod, n int, level float64, res *Result) record.MethodInfo {
	var b strings.Builder
	fmt.Fprintf(&b, "One-sided upper %s confidence bounds by %s", numfmt.Confidence(1-level), boundWords[m.bound])
	switch p.Inputs.Multiplicity {
	case plan.Bonferroni:
		fmt.Fprintf(&b, ", Bonferroni-adjusted for %d candidates so they hold simultaneously at %s", p.Inputs.CandidateCount, numfmt.Confidence(p.Inputs.Confidence))
	case plan.Holm:
		fmt.Fprintf(&b, " (simultaneous at %s over %d candidates); candidates are accepted by Holm's step-down procedure at family-wise risk %s", numfmt.Confidence(p.Inputs.Confidence), p.Inputs.CandidateCount, numfmt.Chance(1-p.Inputs.Confidence))
	case plan.FixedSequence:
		fmt.Fprintf(&b, "; candidates are tested in their declared order at %s and testing stops at the first rejection", numfmt.Chance(1-p.Inputs.Confidence))
	}
	b.WriteString(". ")
	if m.ruleApplies {
		fmt.Fprintf(&b, "A candidate passes when it makes at most c = %d errors in the n = %d labeled decisions, which is the same as its bound lying below the ceiling of %s.", p.Rule.AcceptanceNumber, n, numfmt.Setting(p.Inputs.Ceiling))
	} else {
		fmt.Fprintf(&b, "A candidate passes when its upper bound lies below the ceiling of %s (%d decisions judged).", numfmt.Setting(p.Inputs.Ceiling), n)
	}
	if res.SelfWeighting && !m.bound.Weighted() {
		b.WriteString(" The sample is self-weighting (proportional allocation), so errors are counted directly.")
	} else {
		b.WriteString(" Inclusion weights differ between strata, so the error is estimated by weighting each stratum by its share N_h/N.")
	}
	return record.MethodInfo{Bound: m.bound, Approximate: m.bound.Approximate(), Statement: b.String()}
}

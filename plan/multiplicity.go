package plan

// Multiplicity adjustments for M candidates judged on one sample.
const (
	// Bonferroni judges each candidate at δ/M (the union bound).
	Bonferroni = "bonferroni"
	// Holm is Holm's step-down procedure (S. Holm, Scand. J. Stat. 6, 1979):
	// the same sample size as Bonferroni (its first step is at δ/M), with
	// more power when the candidates are judged.
	Holm = "holm"
	// FixedSequence tests candidates in their declared order at the full δ,
	// stopping at the first that is not accepted (no division of δ).
	FixedSequence = "fixed-sequence"
)

// Multiplicities lists the accepted values of Inputs.Multiplicity.
var Multiplicities = []string{Bonferroni, Holm, FixedSequence}

// EffectiveCandidates is M', the divisor of δ when sizing: M for
// Bonferroni and Holm, 1 for fixed-sequence.
func EffectiveCandidates(candidates int, multiplicity string) int {
	if multiplicity == FixedSequence {
		return 1
	}
	return max(candidates, 1)
}

// PerCandidateRisk is α = δ/M' with δ = 1 − confidence: the largest
// probability that any one candidate at or above the ceiling is accepted.
func PerCandidateRisk(confidence float64, candidates int, multiplicity string) float64 {
	return (1 - confidence) / float64(EffectiveCandidates(candidates, multiplicity))
}

// PerCandidateConfidence is 1 − δ/M', the confidence at which each
// candidate of the plan is sized.
func (f *File) PerCandidateConfidence() float64 {
	return 1 - PerCandidateRisk(f.Inputs.Confidence, f.Inputs.Candidates, f.Inputs.Multiplicity)
}

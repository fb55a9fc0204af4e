package plan

import (
	"fmt"
	"math"
	"strconv"
)

// Multiplicity is how the family-wise risk δ is shared among M candidates
// judged on one sample. It is written in plan.yaml and record.json by its
// name ("bonferroni", "holm", "fixed-sequence"); the zero value is unset
// (written as "").
type Multiplicity int

// Multiplicity adjustments.
const (
	// MultiplicityUnset: the plan file does not say. It sizes as
	// Bonferroni and cannot be judged.
	MultiplicityUnset Multiplicity = iota
	// Bonferroni judges each candidate at δ/M (the union bound).
	Bonferroni
	// Holm is Holm's step-down procedure (S. Holm, Scand. J. Stat. 6, 1979):
	// the same sample size as Bonferroni (its first step is at δ/M), with
	// more power when the candidates are judged.
	Holm
	// FixedSequence tests candidates in their declared order at the full δ,
	// stopping at the first that is not accepted (no division of δ).
	FixedSequence
)

var multiplicitySpelling = spelling[Multiplicity]{field: "multiplicity",
	names: []string{"", "bonferroni", "holm", "fixed-sequence"}}

// Multiplicities lists the multiplicity adjustments a plan may name.
func Multiplicities() []Multiplicity { return multiplicitySpelling.values() }

// ParseMultiplicity returns the adjustment named s ("bonferroni", "holm" or
// "fixed-sequence"), or an input error (inputerr.Error) on the field "multiplicity".
func ParseMultiplicity(s string) (Multiplicity, error) { return multiplicitySpelling.parse(s) }

// String is the name as written in plan.yaml ("" when unset).
func (m Multiplicity) String() string { return multiplicitySpelling.name(m) }

// MarshalText writes the name (plan.yaml, record.json).
func (m Multiplicity) MarshalText() ([]byte, error) { return multiplicitySpelling.marshal(m) }

// UnmarshalText reads a name; the empty string is MultiplicityUnset.
func (m *Multiplicity) UnmarshalText(b []byte) error { return multiplicitySpelling.unmarshal(b, m) }

// Title names the adjustment in a report ("Bonferroni", "Holm step-down",
// "fixed-sequence").
func (m Multiplicity) Title() string {
	switch m {
	case Bonferroni:
		return "Bonferroni"
	case Holm:
		return "Holm step-down"
	}
	return m.String()
}

// EffectiveCandidates is M', the divisor of δ when sizing: M for
// Bonferroni and Holm (and when unset), 1 for fixed-sequence. M below 1
// counts as 1.
func (m Multiplicity) EffectiveCandidates(candidates int) int {
	if m == FixedSequence {
		return 1
	}
	return max(candidates, 1)
}

// PerCandidateRisk is α = δ/M': the largest probability that any one of
// the candidates at or above the ceiling is accepted, for the family-wise
// risk δ = 1 − confidence shared among M candidates. A quotient within
// binary noise of a 12-figure decimal is that decimal, so 1 − 0.95 =
// 0.050000000000000044 does not reach the plan file as
// 0.025000000000000022: every caller (the search, the plan file, a loader
// recomputing it) gets the same value. A quotient with more digits (0.05/3)
// is left as it is, never rounded up above δ/M'.
func (m Multiplicity) PerCandidateRisk(delta float64, candidates int) float64 {
	return withoutNoise(delta / float64(m.EffectiveCandidates(candidates)))
}

// withoutNoise returns the decimal of 12 significant figures that x is
// within 1e-14 (relative) of, or x.
func withoutNoise(x float64) float64 {
	v, err := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 12, 64), 64)
	if err != nil || math.Abs(v-x) > 1e-14*math.Abs(x) {
		return x
	}
	return v
}

// NotReachedReason says why a candidate was not tested: the procedure
// stopped at the candidate named stoppedAt (Holm's step-down, or the
// fixed sequence); "" for a rule under which every candidate is tested.
func (m Multiplicity) NotReachedReason(stoppedAt string) string {
	switch m {
	case Holm:
		return fmt.Sprintf("not reached: Holm's step-down stopped at %s", stoppedAt)
	case FixedSequence:
		return fmt.Sprintf("not reached: %s was rejected earlier in the fixed sequence", stoppedAt)
	}
	return ""
}

// PerCandidateRisk is the plan's α = δ/M' with δ = 1 − Confidence.
func (in Inputs) PerCandidateRisk() float64 {
	return in.Multiplicity.PerCandidateRisk(1-in.Confidence, in.CandidateCount)
}

// PerCandidateConfidence is 1 − δ/M', the confidence at which each
// candidate of the plan is sized.
func (f *File) PerCandidateConfidence() float64 {
	return 1 - f.Inputs.PerCandidateRisk()
}

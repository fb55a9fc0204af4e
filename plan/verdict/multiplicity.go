package verdict

import (
	"fmt"
	"math"
	"sort"

	"probity/plan"
)

// Test is one candidate's test of H0: error ≥ ceiling. Accept reports
// whether H0 is rejected at level α — the candidate is accepted — by the
// candidate's own rule (for a plan's (n, c) rule at the plan's level:
// errors ≤ c; otherwise p ≤ α or the bound at 1 − α below the ceiling).
type Test struct {
	PValue float64
	Accept func(level float64) bool

	// upper is the candidate's upper bound at a confidence, and
	// kornGraubard its descriptive Korn–Graubard bound (nil when not
	// reported); Judge reports both at the level the candidate was tested
	// at.
	upper        func(confidence float64) (float64, error)
	kornGraubard func(confidence float64) float64
}

// Decision is the multiplicity decision for one candidate.
type Decision struct {
	Accepted bool
	// Level is the level the candidate was tested at (0 when not reached).
	Level float64
	// Adjusted is the multiplicity-adjusted p-value.
	Adjusted float64
	// Step is the 1-based step of a step-down or sequential procedure at
	// which it was tested (0 when not reached; 1 under Bonferroni).
	Step int
	// NotReached is set under fixed-sequence for candidates after the
	// first failure, and under Holm after the procedure stopped.
	NotReached bool
}

// Bonferroni tests each of the M candidates at δ/M; the adjusted p-value
// is min(1, M·p) (Bonferroni; e.g. Dunn, JASA 56, 1961).
func Bonferroni(tests []Test, delta float64) []Decision {
	m := float64(len(tests))
	out := make([]Decision, len(tests))
	for i, t := range tests {
		out[i] = Decision{Accepted: t.Accept(delta / m), Level: delta / m, Adjusted: math.Min(1, m*t.PValue), Step: 1}
	}
	return out
}

// Holm is Holm's step-down procedure (Holm, Scand. J. Statist. 6, 1979):
// order the p-values p_(1) ≤ … ≤ p_(M) (ties in declared order), test the
// k-th at δ/(M − k + 1) and stop at the first that is not accepted; all
// later ones are not accepted. The adjusted p-values are
//
//	p̃_(k) = max_{j ≤ k} min(1, (M − j + 1) p_(j)).
func Holm(tests []Test, delta float64) []Decision {
	m := len(tests)
	order := make([]int, m)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return tests[order[a]].PValue < tests[order[b]].PValue })
	out := make([]Decision, m)
	running := 0.0
	stopped := false
	for k, i := range order {
		running = math.Max(running, math.Min(1, float64(m-k)*tests[i].PValue))
		d := Decision{Adjusted: running}
		if !stopped {
			d.Level = delta / float64(m-k)
			d.Step = k + 1
			d.Accepted = tests[i].Accept(d.Level)
			stopped = !d.Accepted
		} else {
			d.NotReached = true
		}
		out[i] = d
	}
	return out
}

// FixedSequence tests the candidates in declared order, each at the full
// δ, and stops at the first that is not accepted; the rest are not
// reached and not accepted (Maurer, Hothorn & Lehmacher 1995, the
// fixed-sequence procedure; from memory). The adjusted p-value of the k-th
// is max_{j ≤ k} p_j.
func FixedSequence(tests []Test, delta float64) []Decision {
	out := make([]Decision, len(tests))
	running := 0.0
	stopped := false
	for i, t := range tests {
		running = math.Max(running, t.PValue)
		d := Decision{Adjusted: running}
		if !stopped {
			d.Level, d.Step = delta, i+1
			d.Accepted = t.Accept(delta)
			stopped = !d.Accepted
		} else {
			d.NotReached = true
		}
		out[i] = d
	}
	return out
}

// Decide applies the plan's multiplicity rule (Bonferroni, Holm or
// FixedSequence); an unset rule is an error.
func Decide(rule plan.Multiplicity, tests []Test, delta float64) ([]Decision, error) {
	switch rule {
	case plan.Bonferroni:
		return Bonferroni(tests, delta), nil
	case plan.Holm:
		return Holm(tests, delta), nil
	case plan.FixedSequence:
		return FixedSequence(tests, delta), nil
	}
	return nil, fmt.Errorf("multiplicity rule %q is not one of bonferroni, holm, fixed-sequence", rule)
}

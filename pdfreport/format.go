package pdfreport

import "math"

// Numbers are written by package numfmt, as everywhere else in probity
// (record.json keeps the unrounded values).

// precisionNote is printed under the decision summary.
const precisionNote = "Rates are percentages to three decimals; upper bounds are rounded up and lower bounds down, " +
	"so a printed bound is never tighter than the computed one. Risks are percentages and p-values numbers, both " +
	"to four significant figures. record.json holds the unrounded values."

// bad reports a value that is not a finite number.
func bad(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }

// pValueNote defines the p-value columns of the decision summary (holm:
// the table has the Adjusted p column).
func pValueNote(holm bool) string {
	s := "p-value: the probability of observing at most the candidate's errors if its true error rate were exactly " +
		"the ceiling (one-sided); small values speak against an error at or above the ceiling."
	if holm {
		s += " Adjusted p: the p-value adjusted by Holm's step-down procedure, compared with the family-wise risk; " +
			"a candidate is accepted when it is at most that risk."
	}
	return s
}

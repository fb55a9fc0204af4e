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

package trend

import (
	"errors"
	"fmt"
	"math"

	"probity/plan"
)

// Alternative is the direction of a one-sided test on a 2×2 table.
type Alternative int

const (
	// Greater tests H1: the first row's proportion (a / (a+b)) is higher
	// than the second row's (c / (c+d)); equivalently the odds ratio
	// (a·d)/(b·c) exceeds 1. The p-value is P(X ≥ a).
	Greater Alternative = iota
	// Less tests H1: the first row's proportion is lower than the second
	// row's. The p-value is P(X ≤ a).
	Less
)

// String names the alternative as scipy.stats.fisher_exact does.
func (a Alternative) String() string {
	switch a {
	case Greater:
		return "greater"
	case Less:
		return "less"
	}
	return fmt.Sprintf("Alternative(%d)", int(a))
}

// Table is a 2×2 contingency table
//
//	        errors   correct
//	row 1     A         B
//	row 2     C         D
//
// In a trend, row 1 is the period under test and row 2 the baseline period.
type Table struct {
	A, B, C, D int
}

// ErrTable is returned for a table with a negative cell.
var ErrTable = errors.New("invalid 2×2 table")

// FisherExact returns the one-sided p-value of Fisher's exact test on t.
//
// Conditioning on both margins, the top-left cell X follows the
// hypergeometric law with population N = A+B+C+D, K = A+C marked items and
// n = A+B draws:
//
//	P(X = k) = C(K, k) · C(N−K, n−k) / C(N, n),   max(0, n+K−N) ≤ k ≤ min(n, K).
//
// Greater returns P(X ≥ A), Less returns P(X ≤ A) (R. A. Fisher, The Design
// of Experiments, 1935, §2; Agresti, Categorical Data Analysis, 3rd ed.,
// §3.5.1). The tails are the plan's (plan.HypergeometricSF and
// plan.HypergeometricCDF), which keep their relative accuracy deep into
// both ends for tables of any audit's size. A table with an empty row or
// column has p-value 1, as in scipy.stats.fisher_exact.
func FisherExact(t Table, alt Alternative) (float64, error) {
	if t.A < 0 || t.B < 0 || t.C < 0 || t.D < 0 {
		return 0, fmt.Errorf("%w: cells %d, %d, %d, %d must be non-negative", ErrTable, t.A, t.B, t.C, t.D)
	}
	if alt != Greater && alt != Less {
		return 0, fmt.Errorf("%w: unknown alternative %v", ErrTable, alt)
	}
	n := t.A + t.B // row-1 total (draws)
	m := t.C + t.D // row-2 total
	k := t.A + t.C // column-1 total (marked items)
	total := n + m
	if n == 0 || m == 0 || k == 0 || k == total {
		return 1, nil
	}
	lo := max(0, n+k-total)
	hi := min(n, k)
	var p float64
	switch alt {
	case Greater:
		if t.A <= lo {
			return 1, nil
		}
		p = plan.HypergeometricSF(t.A-1, int64(total), int64(k), n) // P(X ≥ A)
	case Less:
		if t.A >= hi {
			return 1, nil
		}
		p = plan.HypergeometricCDF(t.A, int64(total), int64(k), n) // P(X ≤ A)
	}
	return math.Min(1, p), nil
}

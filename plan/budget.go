package plan

import (
	"sort"
	"strconv"
)

// BudgetRow is one row of the inverse table: with the budget's labels and
// at most Errors errors, a candidate is shown to be below Ceiling.
type BudgetRow struct {
	Errors  int     `json:"errors"`
	Ceiling float64 `json:"ceiling"`
}

// Budget answers the inverse question: for a fixed number of labels n and
// 0, 1, …, rows−1 errors, the lowest ceiling those labels can certify at
// the per-candidate confidence 1 − δ/M'. For an unbounded stream it is the
// one-sided Clopper–Pearson upper bound; for a lot of N it is D/N for the
// smallest D with P(X ≤ x | N, D, n) ≤ δ/M' (the exact hypergeometric
// bound, in whole errors). Rows stop at x = n − 1.
func Budget(n int, confidence float64, candidates int, multiplicity Multiplicity, population int64, rows int) ([]BudgetRow, error) {
	if n < 1 || n > MaxSampleSize {
		return nil, outOfRange("budget", strconv.Itoa(n), "between 1 and 100000000")
	}
	if !(confidence > 0 && confidence < 1) {
		return nil, outOfRange("confidence", fmtNum(confidence), "between 0 and 1 (exclusive)")
	}
	if candidates < 1 {
		return nil, outOfRange("candidates", strconv.Itoa(candidates), "at least 1")
	}
	if population < 0 || (population > 0 && int64(n) > population) {
		return nil, outOfRange("population", strconv.FormatInt(population, 10), "at least the budget "+strconv.Itoa(n))
	}
	alpha := multiplicity.PerCandidateRisk(1-confidence, candidates)
	var out []BudgetRow
	for x := 0; x < rows && x < n; x++ {
		var ceil float64
		if population > 0 {
			ceil = float64(hypergeometricUpperErrors(x, n, population, alpha)+1) / float64(population)
		} else {
			ceil = ClopperPearsonUpper(x, n, 1-alpha)
		}
		out = append(out, BudgetRow{Errors: x, Ceiling: ceil})
	}
	return out, nil
}

// AcceptanceNumberFor returns the largest c for which accepting at ≤ c
// errors in n labels keeps the exact consumer's risk of the inputs
// (binomial, or hypergeometric with a population), or −1 when even c = 0
// does not. It answers "with this budget, how many errors may the plan
// allow?". The inputs are not validated.
func AcceptanceNumberFor(n int, in Inputs) int {
	alpha := in.PerCandidateRisk()
	keeps := sizer{in: in, alpha: alpha}.exactRule()
	// keeps(c, n) is true up to some c and false after: find the first false.
	first := sort.Search(n, func(c int) bool { return !keeps(c, n) })
	return first - 1
}

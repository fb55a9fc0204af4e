package pdfreport

import (
	"math"
	"strconv"
	"strings"
)

// Number formats used throughout the record (record.json keeps full
// precision):
//
//   - error rates (estimates, bounds, ceilings, per-stratum rates) as
//     percentages with three decimals, "2.130 %"; upper bounds are rounded
//     up and lower bounds down, so a printed bound is never tighter than the
//     computed one; a ceiling or anticipated error that three decimals
//     cannot show exactly is printed with as many digits as it needs;
//   - probabilities (risks, p-values) with four significant figures,
//     "0.04829";
//   - confidence levels as 100·(1 − r) % with the risk r rounded to four
//     significant figures, "98.333 %", "99.9999 %";
//   - counts as integers with comma thousands separators, "1,250,000".

// precisionNote is printed under the decision summary.
const precisionNote = "Rates are percentages to three decimals; upper bounds are rounded up and lower bounds down, " +
	"so a printed bound is never tighter than the computed one. Probabilities are given to four significant " +
	"figures. record.json holds the unrounded values."

// pctScale is 10^(2+3): a proportion times pctScale is the percentage in
// units of its third decimal.
const pctScale = 1e5

// snapped returns v rounded to the nearest integer when it is within
// floating-point noise of one, and ok = true; else v and false.
func snapped(v float64) (float64, bool) {
	r := math.Round(v)
	if math.Abs(v-r) <= 1e-7*math.Max(1, math.Abs(v)) {
		return r, true
	}
	return v, false
}

// pctUnits formats a count of thousandths of a percent.
func pctUnits(u float64) string {
	return strconv.FormatFloat(u/1000, 'f', 3, 64) + " %"
}

// pct formats a proportion as a percentage rounded half away from zero.
func pct(x float64) string {
	if bad(x) {
		return "–"
	}
	return pctUnits(math.Round(x * pctScale))
}

// pctUp formats an upper bound, rounded up.
func pctUp(x float64) string {
	if bad(x) {
		return "–"
	}
	v, ok := snapped(x * pctScale)
	if !ok {
		v = math.Ceil(v)
	}
	return pctUnits(v)
}

// pctDown formats a lower bound, rounded down.
func pctDown(x float64) string {
	if bad(x) {
		return "–"
	}
	v, ok := snapped(x * pctScale)
	if !ok {
		v = math.Floor(v)
	}
	return pctUnits(v)
}

// pctExact formats a plan input (a ceiling, an anticipated error): three
// decimals when they show it exactly, else the shortest exact decimal.
func pctExact(x float64) string {
	if bad(x) {
		return "–"
	}
	if v, ok := snapped(x * pctScale); ok {
		return pctUnits(v)
	}
	return shortest(x*100) + " %"
}

// shortest is the shortest decimal that reads back as v after rounding v to
// 12 significant figures (to hide binary noise such as 0.15·100 =
// 15.000000000000002).
func shortest(v float64) string {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// prob formats a probability with four significant figures.
func prob(x float64) string {
	if bad(x) {
		return "–"
	}
	if x == 0 {
		return "0"
	}
	if x >= 1e-4 {
		// 'g' would switch to an exponent for 1e-5 ≤ x < 1e-4 only; keep
		// plain decimals down to 1e-4.
		digits := 3 - int(math.Floor(math.Log10(x)))
		if digits < 0 {
			digits = 0
		}
		s := strconv.FormatFloat(x, 'f', digits, 64)
		// Rounding can carry into a new digit (0.099996 → "0.10000").
		if f, _ := strconv.ParseFloat(s, 64); f != 0 && math.Floor(math.Log10(f)) > math.Floor(math.Log10(x)) {
			s = strconv.FormatFloat(f, 'f', max(digits-1, 0), 64)
		}
		return s
	}
	return strings.Replace(strconv.FormatFloat(x, 'e', 3, 64), "e-0", "e-", 1)
}

// confidence formats a confidence level c as 100·(1 − r) % with r = 1 − c
// rounded to four significant figures.
func confidence(c float64) string {
	if bad(c) {
		return "–"
	}
	r := 1 - c
	if r <= 0 {
		return "100 %"
	}
	r, _ = strconv.ParseFloat(strconv.FormatFloat(r, 'g', 4, 64), 64)
	return shortest(100*(1-r)) + " %"
}

// riskPct formats a risk (δ) as a percentage with four significant figures.
func riskPct(r float64) string {
	if bad(r) {
		return "–"
	}
	if r == 0 {
		return "0 %"
	}
	s, _ := strconv.ParseFloat(strconv.FormatFloat(r, 'g', 4, 64), 64)
	return shortest(100*s) + " %"
}

// count formats an integer with comma thousands separators.
func count(n int64) string {
	s := strconv.FormatInt(n, 10)
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	var b strings.Builder
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(r)
	}
	if neg {
		return "-" + b.String()
	}
	return b.String()
}

// bad reports a value that is not a finite number.
func bad(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }

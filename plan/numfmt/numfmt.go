// Package numfmt is how probity writes numbers for people. Every command's
// console output, the PDF record, the sentences a record stores (reasons,
// caveats, notes, the method statement) and the trend chart format their
// numbers here, so one quantity reads the same wherever it is shown.
// record.json, plan.yaml and the manifest keep the unrounded values.
//
// One rule per kind of quantity (common practice, no source):
//
//   - a percentage is written with a space before the sign, "2.130 %"
//     (ISO 80000-1);
//   - error rates and shares (estimates, bounds, per-stratum rates,
//     agreement and disagreement rates) are percentages with three
//     decimals, Rate; an upper bound is rounded up (RateUp) and a lower
//     bound or an "at least" down (RateDown), so a printed bound is never
//     tighter than the computed one;
//   - a stated proportion (a ceiling, an anticipated error) is written
//     with the digits it has, "2 %", "0.5 %" (Setting), and a confidence
//     level as 100·(1 − r) % with its risk r to four significant figures,
//     "95 %", "98.333 %" (Confidence);
//   - a probability that is a risk or a chance of passing is a percentage
//     with four significant figures, "1.656 %", "90.05 %" (Chance); a
//     p-value is a number with four significant figures, "0.04829",
//     "3.148e-6" (PValue);
//   - an agreement coefficient (kappa, AC1) has three decimals, its
//     interval rounded outward (Coefficient, CoefficientDown,
//     CoefficientUp);
//   - a count has a comma between groups of three digits from 1,000 up,
//     "1,712", "240,000" (Count); an identifier that is a number (an item,
//     a line, a year) is not a count;
//   - an inclusion weight N_h/n_h has two decimals, "140.12" (Weight).
//
// A value that is not a finite number is written "–".
package numfmt

import (
	"math"
	"strconv"
	"strings"
)

// NotANumber is what every function writes for NaN or ±Inf.
const NotANumber = "–"

// pctScale is 10^(2+3): a proportion times pctScale is the percentage in
// units of its third decimal.
const pctScale = 1e5

func bad(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }

// noise is the relative distance below which a value is taken to be the
// printed digit it is next to: binary noise, not a difference.
const noise = 1e-9

// snapped returns v rounded to the nearest integer when it is within
// floating-point noise of one, and ok = true; else v and false. Rounding
// up or down then never moves a value that is whole up to noise
// (0.1·0.2·1e5 is 2000.0000000000002).
func snapped(v float64) (float64, bool) {
	r := math.Round(v)
	if math.Abs(v-r) <= noise*math.Max(1, math.Abs(v)) {
		return r, true
	}
	return v, false
}

// pctUnits writes a count of thousandths of a percent.
func pctUnits(u float64) string {
	if u == 0 {
		u = 0 // no "-0.000 %"
	}
	return strconv.FormatFloat(u/1000, 'f', 3, 64) + " %"
}

// Rate writes an error rate or share as a percentage with three decimals,
// rounded half away from zero: Rate(0.021304) = "2.130 %".
func Rate(x float64) string {
	if bad(x) {
		return NotANumber
	}
	v, _ := snapped(x * pctScale)
	return pctUnits(math.Round(v))
}

// RateUp writes an upper bound as Rate does, rounded up: RateUp(0.0213001)
// = "2.131 %".
func RateUp(x float64) string {
	if bad(x) {
		return NotANumber
	}
	v, ok := snapped(x * pctScale)
	if !ok {
		v = math.Ceil(v)
	}
	return pctUnits(v)
}

// RateDown writes a lower bound, or an "at least", as Rate does, rounded
// down: RateDown(1/60.0) = "1.666 %".
func RateDown(x float64) string {
	if bad(x) {
		return NotANumber
	}
	v, ok := snapped(x * pctScale)
	if !ok {
		v = math.Floor(v)
	}
	return pctUnits(v)
}

// Setting writes a stated proportion (a ceiling, an anticipated error) as
// a percentage with the digits it has: Setting(0.02) = "2 %",
// Setting(0.0015) = "0.15 %". Binary noise below 12 significant figures
// is dropped (0.15·100 is 15.000000000000002).
func Setting(x float64) string {
	if bad(x) {
		return NotANumber
	}
	return shortest(100*x) + " %"
}

// Confidence writes a confidence level c as 100·(1 − r) % with its risk
// r = 1 − c rounded to four significant figures: Confidence(0.95) =
// "95 %", Confidence(1 − 0.05/3) = "98.333 %".
func Confidence(c float64) string {
	if bad(c) {
		return NotANumber
	}
	r := 1 - c
	if r <= 0 {
		return "100 %"
	}
	r, _ = strconv.ParseFloat(strconv.FormatFloat(r, 'g', 4, 64), 64)
	return shortest(100*(1-r)) + " %"
}

// Chance writes a probability that is a risk or a chance of passing as a
// percentage with four significant figures, trailing zeros dropped:
// Chance(0.016561) = "1.656 %", Chance(0.27) = "27 %". Below 0.0001 % it
// takes an exponent, "3e-9 %"; a chance that four figures would round to
// 100 % without being certain is "over 99.99 %".
func Chance(p float64) string { return chance(p, false) }

// ChanceUp writes a risk stated as "at most" as Chance does, rounded up
// at the fourth significant figure so the printed bound is never below
// the computed one: ChanceUp(0.0165012) = "1.651 %", ChanceUp(0.0165) =
// "1.65 %" (float noise below 1e-9 relative is not rounded up).
func ChanceUp(p float64) string { return chance(p, true) }

// chance is Chance, and with up ChanceUp.
func chance(p float64, up bool) string {
	if bad(p) {
		return NotANumber
	}
	v := 100 * p
	switch {
	case v == 0:
		return "0 %"
	case v < 0:
		return "-" + chance(-p, up)
	}
	if up {
		scale := math.Pow(10, 3-math.Floor(math.Log10(v)))
		u, exact := snapped(v * scale)
		if !exact {
			u = math.Ceil(u)
		}
		v = u / scale
	}
	if v < 1e-4 {
		return exponent(strconv.FormatFloat(v, 'g', 4, 64)) + " %"
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 4, 64), 64)
	if r >= 100 && p < 1 {
		return "over 99.99 %"
	}
	return strconv.FormatFloat(r, 'f', -1, 64) + " %"
}

// PValue writes a p-value with four significant figures, plain down to
// 0.0001 and with an exponent below: PValue(0.0482912) = "0.04829",
// PValue(0.0844) = "0.08440", PValue(3.2e-7) = "3.200e-7".
func PValue(p float64) string {
	if bad(p) {
		return NotANumber
	}
	if p == 0 {
		return "0"
	}
	a := math.Abs(p)
	if a < 1e-4 {
		return exponent(strconv.FormatFloat(p, 'e', 3, 64))
	}
	digits := max(3-int(math.Floor(math.Log10(a))), 0)
	s := strconv.FormatFloat(p, 'f', digits, 64)
	// Rounding can carry into a new digit (0.099996 → "0.10000").
	if f, _ := strconv.ParseFloat(s, 64); f != 0 && math.Floor(math.Log10(math.Abs(f))) > math.Floor(math.Log10(a)) {
		s = strconv.FormatFloat(f, 'f', max(digits-1, 0), 64)
	}
	return s
}

// exponent writes Go's "3.2e-07" as "3.2e-7".
func exponent(s string) string {
	s = strings.Replace(s, "e-0", "e-", 1)
	return strings.Replace(s, "e+0", "e+", 1)
}

// Coefficient writes an agreement coefficient (Cohen's kappa, Gwet's AC1,
// a standard error, a chance agreement) with three decimals, rounded half
// away from zero: Coefficient(0.7675) = "0.768".
func Coefficient(x float64) string {
	if bad(x) {
		return NotANumber
	}
	v, _ := snapped(x * 1000)
	return coefUnits(math.Round(v))
}

// CoefficientDown and CoefficientUp write the ends of a coefficient's
// interval, rounded outward, so a printed interval is never narrower than
// the computed one.
func CoefficientDown(x float64) string {
	if bad(x) {
		return NotANumber
	}
	v, ok := snapped(x * 1000)
	if !ok {
		v = math.Floor(v)
	}
	return coefUnits(v)
}

// CoefficientUp: see CoefficientDown.
func CoefficientUp(x float64) string {
	if bad(x) {
		return NotANumber
	}
	v, ok := snapped(x * 1000)
	if !ok {
		v = math.Ceil(v)
	}
	return coefUnits(v)
}

func coefUnits(u float64) string {
	if u == 0 {
		u = 0
	}
	return strconv.FormatFloat(u/1000, 'f', 3, 64)
}

// Count writes a count with a comma between groups of three digits:
// Count(1250000) = "1,250,000", Count(999) = "999".
func Count[T ~int | ~int64](n T) string {
	s := strconv.FormatInt(int64(n), 10)
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	var b strings.Builder
	if neg {
		b.WriteByte('-')
	}
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(r)
	}
	return b.String()
}

// Weight writes an inclusion weight N_h/n_h with two decimals:
// Weight(140.1234) = "140.12".
func Weight(w float64) string {
	if bad(w) {
		return NotANumber
	}
	return strconv.FormatFloat(w, 'f', 2, 64)
}

// Number writes a stated number that is not a proportion (a score
// threshold, a significance level) with the digits it has: Number(0.5) =
// "0.5", Number(0.05) = "0.05".
func Number(x float64) string {
	if bad(x) {
		return NotANumber
	}
	return shortest(x)
}

// shortest is the shortest decimal that reads back as v after rounding v
// to 12 significant figures (to hide binary noise such as 0.15·100 =
// 15.000000000000002).
func shortest(v float64) string {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
	if r == 0 {
		r = 0
	}
	return strconv.FormatFloat(r, 'f', -1, 64)
}

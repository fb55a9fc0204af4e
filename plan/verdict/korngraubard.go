package verdict

import (
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// KornGraubardUpper is the one-sided upper confidence bound of Korn and
// Graubard (Survey Methodology 24(2), 1998, pp. 193–201): the
// Clopper–Pearson bound with the effective sample size in place of n,
//
//	n* = p̂ (1 − p̂) / v̂ · (t_{α, n−1} / t_{α, n−H})²,   α = 1 − confidence,
//	upper = B⁻¹(confidence; n* p̂ + 1, n* (1 − p̂)),
//
// where t_{α, d} is the lower α quantile of Student's t with d degrees of
// freedom and B⁻¹ the beta quantile. This is what R's survey package
// computes in svyciprop(method = "beta") as the upper end of a two-sided
// interval at level 1 − 2α. When p̂ = 0 or v̂ = 0 (no errors, or only
// errors, in every stratum) n* is taken as n before the t adjustment (Korn
// and Graubard's convention for p̂ = 0; svyciprop returns NaN there). The
// degrees-of-freedom adjustment is skipped when n − H < 1. It is
// approximate: the coverage is not guaranteed. 1 when p̂ = 1; NaN outside
// 0 < confidence < 1.
func KornGraubardUpper(e Estimate, n int, confidence float64) float64 {
	if !(confidence > 0 && confidence < 1) || n < 1 {
		return math.NaN()
	}
	p := e.Rate
	if p >= 1 {
		return 1
	}
	neff := float64(n)
	if e.Variance > 0 && p > 0 {
		neff = p * (1 - p) / e.Variance
	}
	alpha := 1 - confidence
	if df := n - e.SampledStrata; df >= 1 && n > 1 {
		num := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(n - 1)}.Quantile(alpha)
		den := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(df)}.Quantile(alpha)
		// At α = 1/2 both quantiles are 0 and the ratio is undefined; the
		// adjustment is then skipped (the bound is the median-level one).
		if num != 0 && den != 0 {
			neff *= (num / den) * (num / den)
		}
	}
	a := neff*p + 1
	b := neff * (1 - p)
	if !(b > 0) || math.IsInf(a, 0) || math.IsNaN(a) {
		return 1
	}
	return mathext.InvRegIncBeta(a, b, confidence)
}

package plan

import (
	"math"
	"strconv"
)

// OCPoint is one point of a plan's operating-characteristic curve: the
// probability that a candidate whose true error is Error is accepted.
type OCPoint struct {
	Error             float64 `json:"error"`
	AcceptProbability float64 `json:"accept_probability"`
}

// AcceptProbability is the exact probability that the plan's rule
// (n, c) accepts a candidate whose true error is errorRate:
//
//	P(accept) = P(X ≤ c),  X ~ Bin(n, errorRate)
//
// or, for a finite lot of N, X hypergeometric with D = round(errorRate·N)
// errors in the lot (1e-9 snapping as in BadLotErrors). NaN for an error
// outside [0, 1].
func (f *File) AcceptProbability(errorRate float64) float64 {
	if !(errorRate >= 0 && errorRate <= 1) {
		return math.NaN()
	}
	n, c := f.Rule.SampleSize, f.Rule.AcceptanceNumber
	if N := f.Inputs.Population; N > 0 {
		d := int64(math.Round(snapInteger(errorRate * float64(N))))
		return HypergeometricCDF(c, N, d, n)
	}
	return BinomialCDF(c, n, errorRate)
}

// OC returns points ≥ 2 evenly spaced points of the OC curve, from error 0
// up to the error at which the acceptance probability has fallen to 0.001
// (at least twice the ceiling, at most 1), exact for binomial and
// hypergeometric plans. For a finite lot each error is a whole number of
// errors in the lot (D/N), and repeated points are dropped.
func (f *File) OC(points int) []OCPoint {
	points = max(points, 2)
	top := f.ocTop()
	out := make([]OCPoint, 0, points)
	for i := 0; i < points; i++ {
		// rounded to 10 significant digits so the grid reads cleanly
		e, _ := strconv.ParseFloat(strconv.FormatFloat(top*float64(i)/float64(points-1), 'g', 10, 64), 64)
		if N := f.Inputs.Population; N > 0 {
			e = math.Round(snapInteger(e*float64(N))) / float64(N)
			if len(out) > 0 && out[len(out)-1].Error == e {
				continue
			}
		}
		out = append(out, OCPoint{Error: e, AcceptProbability: f.AcceptProbability(e)})
	}
	return out
}

// ocTop is the right end of the plotted curve: the one-sided upper bound at
// 0.999 for (c, n) — where P(accept) = 0.001 — rounded up to two
// significant digits, clamped to [2·ceiling, 1].
func (f *File) ocTop() float64 {
	c, n := f.Rule.AcceptanceNumber, f.Rule.SampleSize
	top := 2 * f.Inputs.Ceiling
	if u := ClopperPearsonUpper(c, n, 0.999); u > top {
		top = u
	}
	if top >= 1 {
		return 1
	}
	scale := math.Pow(10, math.Floor(math.Log10(top))-1)
	return min(1, math.Ceil(top/scale)*scale)
}

// KeyPoints returns the OC at the points a reader checks first: p0 (when
// given), fractions of the ceiling (¼, ½, ¾, 1, 1½, 2); sorted, without
// repeats. For a finite lot every point is a whole number of errors D and
// is reported at D/N, the rate it is computed at: the ceiling at
// D1 = ⌈ceiling·N⌉ and p0 at D0 = ⌊p0·N⌋, as the stated risks are (see
// CeilingPoint), the fractions at the nearest whole number.
func (f *File) KeyPoints() []OCPoint {
	ceil := f.Inputs.Ceiling
	es := []float64{0.25 * ceil, 0.5 * ceil, 0.75 * ceil, 1.5 * ceil, 2 * ceil, f.CeilingPoint()}
	if p0, ok := f.AnticipatedPoint(); ok {
		es = append(es, p0)
	}
	if N := f.Inputs.Population; N > 0 {
		for i := 0; i < 5; i++ {
			es[i] = math.Round(snapInteger(es[i]*float64(N))) / float64(N)
		}
	}
	var out []OCPoint
	for _, e := range sortedUnique(es) {
		if e > 1 {
			continue
		}
		out = append(out, OCPoint{Error: e, AcceptProbability: f.AcceptProbability(e)})
	}
	return out
}

// CeilingPoint is the error rate at which the consumer's risk is stated:
// the ceiling, or for a finite lot of N decisions D1/N with
// D1 = ⌈ceiling·N⌉ (BadLotErrors).
func (f *File) CeilingPoint() float64 {
	if N := f.Inputs.Population; N > 0 {
		return float64(BadLotErrors(N, f.Inputs.Ceiling)) / float64(N)
	}
	return f.Inputs.Ceiling
}

// AnticipatedPoint is the error rate at which the producer's risk is
// stated: p0, or for a finite lot D0/N with D0 = ⌊p0·N⌋ (GoodLotErrors);
// ok is false without p0.
func (f *File) AnticipatedPoint() (float64, bool) {
	p0 := f.Inputs.Anticipated
	if p0 == nil {
		return 0, false
	}
	if N := f.Inputs.Population; N > 0 {
		return float64(GoodLotErrors(N, *p0)) / float64(N), true
	}
	return *p0, true
}

// HalfCeilingPoint is the point at which a zero-failure or minimal plan
// states how often it rejects a good model: exactly half the ceiling, or
// for a finite lot of N decisions the whole number of errors
// ⌊ceiling·N/2⌋ at or below half of it, reported at that count's rate.
func (f *File) HalfCeilingPoint() OCPoint {
	e := f.Inputs.Ceiling / 2
	if N := f.Inputs.Population; N > 0 {
		e = math.Floor(snapInteger(e*float64(N))) / float64(N)
	}
	return OCPoint{Error: e, AcceptProbability: f.AcceptProbability(e)}
}

func sortedUnique(v []float64) []float64 {
	s := append([]float64(nil), v...)
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
	out := s[:0]
	for i, x := range s {
		if i == 0 || x != s[i-1] {
			out = append(out, x)
		}
	}
	return out
}

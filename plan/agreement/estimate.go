package agreement

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// ErrUndefined is returned when a coefficient is 0/0 on the table given:
// no items, or (for kappa) chance agreement equal to 1 because both
// labelers put every item in the same single class.
var ErrUndefined = errors.New("agreement coefficient is undefined")

// ErrConfidence is returned for a confidence level outside (0, 1).
var ErrConfidence = errors.New("confidence must be strictly between 0 and 1")

// Estimate is an agreement coefficient with its large-sample standard
// error and a two-sided confidence interval
//
//	Value ± z_{1−(1−Confidence)/2} · StdErr,
//
// clipped to [−1, 1] (the range of both kappa and AC1).
type Estimate struct {
	// Value is the coefficient.
	Value float64
	// Observed is p_o and Chance the chance agreement p_e the coefficient
	// corrects for: Value = (p_o − p_e)/(1 − p_e).
	Observed float64
	Chance   float64
	// StdErr is the square root of the estimated variance.
	StdErr float64
	// Lower and Upper bound the interval; Confidence is its level.
	Lower, Upper float64
	Confidence   float64
	// N is the number of items the coefficient was computed on.
	N int
}

// checkConfidence validates a confidence level before it reaches gonum.
func checkConfidence(c float64) error {
	if !(c > 0 && c < 1) {
		return fmt.Errorf("%w: got %v", ErrConfidence, c)
	}
	return nil
}

// withInterval fills the interval of e from its value and variance. A
// variance that rounding made slightly negative is taken as 0.
func withInterval(e Estimate, variance, confidence float64) Estimate {
	if variance < 0 || math.IsNaN(variance) {
		variance = 0
	}
	e.StdErr = math.Sqrt(variance)
	z := distuv.UnitNormal.Quantile(1 - (1-confidence)/2)
	e.Confidence = confidence
	e.Lower = math.Max(-1, e.Value-z*e.StdErr)
	e.Upper = math.Min(1, e.Value+z*e.StdErr)
	return e
}

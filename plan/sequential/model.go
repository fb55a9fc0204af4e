package sequential

import (
	"errors"
	"fmt"
	"math"
)

// ErrDomain is wrapped by every error about an argument outside its
// domain.
var ErrDomain = errors.New("argument out of domain")

// Model is the probability law of the error indicators, item by item.
type Model interface {
	// NextError is the probability that the next item is an error, given
	// that t items have been labeled and e of them were errors
	// (0 ≤ e ≤ t).
	NextError(t, e int) float64
	// MaxItems is the most items that can be labeled (0: unbounded).
	MaxItems() int
}

// Binomial is an unbounded stream of decisions with error rate P: the
// indicators are independent Bernoulli(P).
type Binomial struct{ P float64 }

// NextError returns P whatever has been seen.
func (b Binomial) NextError(t, e int) float64 { return b.P }

// MaxItems is 0: a stream has no end.
func (b Binomial) MaxItems() int { return 0 }

// Hypergeometric is a finite lot of N decisions of which D are errors,
// labeled without replacement in random order: after t items with e
// errors the next one is an error with probability (D − e)/(N − t).
type Hypergeometric struct {
	N int64
	D int64
}

// NextError returns (D − e)/(N − t), clamped to [0, 1].
func (h Hypergeometric) NextError(t, e int) float64 {
	left := h.N - int64(t)
	if left <= 0 {
		return 0
	}
	bad := h.D - int64(e)
	if bad <= 0 {
		return 0
	}
	if bad >= left {
		return 1
	}
	return float64(bad) / float64(left)
}

// MaxItems is N (capped to the largest int).
func (h Hypergeometric) MaxItems() int {
	if h.N > math.MaxInt32 {
		return math.MaxInt32
	}
	return int(h.N)
}

// checkModel validates a model's parameters.
func checkModel(m Model) error {
	switch v := m.(type) {
	case Binomial:
		if !(v.P >= 0 && v.P <= 1) {
			return fmt.Errorf("%w: error rate %v is outside [0, 1]", ErrDomain, v.P)
		}
	case Hypergeometric:
		if v.N < 1 || v.D < 0 || v.D > v.N {
			return fmt.Errorf("%w: lot of %d with %d errors is not valid", ErrDomain, v.N, v.D)
		}
	case nil:
		return fmt.Errorf("%w: no model", ErrDomain)
	}
	return nil
}

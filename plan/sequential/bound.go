package sequential

import (
	"fmt"
	"math"

	"probity/plan"
)

// Outcome is where a sequential audit stopped: after T labels with E
// errors, with decision D (Accept or Reject).
type Outcome struct {
	T, E int
	D    Decision
}

// favourable reports whether outcome a is at least as favourable to a low
// error as b in the stage-wise ordering (Siegmund 1978; Jennison &
// Turnbull, Group Sequential Methods, 2000, §8.4 — from memory): every
// acceptance ranks above every rejection; an earlier acceptance ranks
// above a later one and, at the same t, fewer errors above more; a later
// rejection ranks above an earlier one and, at the same t, fewer errors
// above more.
func favourable(a, b Outcome) bool {
	if a.D != b.D {
		return a.D == Accept
	}
	if a.T != b.T {
		if a.D == Accept {
			return a.T < b.T
		}
		return a.T > b.T
	}
	return a.E <= b.E
}

// PValue is the exact p-value of H0: error ≥ p1 for an audit that stopped
// at outcome o under rule r: the probability, at error rate p1 (binomial),
// of an outcome at least as favourable as o in the stage-wise ordering,
// computed by the same dynamic programme as Evaluate. For an acceptance
// it is at most P(accept | p1), the plan's consumer's risk.
func PValue(rule *plan.SequentialRule, o Outcome, p1 float64) (float64, error) {
	b, err := newBounds(rule)
	if err != nil {
		return 0, err
	}
	if err := b.checkOutcome(o); err != nil {
		return 0, err
	}
	if !(p1 >= 0 && p1 <= 1) {
		return 0, fmt.Errorf("%w: error rate %v is outside [0, 1]", ErrDomain, p1)
	}
	return b.pValue(o, p1), nil
}

func (b *bounds) checkOutcome(o Outcome) error {
	if o.T < 1 || o.T > b.T || o.E < 0 || o.E > o.T {
		return fmt.Errorf("%w: outcome of %d errors at t = %d is not possible under a rule of %d", ErrDomain, o.E, o.T, b.T)
	}
	switch o.D {
	case Accept:
		if o.E > b.acc[o.T] {
			return fmt.Errorf("%w: the rule does not accept %d errors at t = %d", ErrDomain, o.E, o.T)
		}
	case Reject:
		if o.E < b.rej[o.T] {
			return fmt.Errorf("%w: the rule does not reject %d errors at t = %d", ErrDomain, o.E, o.T)
		}
	default:
		return fmt.Errorf("%w: an outcome must be accept or reject, not %q", ErrDomain, o.D)
	}
	return nil
}

// pValue sums the stopping probabilities of the outcomes at least as
// favourable as o, at error rate p.
func (b *bounds) pValue(o Outcome, p float64) float64 {
	width := b.maxReject() + 2
	cur := make([]float64, width)
	next := make([]float64, width)
	cur[0] = 1
	lo, hi := 0, 0
	sum := 0.0
	for t := 0; t < b.T && lo <= hi; t++ {
		carry := 0.0
		for e := lo; e <= hi; e++ {
			v := cur[e]
			next[e] = v*(1-p) + carry
			carry = v * p
		}
		next[hi+1] = carry
		t1 := t + 1
		nlo, nhi := lo, hi+1
		if a := b.acc[t1]; a >= nlo {
			for e := nlo; e <= nhi && e <= a; e++ {
				if favourable(Outcome{t1, e, Accept}, o) {
					sum += next[e]
				}
			}
			nlo = a + 1
		}
		if r := b.rej[t1]; r <= nhi {
			for e := max(nlo, r); e <= nhi; e++ {
				if favourable(Outcome{t1, e, Reject}, o) {
					sum += next[e]
				}
			}
			nhi = r - 1
		}
		cur, next = next, cur
		lo, hi = nlo, nhi
	}
	return math.Min(sum, 1)
}

// UpperBound is the exact one-sided upper confidence bound for the error
// rate after a sequential audit stopped at outcome o: the p at which the
// stage-wise p-value of H0: error ≥ p equals 1 − confidence, found by
// bisection (the p-value is non-increasing in p for boundaries that are
// non-decreasing in t, as the plans Search makes are). It is 1 when even
// p = 1 is not excluded. For a fixed plan stopped only at t = n it equals
// the Clopper–Pearson bound.
func UpperBound(rule *plan.SequentialRule, o Outcome, confidence float64) (float64, error) {
	b, err := newBounds(rule)
	if err != nil {
		return 0, err
	}
	if err := b.checkOutcome(o); err != nil {
		return 0, err
	}
	if !(confidence > 0 && confidence < 1) {
		return 0, fmt.Errorf("%w: confidence %v is outside (0, 1)", ErrDomain, confidence)
	}
	alpha := 1 - confidence
	lo, hi := 0.0, 1.0
	if b.pValue(o, hi) > alpha {
		return 1, nil
	}
	for i := 0; i < 100 && hi-lo > 1e-13*hi; i++ {
		mid := (lo + hi) / 2
		if b.pValue(o, mid) > alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return hi, nil
}

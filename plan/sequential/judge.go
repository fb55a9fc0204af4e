package sequential

import (
	"fmt"

	"probity/plan"
)

// Decision is the state of a sequential rule after some labels.
type Decision string

// Decisions.
const (
	Continue Decision = "continue"
	Accept   Decision = "accept"
	Reject   Decision = "reject"
)

// Rule is a validated sequential rule, ready to judge label sequences.
type Rule struct{ b *bounds }

// NewRule validates r (see Validate).
func NewRule(r *plan.SequentialRule) (*Rule, error) {
	b, err := newBounds(r)
	if err != nil {
		return nil, err
	}
	return &Rule{b: b}, nil
}

// MaxSampleSize is the truncation point T.
func (r *Rule) MaxSampleSize() int { return r.b.T }

// At returns the decision of the boundaries after exactly t labels with e
// errors (0 ≤ e ≤ t ≤ T), ignoring whether an earlier state had already
// decided: accept when e ≤ a_t, reject when e ≥ r_t, else continue (t = 0
// always continues).
func (r *Rule) At(t, e int) Decision {
	if t <= 0 {
		return Continue
	}
	if t > r.b.T {
		t = r.b.T
	}
	switch {
	case e <= r.b.acc[t]:
		return Accept
	case e >= r.b.rej[t]:
		return Reject
	}
	return Continue
}

// Judge walks the ordered error indicators (errs[i] true when item i+1 was
// an error) through the boundaries and returns the decision and the
// number of labels at which it was reached. Items after that point do not
// count. When the indicators run out before a decision it returns
// Continue with the number of labels seen.
func (r *Rule) Judge(errs []bool) (Decision, int) {
	e := 0
	for i, bad := range errs {
		if i >= r.b.T {
			break
		}
		if bad {
			e++
		}
		if d := r.At(i+1, e); d != Continue {
			return d, i + 1
		}
	}
	return Continue, min(len(errs), r.b.T)
}

// Judge is Rule.Judge for a plan file's rule.
func Judge(rule *plan.SequentialRule, errs []bool) (Decision, int, error) {
	r, err := NewRule(rule)
	if err != nil {
		return Continue, 0, err
	}
	d, at := r.Judge(errs)
	return d, at, nil
}

// MaxRemaining is the largest number of further labels any continuation
// from a running state (t labels, e errors) can take before the rule
// decides: the longest path through the continuation region, found by
// propagating the set of reachable running error counts forward. It is 0
// when the state has already decided.
func (r *Rule) MaxRemaining(t, e int) (int, error) {
	if t < 0 || e < 0 || e > t || t > r.b.T {
		return 0, fmt.Errorf("%w: state of %d errors in %d labels is not valid for a rule of %d", ErrDomain, e, t, r.b.T)
	}
	if r.At(t, e) != Continue {
		return 0, nil
	}
	lo, hi := e, e // reachable running counts form an interval
	for u := t + 1; u <= r.b.T; u++ {
		hi++
		if a := r.b.acc[u]; a >= lo {
			lo = a + 1
		}
		if rj := r.b.rej[u]; rj <= hi {
			hi = rj - 1
		}
		if lo > hi {
			return u - t, nil
		}
	}
	return r.b.T - t, nil
}

// ToAcceptWithoutErrors is the number of further labels after which the
// rule accepts from a running state (t, e) if none of them is an error,
// or −1 if it would not accept that way (it would reject first or never
// reach acceptance).
func (r *Rule) ToAcceptWithoutErrors(t, e int) int {
	for u := t + 1; u <= r.b.T; u++ {
		switch r.At(u, e) {
		case Accept:
			return u - t
		case Reject:
			return -1
		}
	}
	return -1
}

// ToRejectWithErrors is the number of further labels after which the rule
// rejects from a running state (t, e) if every one of them is an error, or
// −1 if it would not reject that way.
func (r *Rule) ToRejectWithErrors(t, e int) int {
	for u := t + 1; u <= r.b.T; u++ {
		e++
		switch r.At(u, e) {
		case Reject:
			return u - t
		case Accept:
			return -1
		}
	}
	return -1
}

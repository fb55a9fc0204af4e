package sequential

import (
	"fmt"

	"probity/plan"
)

// never is the reject boundary where rejection is not possible (no count
// of errors reaches it).
const never = int(^uint(0) >> 1)

// bounds is a validated rule in the form the dynamic programme uses:
// acc[t] and rej[t] for t = 1 … T (index 0 unused: no decision before the
// first label).
type bounds struct {
	T    int
	acc  []int // −1: acceptance not possible
	rej  []int // never: rejection not possible
	rmax int   // a bound above every running error count (array width − 2)
}

// newBounds validates a rule and converts it. A rule is valid when both
// arrays have MaxSampleSize entries, −1 ≤ a_t ≤ t, 1 ≤ r_t ≤ t where set,
// a_t < r_t, and the boundaries meet at the truncation point: a_T ≥ 0 and
// r_T = a_T + 1.
func newBounds(r *plan.SequentialRule) (*bounds, error) {
	if r == nil {
		return nil, fmt.Errorf("%w: no sequential rule", ErrDomain)
	}
	T := r.MaxSampleSize
	if T < 1 {
		return nil, badBound("max_sample_size", "max_sample_size %d is below 1", T)
	}
	if len(r.AcceptIfErrorsAtMost) != T {
		return nil, badBound(acceptKey, "accept_if_errors_at_most has %d entries; it needs max_sample_size = %d", len(r.AcceptIfErrorsAtMost), T)
	}
	if len(r.RejectIfErrorsAtLeast) != T {
		return nil, badBound(rejectKey, "reject_if_errors_at_least has %d entries; it needs max_sample_size = %d", len(r.RejectIfErrorsAtLeast), T)
	}
	b := &bounds{T: T, acc: make([]int, T+1), rej: make([]int, T+1)}
	b.acc[0], b.rej[0] = -1, never
	for t := 1; t <= T; t++ {
		a := r.AcceptIfErrorsAtMost[t-1]
		if a < -1 || a > t {
			return nil, badBound(at(acceptKey, t), "accept_if_errors_at_most at t = %d is %d, outside [-1, %d]", t, a, t)
		}
		rj := never
		if p := r.RejectIfErrorsAtLeast[t-1]; p != nil {
			rj = *p
			if rj < 1 || rj > t {
				return nil, badBound(at(rejectKey, t), "reject_if_errors_at_least at t = %d is %d, outside [1, %d]", t, rj, t)
			}
			if rj <= a {
				return nil, badBound(at(rejectKey, t), "at t = %d the reject boundary %d is not above the accept boundary %d", t, rj, a)
			}
		}
		b.acc[t], b.rej[t] = a, rj
		// the running counts at t stay below min(r_t, t + 1)
		b.rmax = max(b.rmax, min(rj, t+1))
	}
	if b.acc[T] < 0 || b.rej[T] != b.acc[T]+1 {
		return nil, badBound(at(acceptKey, T), "at t = max_sample_size = %d the boundaries must meet (reject = accept + 1), got accept %d and reject %s",
			T, b.acc[T], fmtBound(b.rej[T]))
	}
	return b, nil
}

// The keys of the boundary arrays in the plan file's sequential section.
const (
	acceptKey = "accept_if_errors_at_most"
	rejectKey = "reject_if_errors_at_least"
)

// at is the key of the boundary at t (1-based) in its array: "key[t−1]".
func at(key string, t int) string { return fmt.Sprintf("%s[%d]", key, t-1) }

// BoundError is a malformed sequential rule: Key is the key of the plan
// file's sequential section at fault ("accept_if_errors_at_most[11]").
// It wraps ErrDomain.
type BoundError struct {
	Key string
	Msg string
}

func (e *BoundError) Error() string { return ErrDomain.Error() + ": " + e.Msg }

// Unwrap returns ErrDomain.
func (e *BoundError) Unwrap() error { return ErrDomain }

func badBound(key, format string, args ...any) error {
	return &BoundError{Key: key, Msg: fmt.Sprintf(format, args...)}
}

// rule converts bounds back to the plan file's form.
func (b *bounds) rule() *plan.SequentialRule {
	r := &plan.SequentialRule{
		MaxSampleSize:         b.T,
		AcceptIfErrorsAtMost:  make([]int, b.T),
		RejectIfErrorsAtLeast: make([]*int, b.T),
	}
	for t := 1; t <= b.T; t++ {
		r.AcceptIfErrorsAtMost[t-1] = b.acc[t]
		if b.rej[t] != never {
			v := b.rej[t]
			r.RejectIfErrorsAtLeast[t-1] = &v
		}
	}
	return r
}

// maxReject bounds the error counts the dynamic programme tracks: every
// running count at any t is below it, and so is r_T.
func (b *bounds) maxReject() int { return b.rmax }

func fmtBound(v int) string {
	if v == never {
		return "null"
	}
	return fmt.Sprint(v)
}

// Validate reports whether r is a well-formed truncated sequential rule
// (see the conditions on newBounds): every path must end in a decision by
// t = MaxSampleSize.
func Validate(r *plan.SequentialRule) error {
	_, err := newBounds(r)
	return err
}

// Curtailed expresses the fixed plan "label n, accept when errors ≤ c" with
// exact curtailment as a sequential rule: after t labels, reject as soon as
// errors reach c + 1 (r_t = c + 1 once t ≥ c + 1), and accept as soon as
// errors ≤ c is certain even if every remaining item were an error
// (a_t = c − (n − t) when that is ≥ 0). Curtailment changes neither risk:
// every path is decided exactly as the full sample of n would decide it.
func Curtailed(n, c int) (*plan.SequentialRule, error) {
	if n < 1 || c < 0 || c >= n {
		return nil, fmt.Errorf("%w: fixed plan n = %d, c = %d needs n ≥ 1 and 0 ≤ c < n", ErrDomain, n, c)
	}
	r := &plan.SequentialRule{
		MaxSampleSize:         n,
		AcceptIfErrorsAtMost:  make([]int, n),
		RejectIfErrorsAtLeast: make([]*int, n),
	}
	for t := 1; t <= n; t++ {
		a := c - (n - t)
		if a < 0 {
			a = -1
		}
		r.AcceptIfErrorsAtMost[t-1] = a
		if t >= c+1 {
			v := c + 1
			r.RejectIfErrorsAtLeast[t-1] = &v
		}
	}
	return r, nil
}

package sequential

import (
	"fmt"
	"math"

	"probity/plan"
)

// Performance is the exact behaviour of a sequential rule under one model.
type Performance struct {
	// Accept and Reject are P(accept) and P(reject); they sum to 1 up to
	// rounding because every path is decided by the truncation point.
	Accept float64
	Reject float64
	// ASN is the average sample number E[N], N the number of labels at
	// which the rule decides.
	ASN float64
}

// Evaluate computes the exact OC value and ASN of rule r under model m by
// dynamic programming over the states (t labeled, e errors) that have not
// yet stopped:
//
//	P_{t+1}(e) = P_t(e)·(1 − q(t, e)) + P_t(e − 1)·q(t, e − 1),
//
// q(t, e) being m.NextError(t, e); after each step the mass with
// e ≤ a_{t+1} is added to P(accept), the mass with e ≥ r_{t+1} to
// P(reject), and both are removed. E[N] = Σ_{t=0}^{T−1} P(N > t), the
// sum of the mass still running before each label. The cost is
// O(T · width of the continuation band).
func Evaluate(r *plan.SequentialRule, m Model) (Performance, error) {
	b, err := newBounds(r)
	if err != nil {
		return Performance{}, err
	}
	if err := checkModel(m); err != nil {
		return Performance{}, err
	}
	if mx := m.MaxItems(); mx > 0 && b.T > mx {
		return Performance{}, fmt.Errorf("%w: max_sample_size %d exceeds the lot of %d", ErrDomain, b.T, mx)
	}
	return b.evaluate(m), nil
}

// evaluate runs the dynamic programme on validated bounds.
func (b *bounds) evaluate(m Model) Performance { return b.evaluateUntil(m, math.Inf(1)) }

// evaluateUntil is evaluate, abandoned (with a partial result whose Accept
// exceeds acceptLimit) as soon as P(accept) exceeds acceptLimit: the
// search only needs to know that.
func (b *bounds) evaluateUntil(m Model, acceptLimit float64) Performance {
	width := b.maxReject() + 2
	cur := make([]float64, width)
	next := make([]float64, width)
	cur[0] = 1
	lo, hi := 0, 0 // the band of e still running at time t
	var perf Performance
	binom, isBinom := m.(Binomial)
	for t := 0; t < b.T && lo <= hi; t++ {
		// one pass: the running mass, and the transition into next
		// (next[lo..hi+1] is rebuilt from scratch)
		run := 0.0
		carry := 0.0 // mass moving from e−1 to e
		if isBinom {
			q := binom.P
			for e := lo; e <= hi; e++ {
				v := cur[e]
				run += v
				next[e] = v*(1-q) + carry
				carry = v * q
			}
		} else {
			for e := lo; e <= hi; e++ {
				q := m.NextError(t, e)
				v := cur[e]
				run += v
				next[e] = v*(1-q) + carry
				carry = v * q
			}
		}
		next[hi+1] = carry
		perf.ASN += run
		t1 := t + 1
		nlo, nhi := lo, hi+1
		if a := b.acc[t1]; a >= nlo {
			for e := nlo; e <= nhi && e <= a; e++ {
				perf.Accept += next[e]
			}
			nlo = a + 1
			if perf.Accept > acceptLimit {
				return perf
			}
		}
		if r := b.rej[t1]; r <= nhi {
			for e := max(nlo, r); e <= nhi; e++ {
				perf.Reject += next[e]
			}
			nhi = r - 1
		}
		cur, next = next, cur
		lo, hi = nlo, nhi
	}
	return perf
}

// OC returns the exact probability of acceptance of rule r at each error
// rate in ps (binomial model), for plotting the operating characteristic.
func OC(r *plan.SequentialRule, ps []float64) ([]float64, error) {
	b, err := newBounds(r)
	if err != nil {
		return nil, err
	}
	out := make([]float64, len(ps))
	for i, p := range ps {
		if err := checkModel(Binomial{P: p}); err != nil {
			return nil, err
		}
		out[i] = b.evaluate(Binomial{P: p}).Accept
	}
	return out, nil
}

// PlanOC returns the exact probability that the sequential plan of f
// accepts at each error rate in errs, under the plan's own model: binomial
// for an unbounded stream, and for a finite lot of N decisions the
// hypergeometric model with D = round(e·N) errors (the model the plan's
// stated risks use, so the curve and the risks agree; give the rates as
// D/N, as plan.File.KeyPoints and OC do).
func PlanOC(f *plan.File, errs []float64) ([]float64, error) {
	if f.Sequential == nil {
		return nil, fmt.Errorf("%w: the plan has no sequential rule", ErrDomain)
	}
	N := f.Inputs.Population
	if N <= 0 {
		return OC(f.Sequential, errs)
	}
	b, err := newBounds(f.Sequential)
	if err != nil {
		return nil, err
	}
	out := make([]float64, len(errs))
	for i, e := range errs {
		if !(e >= 0 && e <= 1) {
			return nil, fmt.Errorf("%w: error rate %v is outside [0, 1]", ErrDomain, e)
		}
		m := Hypergeometric{N: N, D: int64(math.Round(e * float64(N)))}
		if err := checkModel(m); err != nil {
			return nil, err
		}
		out[i] = b.evaluate(m).Accept
	}
	return out, nil
}

package stratified

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"sort"

	"probity/plan"
)

// CountRule is the acceptance rule "at most c errors among the counted
// items" for a stratified sample with any allocation. The counted items
// of stratum h are the k_h of its n_h labeled items with the smallest
// selection keys — the first k_h of the stratum in the worksheet's key
// order, which is a uniformly random order within the stratum, so they are
// a simple random sample of k_h of its N_h decisions. k_h = n_h unless the
// design is thinned to a proportional sub-sample (see CountedForPower);
// the other labeled items still serve per-stratum rates, but not the
// verdict.
//
// Why it keeps its risk. Let the population hold d_h errors in stratum h.
// The errors X_h among the k_h counted items are hypergeometric, which is
// the law of a sum of k_h independent Bernoulli trials (its generating
// function has only real roots: Vatutin & Mikhailov, Theory Probab. Appl.
// 27, 1982). So the total S = Σ X_h is a sum of m = Σ k_h independent
// Bernoulli trials with mean μ(d) = Σ_h (k_h/N_h)·d_h, and by Hoeffding
// ("On the distribution of the number of successes in independent
// trials", Ann. Math. Statist. 27, 1956, Theorem 4)
//
//	P(S ≤ c) ≤ P(Bin(m, μ/m) ≤ c)   whenever c ≤ μ − 1.
//
// The binomial tail falls as μ grows, so over every spread of at least D*
// errors the largest bound is the one at the least favourable spread,
// μ* = min { Σ_h (k_h/N_h) d_h : Σ_h d_h = D*, 0 ≤ d_h ≤ N_h }, which puts
// the errors first where the fewest items are counted per decision
// (strata with k_h = 0 first, whole). The rule accepts when S ≤ c with
//
//	c = max { c ≤ μ* − 1 : P(Bin(m, μ*/m) ≤ c) ≤ α },   α = 1 − confidence,
//
// so for every configuration with Σ d_h ≥ D* the chance of acceptance is
// at most α (a union–intersection test, Roy 1953, over the spreads of
// errors, as in Ottoboni, Stark, Lindeman & McBurnett 2018). The rule is
// fixed before any label is seen, and it is the binomial rule of a simple
// random sample when the allocation is exactly proportional (then μ* =
// m·D*/N).
type CountRule struct {
	Design Design
	// Counted is k_h for each stratum, 0 ≤ k_h ≤ n_h.
	Counted    []int
	Ceiling    float64
	Confidence float64
	// BadLot is D* = ⌈ceiling·N⌉.
	BadLot int64
	// LeastMean is μ*, the expected number of counted errors under the
	// least favourable spread of D* errors.
	LeastMean float64
	// Spread is a least favourable spread of D* errors over the strata.
	Spread []int64
	// Accept is c, the most errors among the counted items that pass; −1
	// when no count passes (too few counted items for the ceiling).
	Accept int

	// fill is the order in which the least favourable spread fills the
	// strata: ascending k_h/N_h, ties in Design order.
	fill []int
}

// ErrRule is wrapped by errors about the inputs of a rule.
var ErrRule = errors.New("invalid stratified rule")

// NewCountRule builds the rule for the design, the counted items per
// stratum (nil means every labeled item) and the ceiling and confidence,
// both in (0, 1).
func NewCountRule(d Design, counted []int, ceiling, confidence float64) (*CountRule, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	if !(ceiling > 0 && ceiling < 1) {
		return nil, fmt.Errorf("%w: ceiling %v is not between 0 and 1", ErrRule, ceiling)
	}
	if !(confidence > 0 && confidence < 1) {
		return nil, fmt.Errorf("%w: confidence %v is not between 0 and 1", ErrRule, confidence)
	}
	if counted == nil {
		counted = make([]int, len(d.Strata))
		for h, s := range d.Strata {
			counted[h] = s.Sample
		}
	}
	if len(counted) != len(d.Strata) {
		return nil, fmt.Errorf("%w: %d counted sizes for %d strata", ErrRule, len(counted), len(d.Strata))
	}
	for h, s := range d.Strata {
		if counted[h] < 0 || counted[h] > s.Sample {
			return nil, fmt.Errorf("%w: stratum %q counts %d of its %d labeled items", ErrRule, s.Label, counted[h], s.Sample)
		}
	}
	d.Strata = append([]Stratum(nil), d.Strata...)
	r := &CountRule{
		Design:     d,
		Counted:    append([]int(nil), counted...),
		Ceiling:    ceiling,
		Confidence: confidence,
		BadLot:     d.BadLotErrors(ceiling),
	}
	r.fill = make([]int, len(d.Strata))
	for h := range r.fill {
		r.fill[h] = h
	}
	sort.SliceStable(r.fill, func(i, j int) bool {
		// k_i/N_i < k_j/N_j in exact arithmetic
		a := new(big.Int).Mul(big.NewInt(int64(r.Counted[r.fill[i]])), big.NewInt(d.Strata[r.fill[j]].Population))
		b := new(big.Int).Mul(big.NewInt(int64(r.Counted[r.fill[j]])), big.NewInt(d.Strata[r.fill[i]].Population))
		return a.Cmp(b) < 0
	})
	r.LeastMean, r.Spread = r.leastMean(r.BadLot)
	r.Accept = acceptanceNumber(r.CountedSize(), r.LeastMean, 1-confidence)
	return r, nil
}

// CountedSize is m = Σ k_h.
func (r *CountRule) CountedSize() int {
	m := 0
	for _, k := range r.Counted {
		m += k
	}
	return m
}

// fraction is k_h/N_h, the counted items per decision of stratum h.
func (r *CountRule) fraction(h int) float64 {
	return float64(r.Counted[h]) / float64(r.Design.Strata[h].Population)
}

// leastMean is min Σ_h (k_h/N_h) d_h over the spreads of total errors with
// 0 ≤ d_h ≤ N_h, and a spread attaining it. The objective is linear, so
// filling the strata in ascending order of k_h/N_h is optimal (a
// fractional knapsack whose capacities are whole numbers, so the greedy
// fill is integral). Ties are filled in Design order.
func (r *CountRule) leastMean(total int64) (float64, []int64) {
	spread := make([]int64, len(r.fill))
	return r.fillSpread(total, spread), spread
}

// fillSpread fills total errors into the strata in the order of r.fill,
// recording the spread when it is not nil, and returns its mean count.
func (r *CountRule) fillSpread(total int64, spread []int64) float64 {
	var mu float64
	rest := total
	for _, h := range r.fill {
		if rest <= 0 {
			break
		}
		d := min(rest, r.Design.Strata[h].Population)
		if spread != nil {
			spread[h] = d
		}
		mu += float64(r.Counted[h]) * float64(d) / float64(r.Design.Strata[h].Population)
		rest -= d
	}
	return mu
}

// tailBound is Hoeffding's bound on P(S ≤ s) for m counted items whose
// errors have mean μ: P(Bin(m, μ/m) ≤ s) when s ≤ μ − 1, else 1 (the
// theorem says nothing there).
func tailBound(s, m int, mu float64) float64 {
	if m == 0 || float64(s) > mu-1 {
		return 1
	}
	return plan.BinomialCDF(s, m, math.Min(mu/float64(m), 1))
}

// PValueAt is the p-value of "the population holds at least D errors"
// after s errors among the counted items: Hoeffding's bound on P(S ≤ s)
// at the least favourable spread of D errors, P(Bin(m, μ*(D)/m) ≤ s)
// when s ≤ μ*(D) − 1, and 1 where the theorem says nothing. D ≤ 0 gives 1
// and D above the population 0 (no population holds that many). Judge's
// PValue is PValueAt(S, D*); the test of D at level α rejects when
// PValueAt(S, D) ≤ α, which for every spread of at least D errors happens
// with probability at most α (see CountRule), so the rule's design serves
// any error count, not only the one of its ceiling.
func (r *CountRule) PValueAt(s int, D int64) float64 {
	if D <= 0 {
		return 1
	}
	if D > r.Design.Population() {
		return 0
	}
	return tailBound(s, r.CountedSize(), r.fillSpread(D, nil))
}

// acceptanceNumber is the largest c ≤ μ − 1 with P(Bin(m, μ/m) ≤ c) ≤ α,
// or −1.
func acceptanceNumber(m int, mu, alpha float64) int {
	if m == 0 || mu < 1 {
		return -1
	}
	lo, hi := -1, int(math.Floor(mu-1)) // tailBound(lo) ≤ α is the invariant
	hi = min(hi, m)
	if tailBound(hi, m, mu) <= alpha {
		return hi
	}
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if tailBound(mid, m, mu) <= alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// Verdict is the judgement of a stratified sample.
type Verdict struct {
	// Errors is S, the errors among the counted items.
	Errors int
	// PValue is the p-value of "the error is at or above the ceiling": the
	// largest bound on P(S ≤ observed) over the spreads of D* errors.
	PValue float64
	// UpperErrors is D_U, the most errors in the population that the
	// sample does not rule out at the confidence; Upper = D_U/N is the
	// one-sided upper confidence bound on the error rate.
	UpperErrors int64
	Upper       float64
	// Accepted is S ≤ c, equivalently PValue ≤ α and D_U < D*.
	Accepted bool
}

// Judge applies the rule to the errors found among the counted items of
// each stratum (in Design order).
func (r *CountRule) Judge(errs []int) (Verdict, error) {
	if len(errs) != len(r.Design.Strata) {
		return Verdict{}, fmt.Errorf("%w: %d error counts for %d strata", ErrDesign, len(errs), len(r.Design.Strata))
	}
	s := 0
	for h, x := range errs {
		if x < 0 || x > r.Counted[h] {
			return Verdict{}, fmt.Errorf("%w: stratum %q has %d errors among %d counted items", ErrDesign, r.Design.Strata[h].Label, x, r.Counted[h])
		}
		s += x
	}
	m := r.CountedSize()
	alpha := 1 - r.Confidence
	v := Verdict{Errors: s, PValue: tailBound(s, m, r.LeastMean), Accepted: s <= r.Accept}
	// p(D) = tailBound(s, m, μ*(D)) does not increase with D; D_U is the
	// largest D with p(D) > α.
	N := r.Design.Population()
	pAt := func(D int64) float64 { return tailBound(s, m, r.fillSpread(D, nil)) }
	if pAt(N) > alpha {
		v.UpperErrors = N
	} else {
		lo, hi := int64(0), N // p(lo) > α ≥ p(hi); p(0) = 1
		for hi-lo > 1 {
			mid := lo + (hi-lo)/2
			if pAt(mid) > alpha {
				lo = mid
			} else {
				hi = mid
			}
		}
		v.UpperErrors = lo
	}
	v.Upper = float64(v.UpperErrors) / float64(N)
	return v, nil
}

// ConsumerRiskBound is Hoeffding's bound on the chance that the rule
// accepts when the population holds D* or more errors, however spread:
// P(Bin(m, μ*/m) ≤ c), at most 1 − Confidence; 0 when no count passes.
func (r *CountRule) ConsumerRiskBound() float64 {
	if r.Accept < 0 {
		return 0
	}
	return tailBound(r.Accept, r.CountedSize(), r.LeastMean)
}

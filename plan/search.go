package plan

import "sort"

// MaxSampleSize is the largest sample any plan may ask for (10^8 labels);
// a requirement that needs more is refused with the input to relax.
const MaxSampleSize = 100_000_000

// family is a family of acceptance rules "label n, accept when errors ≤ c"
// indexed by c, as one decision rule (exact, Hoeffding, …) generates them.
type family struct {
	// keeps reports whether accepting at ≤ c errors in n labels keeps the
	// consumer's guarantee. For fixed c it must be monotone in n: false
	// below some n_c and true from n_c on.
	keeps func(c, n int) bool
	// producerRisk is P(reject | error = p0) = P(X > c) for the rule (c, n);
	// for fixed c it grows with n. Nil when there is no p0.
	producerRisk func(c, n int) float64
	// beta is the allowed producer's risk.
	beta float64
	// limit is the largest n allowed (MaxSampleSize, or the lot size).
	limit int
}

// smallestN returns n_c, the smallest n ≤ limit for which accepting at ≤ c
// errors keeps the guarantee, by exponential search upward from c+1 and then
// bisection. ok is false when no n ≤ limit does.
func (f family) smallestN(c int) (n int, ok bool) {
	lo := c + 1 // n > c: with n ≤ c every count is accepted
	if lo > f.limit {
		return 0, false
	}
	if f.keeps(c, lo) {
		return lo, true
	}
	// invariant: keeps(c, lo) is false; find hi with keeps(c, hi) true.
	step := max(lo, 16)
	hi := lo
	for {
		hi = lo + step
		if hi >= f.limit {
			hi = f.limit
			if !f.keeps(c, hi) {
				return 0, false
			}
			break
		}
		if f.keeps(c, hi) {
			break
		}
		lo = hi
		step *= 2
	}
	// keeps(c, lo) false, keeps(c, hi) true.
	n = lo + sort.Search(hi-lo, func(i int) bool { return f.keeps(c, lo+1+i) }) + 1
	return n, true
}

// searchResult is the outcome of a family search.
type searchResult struct {
	n, c int
	// tooLarge is set when no plan within the limit exists; consumerOnly
	// tells whether even the zero-failure plan is out of reach (so the
	// ceiling, confidence or candidates must be relaxed) rather than the
	// producer's requirement.
	tooLarge, consumerOnly bool
}

// search returns the smallest n, with its c, over all rules of the family
// that keep the consumer's guarantee and, with a p0, the producer's risk.
//
// For fixed c the feasible n form an interval [n_c, m_c] (keeps is monotone
// in n, the producer's risk grows with n), and n_c grows with c, so the
// smallest feasible n is n_c for the smallest c whose n_c also meets the
// producer's risk. That c is found by exponential search and bisection over
// c — the producer's risk at n_c falls as c grows — followed by a check of
// the few c just below the answer, which catches the small saw-tooth
// non-monotonicity that integer n_c can cause.
func (f family) search() searchResult {
	n0, ok := f.smallestN(0)
	if !ok {
		return searchResult{tooLarge: true, consumerOnly: true}
	}
	if f.producerRisk == nil {
		return searchResult{n: n0, c: 0}
	}
	feasible := func(c int) (int, bool, bool) { // n_c, meets producer, n_c exists
		n, ok := f.smallestN(c)
		if !ok {
			return 0, false, false
		}
		return n, f.producerRisk(c, n) <= f.beta, true
	}
	if f.producerRisk(0, n0) <= f.beta {
		return searchResult{n: n0, c: 0}
	}
	// exponential search: bad < good, feasible(good).
	bad, good := 0, 1
	for {
		_, meets, exists := feasible(good)
		if !exists {
			// n_c exceeds the limit from some c in (bad, good] on: find the
			// largest c whose n_c exists; if even it misses the producer's
			// risk, no c does.
			last := bad + sort.Search(good-bad, func(i int) bool {
				_, ok := f.smallestN(bad + 1 + i)
				return !ok
			})
			if last == bad {
				return searchResult{tooLarge: true}
			}
			if _, meets, _ := feasible(last); !meets {
				return searchResult{tooLarge: true}
			}
			good = last
			break
		}
		if meets {
			break
		}
		bad = good
		good *= 2
	}
	for good-bad > 1 {
		mid := bad + (good-bad)/2
		if _, meets, exists := feasible(mid); exists && meets {
			good = mid
		} else {
			bad = mid
		}
	}
	// saw-tooth guard: look a few c below for an earlier feasible one.
	const guard = 8
	best := good
	for c := good - 1; c >= 0 && c >= best-guard; c-- {
		if _, meets, exists := feasible(c); exists && meets {
			best = c
		}
	}
	n, _ := f.smallestN(best)
	return searchResult{n: n, c: best}
}

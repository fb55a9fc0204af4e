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
// in n, the producer's risk grows with n), and n_c does not decrease as c
// grows, so the smallest feasible n is n_c for the smallest c whose n_c
// also meets the producer's risk. Feasibility is not monotone in c (integer
// n_c make the producer's risk at n_c a saw-tooth, with dips that matter for
// large ceilings), so every c is accounted for: an exponential search and
// bisection find some feasible c, then firstFeasible walks c upward from 0,
// skipping only blocks of c it proves infeasible.
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
			// risk, look below it.
			last := bad + sort.Search(good-bad, func(i int) bool {
				_, ok := f.smallestN(bad + 1 + i)
				return !ok
			})
			if last == bad {
				return f.firstFeasible(bad + 1)
			}
			if _, meets, _ := feasible(last); !meets {
				return f.firstFeasible(last + 1)
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
	return f.firstFeasible(good)
}

// firstFeasible returns the rule of the smallest c < upto whose n_c meets
// the producer's risk, else that of upto itself (which the caller found
// feasible), or tooLarge when upto is not feasible either.
//
// It walks c upward from 0. At an infeasible c with smallest size n_c, the
// producer's risk P(X > c' | n, p0) falls as c' grows and rises with n, and
// n_{c'} ≥ n_c for c' ≥ c, so every c' ≥ c with P(X > c' | n_c, p0) > β
// is infeasible too: the walk jumps past the largest such c' (found by
// bisection). Far below the answer the jumps are long; near it they shrink
// to single steps, where the saw-tooth lives, so no c is left unexamined.
func (f family) firstFeasible(upto int) searchResult {
	for c := 0; c < upto; {
		n, ok := f.smallestN(c)
		if !ok {
			break
		}
		if f.producerRisk(c, n) <= f.beta {
			return searchResult{n: n, c: c}
		}
		// largest c' in [c, upto) with producerRisk(c', n) > β
		lo, hi := c, upto // risk(lo) > β; hi is beyond the block
		for step := 1; lo+step < hi; step *= 2 {
			if f.producerRisk(lo+step, n) > f.beta {
				lo = lo + step
			} else {
				hi = lo + step
				break
			}
		}
		for hi-lo > 1 {
			mid := lo + (hi-lo)/2
			if f.producerRisk(mid, n) > f.beta {
				lo = mid
			} else {
				hi = mid
			}
		}
		c = lo + 1
	}
	n, ok := f.smallestN(upto)
	if !ok || f.producerRisk(upto, n) > f.beta {
		return searchResult{tooLarge: true}
	}
	return searchResult{n: n, c: upto}
}

package stratified

import (
	"math"
)

// cost is the evidence one stratum holds against the hypothesis that it
// contains d errors, for bottom ≤ d ≤ top (bounds); outside that range the
// count is impossible given what was observed. Every cost used here is
// convex in d on its range: its increments at(d) − at(d−1) never decrease.
// That is what makes the worst spread of errors across strata an exact
// greedy choice (see minTotal).
type cost interface {
	bounds() (bottom, top int64)
	at(d int64) float64
}

// memo remembers the values of an expensive cost: the search evaluates
// the same counts again as its brackets narrow.
type memo struct {
	c    cost
	seen map[int64]float64
}

func memoize(c cost) *memo { return &memo{c: c, seen: make(map[int64]float64)} }

func (m *memo) bounds() (int64, int64) { return m.c.bounds() }

func (m *memo) at(d int64) float64 {
	if v, ok := m.seen[d]; ok {
		return v
	}
	v := m.c.at(d)
	m.seen[d] = v
	return v
}

// stratumState is one stratum's cost and the bracket [lo, hi] of its
// allocation during the search over the multiplier.
type stratumState struct {
	c     cost
	floor int64 // the largest minimiser of the cost
	lo    int64 // allocation at the lower multiplier
	hi    int64 // allocation at the upper multiplier

	bottom, top int64
}

func (s *stratumState) at(d int64) float64 { return s.c.at(d) }

// inc is the increment at(d) − at(d−1) for d ≥ 1. An increment from +∞ is
// +∞ (an impossible count stays impossible).
func (s *stratumState) inc(d int64) float64 {
	a, b := s.at(d), s.at(d-1)
	if math.IsInf(a, 1) {
		return math.Inf(1)
	}
	return a - b
}

// count is the largest d in [from, to] with d = from or inc(d) ≤ λ (the
// increments are nondecreasing, so this is a binary search).
func (s *stratumState) count(lambda float64, from, to int64) int64 {
	for from < to {
		mid := from + (to-from+1)/2
		if s.inc(mid) <= lambda {
			from = mid
		} else {
			to = mid - 1
		}
	}
	return from
}

// spreadSolver finds the spread of errors over strata that makes the
// summed cost smallest — the least favourable configuration of a
// union–intersection test.
type spreadSolver struct {
	st   []stratumState
	base float64 // Σ at(floor)
	low  int64   // Σ floor
	room int64   // Σ top
}

func newSpreadSolver(costs []cost) *spreadSolver {
	sv := &spreadSolver{st: make([]stratumState, len(costs))}
	for h, c := range costs {
		s := &sv.st[h]
		s.c = c
		b, t := c.bounds()
		s.bottom, s.top = b, t
		s.floor = s.count(0, b, t)
		sv.base += s.at(s.floor)
		sv.low += s.floor
		sv.room += t
	}
	return sv
}

// total is Σ at(count(λ)) and Σ count(λ) at the multiplier λ, narrowing
// each stratum's bracket with the answer's side.
func (sv *spreadSolver) eval(lambda float64) (sum float64, n int64) {
	for h := range sv.st {
		s := &sv.st[h]
		d := s.count(lambda, s.lo, s.hi)
		sum += s.at(d)
		n += d
	}
	return sum, n
}

func (sv *spreadSolver) reset() {
	for h := range sv.st {
		s := &sv.st[h]
		s.lo, s.hi = s.floor, s.top
	}
}

// narrow records that λ is a new lower (below = true) or upper bracket.
func (sv *spreadSolver) narrow(lambda float64, below bool) {
	for h := range sv.st {
		s := &sv.st[h]
		d := s.count(lambda, s.lo, s.hi)
		if below {
			s.lo = d
		} else {
			s.hi = d
		}
	}
}

// bisect finds adjacent float64 values lo < hi ≥ 0 with pred(lo) true and
// pred(hi) false, for a predicate that is true at 0, false at +∞ and
// monotone. Positive float64 values order like their bit patterns, so at
// most 64 halvings are needed. The solver's brackets follow.
func (sv *spreadSolver) bisect(pred func(float64) bool) (lo, hi float64) {
	sv.reset()
	lb, hb := uint64(0), math.Float64bits(math.Inf(1))
	sv.narrow(0, true)
	for hb-lb > 1 {
		mb := lb + (hb-lb)/2
		m := math.Float64frombits(mb)
		if pred(m) {
			lb = mb
			sv.narrow(m, true)
		} else {
			hb = mb
			sv.narrow(m, false)
		}
	}
	return math.Float64frombits(lb), math.Float64frombits(hb)
}

// minTotal is the smallest Σ_h cost_h(d_h) over the spreads d with
// Σ d_h ≥ total and 0 ≤ d_h ≤ top_h, with a spread that attains it. It is
// +∞ (and spread nil) when the strata cannot hold total errors or every
// spread is impossible.
//
// Exactness: for convex costs the optimum takes, beyond each stratum's
// minimiser, the smallest increments across all strata (a separable convex
// resource allocation; the greedy choice is optimal because each stratum's
// increments are nondecreasing — Gross 1956, Fox 1966, "Discrete
// optimization via marginal analysis"). The multiplier λ below which too
// few increments are taken is found by bisection on the float64 bit
// pattern; the increments at or below it are taken at once and the few
// remaining units one at a time, cheapest first.
func (sv *spreadSolver) minTotal(total int64) (float64, []int64) {
	if total > sv.room {
		return math.Inf(1), nil
	}
	if total <= sv.low {
		sp := make([]int64, len(sv.st))
		for h := range sv.st {
			sp[h] = sv.st[h].floor
		}
		return sv.base, sp
	}
	lo, _ := sv.bisect(func(l float64) bool {
		_, n := sv.eval(l)
		return n < total
	})
	sp := make([]int64, len(sv.st))
	var n int64
	for h := range sv.st {
		s := &sv.st[h]
		sp[h] = s.count(lo, s.lo, s.hi)
		n += sp[h]
	}
	// The remaining units (increments just above lo) one at a time, the
	// cheapest first; this also absorbs increments that rounding left a
	// hair out of order.
	nx := newNextIncrements(sv, sp)
	for ; n < total; n++ {
		h, inc := nx.pop()
		if math.IsInf(inc, 1) {
			return math.Inf(1), nil
		}
		sp[h]++
		nx.push(h)
	}
	var sum float64
	for h := range sv.st {
		sum += sv.st[h].at(sp[h])
	}
	return sum, sp
}

// maxTotalBelow is the largest total D such that minTotal(D) < t, or −1
// when even the cheapest spread costs t or more.
func (sv *spreadSolver) maxTotalBelow(t float64) int64 {
	if !(sv.base < t) {
		return -1
	}
	lo, _ := sv.bisect(func(l float64) bool {
		sum, _ := sv.eval(l)
		return sum < t
	})
	sp := make([]int64, len(sv.st))
	var sum float64
	var n int64
	for h := range sv.st {
		s := &sv.st[h]
		sp[h] = s.count(lo, s.lo, s.hi)
		sum += s.at(sp[h])
		n += sp[h]
	}
	// Further units, the cheapest first, while the sum stays below t.
	nx := newNextIncrements(sv, sp)
	for nx.Len() > 0 {
		h, inc := nx.pop()
		if !(sum+inc < t) {
			break
		}
		sum += inc
		sp[h]++
		n++
		nx.push(h)
	}
	return n
}

// nextIncrements is a min-heap of each stratum's next increment
// at(d+1) − at(d) beyond its current allocation.
type nextIncrements struct {
	sv   *spreadSolver
	sp   []int64
	heap []int // stratum indices
	inc  []float64
}

func newNextIncrements(sv *spreadSolver, sp []int64) *nextIncrements {
	nx := &nextIncrements{sv: sv, sp: sp, inc: make([]float64, len(sp))}
	for h := range sp {
		nx.push(h)
	}
	return nx
}

func (nx *nextIncrements) Len() int { return len(nx.heap) }

// push queues stratum h's next increment, if it has room left.
func (nx *nextIncrements) push(h int) {
	s := &nx.sv.st[h]
	if nx.sp[h] >= s.top {
		return
	}
	nx.inc[h] = s.inc(nx.sp[h] + 1)
	nx.heap = append(nx.heap, h)
	for i := len(nx.heap) - 1; i > 0; {
		p := (i - 1) / 2
		if !nx.less(i, p) {
			break
		}
		nx.heap[i], nx.heap[p] = nx.heap[p], nx.heap[i]
		i = p
	}
}

func (nx *nextIncrements) less(i, j int) bool {
	a, b := nx.heap[i], nx.heap[j]
	return nx.inc[a] < nx.inc[b] || nx.inc[a] == nx.inc[b] && a < b
}

// pop removes the stratum with the smallest next increment; with nothing
// left it returns (−1, +∞).
func (nx *nextIncrements) pop() (int, float64) {
	if len(nx.heap) == 0 {
		return -1, math.Inf(1)
	}
	h := nx.heap[0]
	last := len(nx.heap) - 1
	nx.heap[0] = nx.heap[last]
	nx.heap = nx.heap[:last]
	for i := 0; ; {
		l, r, m := 2*i+1, 2*i+2, i
		if l < len(nx.heap) && nx.less(l, m) {
			m = l
		}
		if r < len(nx.heap) && nx.less(r, m) {
			m = r
		}
		if m == i {
			break
		}
		nx.heap[i], nx.heap[m] = nx.heap[m], nx.heap[i]
		i = m
	}
	return h, nx.inc[h]
}

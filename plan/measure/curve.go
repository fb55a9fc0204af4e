package measure

// curve is the power of one side's test as its counted sub-sample grows:
// the test of "the side's strata hold at least D events" at level α, with
// the counted items ProportionalCounts(strata, m) for m = 0, 1, 2, …, and
// its exact chance of passing when the strata hold the anticipated
// events. Only records are kept: the m at which the power exceeds that of
// every smaller m. A design that labels at least the counted items of m
// can count exactly those, so its power is at least the best record up to
// m; and no m between records does better than the record before it: a
// larger sub-sample's count is stochastically larger, so with an
// acceptance number no higher than an earlier one it passes no more often.
// That is what makes the searches built on curves exact although power is
// a saw-tooth in m.
type curve struct {
	scan *sideScan
	// tests are the counts D the side must reject at their levels: the
	// acceptance number is the largest count that passes all of them
	// (one test for a side's own test; several for a ratio's denominator
	// side, whose levels come from the numerator's tails).
	tests []test
	// each test's own acceptance number at the last m it was computed
	// (and −2 before): for a side of one stratum a lower bound on it at
	// every later m, which spares most tests most evaluations
	own []int

	bestC int   // the highest acceptance number seen
	hint  int   // the last acceptance number (a guess for the next m)
	recs  []rec // increasing m and power
}

// test is one count D a side's test rejects at level alpha.
type test struct {
	D     int64
	alpha float64
}

// rec is one record of a curve: at m counted items the acceptance number
// is c and the power is power.
type rec struct {
	m, c  int
	power float64
}

// sideScan walks the sub-sample sizes m of one side for every curve of
// that side: the tests of several counts D (a ratio's floors) share each
// m's tally and the law of its count. A side of one stratum, whose tally
// is cheap, gets a scan per curve, so that each curve goes only as far as
// it is asked to.
type sideScan struct {
	p       Population
	sd      side
	events  []int64 // anticipated events per member stratum
	total   int64   // N_G
	sum     int64   // Σ events
	scanned int     // every curve's records are complete for m ≤ scanned
	curves  []*curve
	k       []int // scratch: counted items per stratum
}

func newSideScan(p Population, sd side, events []int64) *sideScan {
	s := &sideScan{p: p, sd: sd, events: events, total: sd.population(p), scanned: -1, k: make([]int, len(p.Strata))}
	for _, e := range events {
		s.sum += e
	}
	return s
}

// curve adds the curve of the tests. Curves are added before the scan
// starts.
func (s *sideScan) curve(tests ...test) *curve {
	if s.scanned >= 0 {
		panic("measure: curve added to a side already scanned")
	}
	cv := &curve{scan: s, tests: tests, own: make([]int, len(tests)), bestC: -2, hint: -1}
	for i := range cv.own {
		cv.own[i] = -2
	}
	s.curves = append(s.curves, cv)
	return cv
}

// accept is the curve's acceptance number on tally t: the largest count
// every test passes, the least of the tests' own acceptance numbers. When
// next is set, t is the tally of the m after the one the last answer was
// found at and the side is one stratum: a count that passed a test then
// passes it now (the hypergeometric tail at a fixed count falls as the
// sample grows), so each test's last answer is a lower bound from which it
// steps up, and a test is asked again only when the others' answers pass
// its last one.
func (cv *curve) accept(t *tally, next bool) int {
	if !(next && t.rule == nil) {
		c := t.size
		for i, ts := range cv.tests {
			cv.own[i] = t.acceptAt(ts.D, ts.alpha, cv.own[i])
			c = min(c, cv.own[i])
		}
		return c
	}
	c := min(max(cv.hint, -1), t.size)
	for c < t.size {
		for i, ts := range cv.tests {
			if cv.own[i] <= c {
				cv.own[i] = t.acceptAt(ts.D, ts.alpha, max(cv.own[i], c))
				if cv.own[i] <= c {
					return c
				}
			}
		}
		c = t.size
		for _, o := range cv.own {
			c = min(c, o)
		}
	}
	return c
}

// tallyAt is the side's tally with the counted items of m.
func (s *sideScan) tallyAt(m int) *tally {
	proportional(s.p, s.sd.strata, m, s.k)
	t, err := sideTally(s.p, s.sd, s.k)
	if err != nil {
		panic(err) // m ≤ N_G keeps every k_h within its stratum
	}
	return t
}

// extend scans every curve of the side up to m = to (at most N_G).
func (s *sideScan) extend(to int) {
	to = int(min(int64(to), s.total))
	cs := make([]int, len(s.curves))
	for m := s.scanned + 1; m <= to; m++ {
		t := s.tallyAt(m)
		top := -1
		for i, cv := range s.curves {
			cs[i] = cv.accept(t, m > 0 && m == cv.scanned()+1)
			cv.hint = cs[i]
			if cs[i] > cv.bestC && !cv.done() {
				top = max(top, cs[i])
			}
		}
		if top >= 0 {
			cdf := t.cdfs(s.events, top)
			for i, cv := range s.curves {
				if cs[i] <= cv.bestC || cv.done() {
					continue
				}
				cv.bestC = cs[i]
				if pw := cdf(cs[i]); len(cv.recs) == 0 || pw > cv.recs[len(cv.recs)-1].power {
					cv.recs = append(cv.recs, rec{m: m, c: cs[i], power: pw})
				}
			}
		} else {
			for i, cv := range s.curves {
				if cs[i] > cv.bestC && !cv.done() { // c = −1 at m = 0: power 0
					cv.bestC = cs[i]
					if len(cv.recs) == 0 {
						cv.recs = append(cv.recs, rec{m: m, c: cs[i]})
					}
				}
			}
		}
		s.scanned = m
		if s.allDone() {
			s.scanned = int(s.total)
			return
		}
	}
}

// saturated is the power at which a curve stops: within 1e-12 of 1, where
// a later record could change a product of powers only in digits no risk
// is stated to.
const saturated = 1 - 1e-12

// done reports that the curve has reached saturated power: no later record
// matters.
func (cv *curve) done() bool {
	return len(cv.recs) > 0 && cv.recs[len(cv.recs)-1].power >= saturated
}

func (s *sideScan) allDone() bool {
	for _, cv := range s.curves {
		if !cv.done() {
			return false
		}
	}
	return true
}

// scanned is how far the curve's records are complete.
func (cv *curve) scanned() int {
	if cv.done() {
		return int(cv.scan.total)
	}
	return cv.scan.scanned
}

// extend scans the curve (and its side's other curves) up to m = to.
func (cv *curve) extend(to int) {
	if to > cv.scanned() {
		cv.scan.extend(to)
	}
}

// best is the best record with m ≤ upTo (power 0 at m = 0 when there is
// none).
func (cv *curve) best(upTo int) rec {
	cv.extend(upTo)
	out := rec{c: -1}
	for _, r := range cv.recs {
		if r.m > upTo {
			break
		}
		out = r
	}
	return out
}

// hopeless reports that no sub-sample can pass with power target: the
// anticipated events are at least some test's D, so that test's own
// guarantee caps the power at its level.
func (cv *curve) hopeless(target float64) bool {
	for _, ts := range cv.tests {
		if cv.scan.sum >= ts.D && ts.alpha < target {
			return true
		}
	}
	return false
}

// first is the first record with power ≥ target and m ≤ limit; ok is false
// when there is none. Before scanning it probes m = 2^i·64 for a sub-sample
// that reaches the target, so that the scan stops early when the answer is
// small (the scan itself is exact: it visits every m up to the answer).
func (cv *curve) first(target float64, limit int) (rec, bool) {
	limit = int(min(int64(limit), cv.scan.total))
	if target > 1 {
		return rec{}, false
	}
	find := func() (rec, bool) {
		for _, r := range cv.recs {
			if r.m > limit {
				break
			}
			if r.power >= target {
				return r, true
			}
		}
		return rec{}, false
	}
	if r, ok := find(); ok {
		return r, true
	}
	if cv.hopeless(target) {
		return rec{}, false
	}
	to := limit
	for probe := 64; probe < limit; probe *= 2 {
		if probe <= cv.scanned() {
			continue
		}
		if cv.probe(probe) >= target {
			to = probe
			break
		}
	}
	cv.extend(to)
	if r, ok := find(); ok {
		return r, true
	}
	cv.extend(limit)
	return find()
}

// probe is the power at m alone, whatever the records say. It leaves the
// tests' own acceptance numbers as they were: for a side of one stratum
// they are lower bounds at the next m the scan visits, which an answer at
// a larger m is not (accept would then carry it back, overstating the
// acceptance number and the power of the records scanned after a probe).
func (cv *curve) probe(m int) float64 {
	own := append([]int(nil), cv.own...)
	t := cv.scan.tallyAt(m)
	c := cv.accept(t, false)
	copy(cv.own, own)
	return t.cdfs(cv.scan.events, c)(c)
}

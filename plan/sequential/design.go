package sequential

import (
	"errors"
	"fmt"
	"math"

	"probity/plan"
)

// MaxFixedSampleSize is the largest fixed plan a sequential plan is
// searched for: the search runs a few hundred dynamic programmes of up to
// 2n steps each, about a second of CPU per 30 000 labels of n.
const MaxFixedSampleSize = 100_000

// ErrTooLarge is returned for a plan whose fixed sample size exceeds
// MaxFixedSampleSize.
var ErrTooLarge = errors.New("plan too large for a sequential search")

// Spec are the requirements a sequential plan is designed for.
type Spec struct {
	// Ceiling is the error rate that must not be accepted (p1) and
	// Anticipated the error a good model is expected to have (p0),
	// 0 < p0 < p1 < 1.
	Ceiling     float64
	Anticipated float64
	// ConsumerRisk is the bound on P(accept | ceiling), the per-candidate
	// risk δ/M'; ProducerRisk the bound on P(reject | anticipated).
	ConsumerRisk float64
	ProducerRisk float64
	// FixedSampleSize is the n of the fixed (n, c) plan for the same risks;
	// the truncation point is searched from n up to MaxSampleSize.
	FixedSampleSize int
	// MaxSampleSize caps the truncation point; 0 means 2·n.
	MaxSampleSize int
	// Population is N for a finite lot (hypergeometric), 0 for a stream.
	// BadLotErrors (D1) and GoodLotErrors (D0) are then the errors of a
	// lot at the ceiling and at the anticipated error.
	Population    int64
	BadLotErrors  int64
	GoodLotErrors int64
}

// Design is a searched sequential plan with its exact risks.
type Design struct {
	Rule *plan.SequentialRule
	// ConsumerRisk is the exact P(accept | ceiling) and ProducerRisk the
	// exact P(reject | anticipated), both by Evaluate.
	ConsumerRisk float64
	ProducerRisk float64
	// ASNAtAnticipated and ASNAtCeiling are the exact average sample
	// numbers (also stored in Rule).
	ASNAtAnticipated float64
	ASNAtCeiling     float64
	// Lines are Wald's SPRT lines for the same risks; the plan uses their
	// slope with searched intercepts.
	Lines Lines
	// AcceptIntercept and RejectIntercept are the searched intercepts:
	// a_t = min(⌊s·t − AcceptIntercept⌋, c), r_t = min(⌈s·t +
	// RejectIntercept⌉, c + 1) (RejectIntercept = +Inf: reject only by
	// curtailment at c + 1); FinalAcceptance is c = a_T.
	AcceptIntercept float64
	RejectIntercept float64
	FinalAcceptance int
	// Evaluations counts the dynamic programmes the search ran.
	Evaluations int
}

// models returns the error laws at the anticipated error and at the
// ceiling.
func (s Spec) models() (good, bad Model) {
	if s.Population > 0 {
		return Hypergeometric{N: s.Population, D: s.GoodLotErrors}, Hypergeometric{N: s.Population, D: s.BadLotErrors}
	}
	return Binomial{P: s.Anticipated}, Binomial{P: s.Ceiling}
}

func (s Spec) validate() error {
	if !(s.Ceiling > 0 && s.Ceiling < 1) {
		return fmt.Errorf("%w: ceiling %v is outside (0, 1)", ErrDomain, s.Ceiling)
	}
	if !(s.Anticipated > 0 && s.Anticipated < s.Ceiling) {
		return fmt.Errorf("%w: anticipated error %v must lie in (0, ceiling %v)", ErrDomain, s.Anticipated, s.Ceiling)
	}
	if !(s.ConsumerRisk > 0 && s.ConsumerRisk < 1) || !(s.ProducerRisk > 0 && s.ProducerRisk < 1) || s.ConsumerRisk+s.ProducerRisk >= 1 {
		return fmt.Errorf("%w: risks %v and %v must lie in (0, 1) and sum below 1", ErrDomain, s.ConsumerRisk, s.ProducerRisk)
	}
	if s.FixedSampleSize < 1 {
		return fmt.Errorf("%w: fixed sample size %d is below 1", ErrDomain, s.FixedSampleSize)
	}
	if s.FixedSampleSize > MaxFixedSampleSize {
		return fmt.Errorf("%w: the fixed plan needs %d labels; sequential plans are searched for fixed plans of at most %d", ErrTooLarge, s.FixedSampleSize, MaxFixedSampleSize)
	}
	if s.MaxSampleSize != 0 && s.MaxSampleSize < s.FixedSampleSize {
		return fmt.Errorf("%w: max sample size %d is below the fixed plan's %d", ErrDomain, s.MaxSampleSize, s.FixedSampleSize)
	}
	if s.Population > 0 {
		if int64(s.FixedSampleSize) > s.Population {
			return fmt.Errorf("%w: fixed sample size %d exceeds the lot of %d", ErrDomain, s.FixedSampleSize, s.Population)
		}
		if !(s.GoodLotErrors >= 0 && s.GoodLotErrors < s.BadLotErrors && s.BadLotErrors <= s.Population) {
			return fmt.Errorf("%w: lot errors D0 = %d and D1 = %d need 0 ≤ D0 < D1 ≤ N = %d", ErrDomain, s.GoodLotErrors, s.BadLotErrors, s.Population)
		}
	}
	return nil
}

// lineBounds builds the rule a_t = min(⌊s·t − ha⌋, c),
// r_t = min(⌈s·t + hr⌉, c + 1) for t < T, a_T = c, r_T = c + 1, with
// a_t = −1 where negative and r_t unset where above t. Products are
// rounded explicitly so the boundaries do not depend on fused
// multiply-add.
func lineBounds(T, c int, slope, ha, hr float64) *bounds {
	return lineBoundsInto(&bounds{}, T, c, slope, ha, hr)
}

// lineBoundsInto is lineBounds writing into b, reusing its arrays.
func lineBoundsInto(b *bounds, T, c int, slope, ha, hr float64) *bounds {
	if cap(b.acc) < T+1 {
		b.acc, b.rej = make([]int, T+1), make([]int, T+1)
	}
	b.T, b.acc, b.rej = T, b.acc[:T+1], b.rej[:T+1]
	b.rmax = c + 1
	b.acc[0], b.rej[0] = -1, never
	finite := !math.IsInf(hr, 1)
	for t := 1; t < T; t++ {
		st := float64(slope * float64(t))
		a := c
		if x := math.Floor(st - ha); x < float64(c) {
			a = int(x)
		}
		if a < -1 {
			a = -1
		}
		if a > t {
			a = t
		}
		r := c + 1
		if finite {
			if x := math.Ceil(st + hr); x < float64(c+1) {
				r = int(x)
			}
		}
		if r <= a {
			r = a + 1
		}
		if r < 1 {
			r = 1
		}
		if r > t {
			r = never
		}
		b.acc[t], b.rej[t] = a, r
	}
	b.acc[T], b.rej[T] = c, c+1
	return b
}

// Search finds a truncated sequential plan for spec so that the exact
// consumer's risk ≤ spec.ConsumerRisk and the exact producer's risk ≤
// spec.ProducerRisk, minimising ASN(anticipated) + ASN(ceiling). The
// boundaries follow Wald's slope s between the two error rates:
//
//	a_t = min(⌊s·t − ha⌋, c),  r_t = min(⌈s·t + hr⌉, c + 1),  a_T = c, r_T = c + 1,
//
// and the search is over the truncation point T (n·{1, 1.5, 2, 3} up to
// the cap), the reject intercept hr (multiples of Wald's h2), and the
// final acceptance number c (placed at a fraction θ of the gap between
// the lines at T, below the reject line). For each (T, c, hr) the accept
// intercept ha is the smallest that keeps the consumer's risk, found by
// bisection (that risk falls as ha grows; the producer's risk and both
// ASNs rise with it, so the smallest is best). A coarse pass over the
// grid is followed by a finer one around the best (hr, c) at its T.
// Every candidate is evaluated exactly by the dynamic programme; Wald's
// constants are only the starting point.
func Search(spec Spec) (*Design, error) {
	if err := spec.validate(); err != nil {
		return nil, err
	}
	good, bad := spec.models()
	p0, p1 := spec.Anticipated, spec.Ceiling
	if spec.Population > 0 {
		p0 = float64(spec.GoodLotErrors) / float64(spec.Population)
		p1 = float64(spec.BadLotErrors) / float64(spec.Population)
		if p0 <= 0 {
			p0 = spec.Anticipated
		}
	}
	lines, err := WaldLines(p0, p1, spec.ProducerRisk, spec.ConsumerRisk)
	if err != nil {
		return nil, err
	}
	n := spec.FixedSampleSize
	cap := spec.MaxSampleSize
	if cap == 0 {
		cap = 2 * n
	}
	if spec.Population > 0 && int64(cap) > spec.Population {
		cap = int(spec.Population)
	}
	var best *Design
	bestObj := math.Inf(1)
	scratch := &bounds{}
	evals := 0
	// try evaluates one (T, c, hr): the smallest accept intercept that
	// keeps the consumer's risk, then the producer's risk and the ASNs.
	try := func(T, c int, hr float64, tol float64) (float64, bool) {
		if c < 0 || c >= T {
			return 0, false
		}
		cr := func(ha float64) float64 {
			evals++
			return lineBoundsInto(scratch, T, c, lines.Slope, ha, hr).evaluateUntil(bad, spec.ConsumerRisk).Accept
		}
		// bracket the intercept around Wald's h1, widening as needed
		lo, hi := 0.5*lines.HAccept, 1.5*lines.HAccept
		top := float64(lines.Slope*float64(T)) + 1
		for cr(hi) > spec.ConsumerRisk {
			if hi >= top {
				return 0, false
			}
			lo, hi = hi, math.Min(2*hi, top)
		}
		for lo > 0 && cr(lo) <= spec.ConsumerRisk {
			hi, lo = lo, math.Max(lo-lines.HAccept/2, 0)
		}
		if lo == 0 && cr(lo) <= spec.ConsumerRisk {
			hi = lo
		}
		for hi-lo > tol {
			mid := (lo + hi) / 2
			if cr(mid) <= spec.ConsumerRisk {
				hi = mid
			} else {
				lo = mid
			}
		}
		b := lineBoundsInto(scratch, T, c, lines.Slope, hi, hr)
		pb := b.evaluate(bad)
		pg := b.evaluate(good)
		evals += 2
		if pb.Accept > spec.ConsumerRisk || pg.Reject > spec.ProducerRisk {
			return 0, false
		}
		obj := pg.ASN + pb.ASN
		if obj < bestObj*(1-1e-12) {
			bestObj = obj
			best = &Design{
				Rule: b.rule(), ConsumerRisk: pb.Accept, ProducerRisk: pg.Reject,
				ASNAtAnticipated: pg.ASN, ASNAtCeiling: pb.ASN, Lines: lines,
				AcceptIntercept: hi, RejectIntercept: hr, FinalAcceptance: c,
			}
		}
		return obj, true
	}
	// finalC ties the last acceptance number to the reject line: c is k
	// below ⌈s·T + hr⌉ − 1, so the truncation closes the gap between the
	// lines from the rejection side.
	finalC := func(T int, hr float64, k int) int {
		return int(math.Ceil(float64(lines.Slope*float64(T))+hr)) - 1 - k
	}
	// offset of the final c below the reject line at T, as a fraction θ
	// of the gap h1 + hr between Wald's lines
	kFor := func(theta, hr float64) int { return int(math.Round(theta * (lines.HAccept + hr))) }
	obj := func(T, c int, hr, tol float64) float64 {
		if v, ok := try(T, c, hr, tol); ok {
			return v
		}
		return math.Inf(1)
	}
	// coarse pass over the truncation points, the reject intercepts and
	// the offsets θ
	bestT, bestK := 0, 0
	for _, T := range truncationGrid(n, cap) {
		before := bestObj
		for _, f := range coarseRejectGrid {
			hr := f * lines.HReject
			seen := map[int]bool{}
			for _, th := range coarseThetaGrid {
				k := kFor(th, hr)
				if seen[k] {
					continue
				}
				seen[k] = true
				obj(T, finalC(T, hr, k), hr, 0.05)
			}
		}
		if bestObj < before {
			bestT = T
			bestK = int(math.Ceil(float64(lines.Slope*float64(T))+best.RejectIntercept)) - 1 - best.FinalAcceptance
		}
	}
	// fine pass at the best truncation point, around the best intercept
	// and offset
	if best != nil {
		f0 := best.RejectIntercept / lines.HReject
		for f := f0 - 0.09; f <= f0+0.09+1e-9; f += 0.03 {
			if f <= 0 {
				continue
			}
			for k := max(bestK-2, 0); k <= bestK+2; k++ {
				obj(bestT, finalC(bestT, f*lines.HReject, k), f*lines.HReject, 0.002)
			}
		}
	}
	if best == nil {
		return nil, fmt.Errorf("%w: no sequential plan up to %d labels meets both risks", ErrDomain, cap)
	}
	best.Rule.ASNAtAnticipated = best.ASNAtAnticipated
	best.Rule.ASNAtCeiling = best.ASNAtCeiling
	best.Evaluations = evals
	return best, nil
}

// coarseThetaGrid are the offsets of the final acceptance number below
// the reject line tried in the coarse pass, as fractions of the gap
// between the lines (0: truncate at the reject line, 1: at the accept
// line).
var coarseThetaGrid = []float64{0, 0.15, 0.4, 1}

// coarseRejectGrid are the reject intercepts of the coarse pass, as
// multiples of Wald's h2.
var coarseRejectGrid = []float64{0.5, 0.7, 0.9, 1.2, 1.6}

// truncationGrid returns the truncation points tried: n·{1, 1.5, 2, 3}
// capped at cap, without repeats.
func truncationGrid(n, cap int) []int {
	var out []int
	for _, f := range []float64{1, 1.5, 2, 3} {
		T := int(math.Round(f * float64(n)))
		if T > cap {
			T = cap
		}
		if len(out) == 0 || out[len(out)-1] != T {
			out = append(out, T)
		}
	}
	return out
}

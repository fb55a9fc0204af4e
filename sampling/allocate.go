package sampling

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"probity/plan/inputerr"
	"sort"
)

// Allocation rules.
const (
	// Proportional: n_h ∝ N_h.
	Proportional = "proportional"
	// Neyman: n_h ∝ N_h·S_h with S_h = √(p_h(1−p_h)), p_h the anticipated
	// error in stratum h (Neyman 1934; Cochran, Sampling Techniques, 3rd
	// ed., §5.5).
	Neyman = "neyman"
	// Equal: the same n_h in every stratum.
	Equal = "equal"
)

// Rounding of proportional shares.
const (
	// RoundLargestRemainder gives each stratum ⌊share⌋ and the units left
	// over to the largest remainders, so Σ n_h = n exactly; a stratum whose
	// share is below one can get no item. The empty name (manifests written
	// before rounding was recorded) means this.
	RoundLargestRemainder = "largest-remainder"
	// RoundUp gives each stratum ⌈n·N_h/N⌉ (at most N_h): no stratum is
	// sampled below its proportional share and every stratum gets an item,
	// at the cost of up to one label per stratum beyond n. It is what
	// keeps the stratified count rule as powerful as the plan's rule for a
	// simple random sample: the errors cannot hide where fewer items per
	// decision were drawn (plan/stratified; proportional allocation only).
	RoundUp = "up"
)

// StratumCount is one stratum's label and population N_h (rows in scope).
type StratumCount struct {
	Label      string
	Population int64
}

// AllocOptions configures Allocate.
type AllocOptions struct {
	// Rule is Proportional (the default when empty), Neyman or Equal.
	Rule string
	// MinPerStratum k: every stratum gets at least min(k, N_h); the rest is
	// allocated by Rule among the other strata. The inclusion weights
	// N_h/n_h are then unequal.
	MinPerStratum int
	// Spare is the number of extra items per stratum, next in key order
	// (at most N_h − n_h).
	Spare int
	// Anticipated maps stratum labels to p_h in (0, 1), for Neyman:
	// S_h = √(p_h(1−p_h)), the standard deviation of an error indicator.
	Anticipated map[string]float64
	// StdDev maps stratum labels to S_h > 0 directly, for Neyman, where a
	// stratum has no entry in Anticipated.
	StdDev map[string]float64
	// Rounding is RoundUp or RoundLargestRemainder ("" is the latter);
	// RoundUp applies to proportional allocation only.
	Rounding string
	// MinIfRoom applies MinPerStratum only when the sample can give every
	// stratum its minimum (Σ min(k, N_h) ≤ n); otherwise no minimum is
	// applied (EffectiveMin says which).
	MinIfRoom bool
}

// StratumAllocation is the allocation of one stratum.
type StratumAllocation struct {
	Label      string
	Population int64   // N_h
	Sample     int     // n_h
	Spare      int     // spares
	Weight     float64 // N_h / n_h, 0 when n_h = 0
	// Anticipated is p_h under Neyman allocation (else 0).
	Anticipated float64
}

// ErrAllocation is wrapped by every error Allocate returns.
var ErrAllocation = errors.New("cannot allocate the sample")

// ErrSampleTooLarge is returned (wrapped) when the strata together hold
// fewer rows than the sample needs.
var ErrSampleTooLarge = errors.New("the sample is larger than the log")

// Allocate divides a sample of n items among strata. Under every rule a
// stratum whose share m·w_h/Σw is at least its size N_h is taken whole and
// the rest m − N_h is divided again among the others (repeated until no
// share exceeds its stratum). Shares are rounded by the largest-remainder
// (Hamilton) method: each stratum gets ⌊share⌋ and the units left over go
// to the largest fractional parts, ties broken by label in ascending byte
// order. Shares are computed in exact rational arithmetic (for Neyman, on
// the float64 weights N_h·√(p_h(1−p_h)) taken exactly).
//
// Proportional allocation with Rounding RoundUp instead gives every
// stratum n_h = min(N_h, max(⌈n·N_h/N⌉, k)) (k the minimum per stratum), so
// Σ n_h is n plus at most one item per stratum (and the minimum's).
//
// The result is sorted by label and, except under RoundUp, Σ n_h = n. It is
// an error when Σ N_h < n (ErrSampleTooLarge), when a label repeats or a
// population is below 1, or when the minimum per stratum alone exceeds n.
func Allocate(strata []StratumCount, n int, opts AllocOptions) ([]StratumAllocation, error) {
	if n < 1 {
		return nil, inputerr.Errorf("%w: sample size %d is below 1", ErrAllocation, n)
	}
	if opts.MinPerStratum < 0 {
		return nil, inputerr.Errorf("%w: the minimum per stratum cannot be negative", ErrAllocation)
	}
	if err := checkSpare(opts.Spare, n); err != nil {
		return nil, err
	}
	rule := opts.Rule
	if rule == "" {
		rule = Proportional
	}
	out := make([]StratumAllocation, len(strata))
	var total int64
	for i, s := range strata {
		if s.Population < 1 {
			return nil, inputerr.Errorf("%w: stratum %q has population %d", ErrAllocation, s.Label, s.Population)
		}
		out[i] = StratumAllocation{Label: s.Label, Population: s.Population}
		total += s.Population
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Label < out[j].Label })
	for i := 1; i < len(out); i++ {
		if out[i].Label == out[i-1].Label {
			return nil, inputerr.Errorf("%w: stratum %q is listed twice", ErrAllocation, out[i].Label)
		}
	}
	if total < int64(n) {
		return nil, inputerr.Errorf("%w: the sample needs %d items but the strata hold %d rows", ErrSampleTooLarge, n, total)
	}
	if opts.MinPerStratum > 0 {
		var need int64
		for _, a := range out {
			need += min(int64(opts.MinPerStratum), a.Population)
		}
		switch {
		case need <= int64(n):
		case opts.MinIfRoom:
			opts.MinPerStratum = 0
		default:
			return nil, inputerr.Errorf("%w: a minimum of %d per stratum over %d strata needs more than the sample's %d items", ErrAllocation, opts.MinPerStratum, len(out), n)
		}
	}
	if opts.Rounding != "" && opts.Rounding != RoundUp && opts.Rounding != RoundLargestRemainder {
		return nil, inputerr.Errorf("%w: unknown rounding %q (%s or %s)", ErrAllocation, opts.Rounding, RoundUp, RoundLargestRemainder)
	}
	if rule == Proportional && opts.Rounding == RoundUp {
		// n_h = min(N_h, max(⌈n·N_h/N⌉, k)), in exact integer arithmetic
		bn, bN := big.NewInt(int64(n)), big.NewInt(total)
		for i := range out {
			q := new(big.Int).Mul(bn, big.NewInt(out[i].Population))
			q.Add(q, new(big.Int).Sub(bN, big.NewInt(1)))
			q.Quo(q, bN)
			v := max(q.Int64(), int64(opts.MinPerStratum))
			out[i].Sample = int(min(v, out[i].Population))
		}
		finish(out, opts)
		return out, nil
	}
	weights := make([]*big.Rat, len(out))
	for i := range out {
		switch rule {
		case Proportional:
			weights[i] = new(big.Rat).SetInt64(out[i].Population)
		case Equal:
			weights[i] = big.NewRat(1, 1)
		case Neyman:
			sd, err := neymanStdDev(out[i].Label, opts)
			if err != nil {
				return nil, err
			}
			out[i].Anticipated = opts.Anticipated[out[i].Label]
			weights[i] = new(big.Rat).SetFloat64(float64(out[i].Population) * sd)
		default:
			return nil, inputerr.Errorf("%w: unknown allocation rule %q (proportional, neyman or equal)", ErrAllocation, rule)
		}
	}
	// fixed[i] >= 0 pins stratum i at that size (the minimum per stratum).
	fixed := make([]int64, len(out))
	for i := range fixed {
		fixed[i] = -1
	}
	k := int64(opts.MinPerStratum)
	for {
		m := int64(n)
		for _, f := range fixed {
			if f >= 0 {
				m -= f
			}
		}
		if m < 0 {
			return nil, inputerr.Errorf("%w: a minimum of %d per stratum over %d strata needs more than the sample's %d items", ErrAllocation, opts.MinPerStratum, len(out), n)
		}
		alloc := apportion(out, weights, fixed, m)
		changed := false
		for i := range out {
			if fixed[i] < 0 && alloc[i] < min(k, out[i].Population) {
				fixed[i] = min(k, out[i].Population)
				changed = true
			}
		}
		if !changed {
			var sum int64
			for _, a := range alloc {
				sum += a
			}
			if sum != int64(n) {
				return nil, inputerr.Errorf("%w: the minimum per stratum leaves %d of %d items without a stratum that can take them", ErrAllocation, int64(n)-sum, n)
			}
			for i := range out {
				out[i].Sample = int(alloc[i])
			}
			break
		}
	}
	finish(out, opts)
	return out, nil
}

// finish sets each stratum's spares and weight.
func finish(out []StratumAllocation, opts AllocOptions) {
	for i := range out {
		a := &out[i]
		a.Spare = int(min(int64(opts.Spare), a.Population-int64(a.Sample)))
		if a.Sample > 0 {
			a.Weight = float64(a.Population) / float64(a.Sample)
		}
	}
}

// EffectiveMin is the minimum per stratum Allocate applies under opts: k,
// or 0 when MinIfRoom is set and the strata cannot all get theirs from n.
func EffectiveMin(strata []StratumCount, n int, opts AllocOptions) int {
	if !opts.MinIfRoom || opts.MinPerStratum <= 0 {
		return opts.MinPerStratum
	}
	var need int64
	for _, s := range strata {
		need += min(int64(opts.MinPerStratum), s.Population)
	}
	if need > int64(n) {
		return 0
	}
	return opts.MinPerStratum
}

// checkSpare bounds the spares per stratum by the sample size: spares
// replace items that cannot be labeled, and every kept spare costs memory
// in each stratum while the log is read.
func checkSpare(spare, n int) error {
	switch {
	case spare < 0:
		return &inputerr.Error{Field: "spare", Msg: fmt.Sprintf("%d: cannot be negative", spare)}
	case spare > n:
		return &inputerr.Error{Field: "spare", Msg: fmt.Sprintf("%d: at most the sample size %d per stratum", spare, n),
			Hint: "spares replace the few items that cannot be labeled; a handful per stratum is usual"}
	}
	return nil
}

// apportion divides m units among the strata not fixed, in proportion to
// their weights, taking whole any stratum whose share reaches its size and
// rounding by largest remainder. Fixed strata get their fixed size.
func apportion(strata []StratumAllocation, weights []*big.Rat, fixed []int64, m int64) []int64 {
	alloc := make([]int64, len(strata))
	active := make([]int, 0, len(strata))
	for i := range strata {
		if fixed[i] >= 0 {
			alloc[i] = fixed[i]
		} else {
			active = append(active, i)
		}
	}
	for m > 0 && len(active) > 0 {
		sum := new(big.Rat)
		for _, i := range active {
			sum.Add(sum, weights[i])
		}
		if sum.Sign() == 0 {
			break
		}
		shares := make([]*big.Rat, len(strata))
		var whole []int
		for _, i := range active {
			q := new(big.Rat).Mul(new(big.Rat).SetInt64(m), weights[i])
			q.Quo(q, sum)
			shares[i] = q
			if q.Cmp(new(big.Rat).SetInt64(strata[i].Population)) >= 0 {
				whole = append(whole, i)
			}
		}
		if len(whole) > 0 {
			next := active[:0:0]
			isWhole := map[int]bool{}
			for _, i := range whole {
				isWhole[i] = true
				alloc[i] = strata[i].Population
				m -= strata[i].Population
			}
			for _, i := range active {
				if !isWhole[i] {
					next = append(next, i)
				}
			}
			active = next
			continue
		}
		rems := make([]*big.Rat, len(strata))
		left := m
		for _, i := range active {
			fl := new(big.Int).Quo(shares[i].Num(), shares[i].Denom())
			alloc[i] = fl.Int64()
			left -= alloc[i]
			rems[i] = new(big.Rat).Sub(shares[i], new(big.Rat).SetInt(fl))
		}
		order := append([]int{}, active...)
		sort.SliceStable(order, func(a, b int) bool {
			c := rems[order[a]].Cmp(rems[order[b]])
			if c != 0 {
				return c > 0
			}
			return strata[order[a]].Label < strata[order[b]].Label
		})
		for j := int64(0); j < left; j++ {
			alloc[order[j]]++
		}
		m = 0
	}
	return alloc
}

// neymanStdDev returns S_h for a stratum under Neyman allocation.
func neymanStdDev(label string, opts AllocOptions) (float64, error) {
	if p, ok := opts.Anticipated[label]; ok {
		if !(p > 0 && p < 1) {
			return 0, inputerr.Errorf("%w: anticipated error %v for stratum %q is outside (0, 1)", ErrAllocation, p, label)
		}
		return math.Sqrt(p * (1 - p)), nil
	}
	if sd, ok := opts.StdDev[label]; ok {
		if !(sd > 0) || math.IsInf(sd, 0) {
			return 0, inputerr.Errorf("%w: standard deviation %v for stratum %q is not a positive number", ErrAllocation, sd, label)
		}
		return sd, nil
	}
	return 0, inputerr.Errorf("%w: no anticipated error for stratum %q (neyman allocation needs one per stratum)", ErrAllocation, label)
}

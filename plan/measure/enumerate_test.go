package measure

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"probity/plan"
)

// outcomes calls f with every way the counted items can fall — y[h]
// positives among the first counted[h] items of stratum h — and its exact
// probability when stratum h holds pos[h] positives (independent
// hypergeometric counts).
func outcomes(p Population, pos []int64, counted []int, f func(y []int, pr float64)) {
	H := len(p.Strata)
	y := make([]int, H)
	var rec func(h int, pr float64)
	rec = func(h int, pr float64) {
		if h == H {
			f(y, pr)
			return
		}
		N, k := p.Strata[h].Population, counted[h]
		for v := int(max(0, int64(k)-(N-pos[h]))); int64(v) <= min(int64(k), pos[h]); v++ {
			q := plan.HypergeometricPMF(v, N, pos[h], k)
			if q == 0 {
				continue
			}
			y[h] = v
			rec(h+1, pr*q)
		}
	}
	rec(0, 1)
}

// sampleOf is a labeled sample with y[h] positives first among n[h] items
// (the judgement counts the first counted[h], so the others do not matter
// to the verdict).
func sampleOf(y, n []int) Sample {
	s := make(Sample, len(n))
	for h := range n {
		s[h] = make([]Label, n[h])
		for i := 0; i < y[h]; i++ {
			s[h][i].Positive = true
		}
	}
	return s
}

// compositions calls f with every count of positives per stratum.
func compositions(p Population, f func(pos []int64)) {
	pos := make([]int64, len(p.Strata))
	var rec func(h int)
	rec = func(h int) {
		if h == len(pos) {
			f(pos)
			return
		}
		for v := int64(0); v <= p.Strata[h].Population; v++ {
			pos[h] = v
			rec(h + 1)
		}
	}
	rec(0)
}

// trueValue is the measure of a claim in a population with pos positives
// per stratum (binary labels); ok is false for a ratio with nothing in its
// denominator.
func trueValue(p Population, c Claim, pos []int64) (float64, bool) {
	comp := Composition{Positives: pos}
	a, b := c.sides(p)
	var A float64
	for _, h := range a.strata {
		A += float64(a.count(p, comp, h))
	}
	if !c.Measure.Ratio() {
		return A / float64(a.population(p)), true
	}
	B := float64(b.population(p))
	for _, h := range b.strata {
		B -= float64(b.count(p, comp, h))
	}
	if A+B == 0 {
		return 0, false
	}
	return A / (A + B), true
}

// enumCase is a small population and a claim design to check.
type enumCase struct {
	name    string
	pop     Population
	claim   Claim
	counted []int
	floors  []int64
}

var enumCases = []enumCase{
	{"label column, miss rate", binary(10, 24), Claim{0, FNR, 0.3}, []int{6, 14}, []int64{3, 5, 7}},
	{"label column, miss rate, few counted", binary(10, 24), Claim{0, FNR, 0.5}, []int{3, 9}, []int64{4, 6}},
	{"label column, false-alarm rate", binary(12, 22), Claim{0, FPR, 0.35}, []int{8, 12}, []int64{8, 12, 15}},
	{"label column, false omission rate", binary(10, 24), Claim{0, FOR, 0.3}, []int{0, 16}, nil},
	{"label column, false discovery rate", binary(12, 22), Claim{0, FDR, 0.4}, []int{9, 0}, nil},
	{"label column, error", binary(10, 20), Claim{0, Error, 0.3}, []int{6, 12}, nil},
	{"four bands, miss rate, proportional", banded([]int64{12, 8, 6, 5}, 2), Claim{0, FNR, 0.5}, []int{11, 7, 5, 4}, []int64{3, 5}},
	{"four bands, miss rate, near the threshold over-sampled", banded([]int64{12, 8, 6, 5}, 2), Claim{0, FNR, 0.5}, []int{6, 8, 4, 5}, []int64{3, 5}},
	{"four bands, false-alarm rate, one band empty", banded([]int64{12, 8, 6, 5}, 2), Claim{0, FPR, 0.6}, []int{10, 0, 5, 4}, []int64{6, 12}},
	{"four bands, false-alarm rate", banded([]int64{12, 8, 6, 5}, 2), Claim{0, FPR, 0.45}, []int{11, 7, 5, 4}, []int64{8, 13}},
	{"four bands, false omission rate", banded([]int64{12, 8, 6, 5}, 2), Claim{0, FOR, 0.35}, []int{11, 7, 0, 0}, nil},
}

// TestExactRiskAtTheCeiling enumerates, for small populations, every count
// of positives per stratum whose measure is at or above the ceiling and
// every way the counted items can fall, judges each sample with
// ClaimDesign.Judge, and requires the exact chance of acceptance to be at
// most α (within 1e-12) — for ratios at several floors and denominator
// acceptance numbers from 0 to every counted item, and for counted items
// proportional, over-sampled near the threshold, or missing a band. It also requires Judge's decision to agree with
// AcceptProbability's formula on every composition (the planner's power is
// the judgement's), and that some rules accept at all (the check is not
// vacuous). go test -v prints the worst composition per row.
func TestExactRiskAtTheCeiling(t *testing.T) {
	var table strings.Builder
	fmt.Fprintf(&table, "%-54s %-6s %-4s %-5s %-8s %-22s %-10s %s\n", "case", "floor", "c_B", "α", "ceiling", "worst positives", "P(accept)", "best anywhere")
	usable := 0
	for _, ec := range enumCases {
		for _, alpha := range []float64{0.1, 0.2} {
			type variant struct {
				floor   int64
				bAccept int
			}
			variants := []variant{{0, 0}}
			if ec.floors != nil {
				variants = nil
				_, b := ec.claim.sides(ec.pop)
				kb := 0
				for _, h := range b.strata {
					kb += ec.counted[h]
				}
				for _, f := range ec.floors {
					for _, cb := range []int{0, kb / 3, 2 * kb / 3, kb} {
						variants = append(variants, variant{f, cb})
					}
				}
			}
			for _, vr := range variants {
				f := vr.floor
				cd := ClaimDesign{Claim: ec.claim, Counted: ec.counted, Floor: f, BAccept: vr.bAccept}
				r, err := cd.rule(ec.pop)
				if err != nil {
					t.Fatal(err)
				}
				// the verdict depends on the sample through the two sides'
				// counts only: judge each pair once
				judged := map[[2]int]bool{}
				worst, where, best := -1.0, []int64(nil), 0.0
				compositions(ec.pop, func(pos []int64) {
					v, ok := trueValue(ec.pop, ec.claim, pos)
					var acc float64
					outcomes(ec.pop, pos, ec.counted, func(y []int, pr float64) {
						s := sampleOf(y, ec.counted)
						_, ea := countEvents(ec.pop, s, r.a, ec.counted)
						eb := 0
						if r.tb != nil {
							_, eb = countEvents(ec.pop, s, r.b, ec.counted)
						}
						accepted, seen := judged[[2]int{ea, eb}]
						if !seen {
							vd, err := cd.Judge(ec.pop, s, alpha)
							if err != nil {
								t.Fatal(err)
							}
							if vd.Accepted != (vd.Upper < ec.claim.Ceiling) {
								t.Fatalf("%s: accepted %v but upper %v against ceiling %v", ec.name, vd.Accepted, vd.Upper, ec.claim.Ceiling)
							}
							accepted = vd.Accepted
							judged[[2]int{ea, eb}] = accepted
						}
						if accepted {
							acc += pr
						}
					})
					formula, err := cd.AcceptProbability(ec.pop, Composition{Positives: pos}, alpha)
					if err != nil {
						t.Fatal(err)
					}
					if math.Abs(formula-acc) > 1e-12 {
						t.Fatalf("%s, floor %d, positives %v: enumeration %.15g, AcceptProbability %.15g", ec.name, f, pos, acc, formula)
					}
					best = math.Max(best, acc)
					if (!ok || v >= ec.claim.Ceiling) && acc > worst {
						worst, where = acc, append([]int64(nil), pos...)
					}
				})
				if best > 0.5 {
					usable++
				}
				fmt.Fprintf(&table, "%-54s %-6d %-4d %-5.2g %-8v %-22s %-10.4g %.4g\n", ec.name, f, vr.bAccept, alpha, ec.claim.Ceiling, fmt.Sprint(where), worst, best)
				if worst > alpha+1e-12 {
					t.Errorf("%s, floor %d, c_B %d, α %v: P(accept) = %.6g at positives %v, above α", ec.name, f, vr.bAccept, alpha, worst, where)
				}
			}
		}
	}
	t.Logf("acceptance at or above the ceiling (exact enumeration):\n%s", table.String())
	if usable < 40 {
		t.Fatalf("only %d rules accept a good population with probability above 1/2; the check is nearly vacuous", usable)
	}
}

// TestExactRiskNaivePlugIn is the negative control: plugging the estimated
// denominator part B̂ (the labeled share of the other side, scaled up)
// into the ratio instead of a planned floor shown at level α — the bound
// A_U/(A_U + B̂) — exceeds α on these populations, and the same
// enumeration finds it.
func TestExactRiskNaivePlugIn(t *testing.T) {
	found := 0
	for _, ec := range enumCases {
		if !ec.claim.Measure.Ratio() {
			continue
		}
		alpha := 0.1
		cd := ClaimDesign{Claim: ec.claim, Counted: ec.counted, Floor: 1}
		r, err := cd.rule(ec.pop)
		if err != nil {
			t.Fatal(err)
		}
		Nb := r.b.population(ec.pop)
		worst := 0.0
		compositions(ec.pop, func(pos []int64) {
			if v, ok := trueValue(ec.pop, ec.claim, pos); ok && v < ec.claim.Ceiling {
				return
			}
			var acc float64
			outcomes(ec.pop, pos, ec.counted, func(y []int, pr float64) {
				s := sampleOf(y, ec.counted)
				_, ea := countEvents(ec.pop, s, r.a, ec.counted)
				cb, eb := countEvents(ec.pop, s, r.b, ec.counted)
				if cb == 0 {
					return
				}
				au := float64(r.ta.upper(ea, alpha))
				bhat := float64(Nb) * float64(cb-eb) / float64(cb)
				if au+bhat > 0 && au/(au+bhat) < ec.claim.Ceiling {
					acc += pr
				}
			})
			worst = math.Max(worst, acc)
		})
		if worst > alpha+1e-9 {
			found++
			t.Logf("%s: the plug-in accepts with probability %.4g at or above the ceiling (α = %v)", ec.name, worst, alpha)
		}
	}
	if found == 0 {
		t.Fatal("the enumeration found no failure of the plug-in rule; it cannot tell a failing rule from a valid one")
	}
}

package measure

import (
	"errors"
	"math"
	"testing"

	"probity/plan"
	"probity/plan/stratified"
)

// withPositives is a sample of n[h] items with y[h] positives first.
func withPositives(y, n []int) Sample { return sampleOf(y, n) }

// TestJudgeProportionOneStratum: a proportion over one stratum is the
// exact hypergeometric test and bound of the plan package
// (plan.HypergeometricPValueAtLeast, plan.HypergeometricUpper, themselves
// checked against scipy.stats.hypergeom); equality to the last digit.
func TestJudgeProportionOneStratum(t *testing.T) {
	p := binary(4000, 96000)
	for _, c := range []struct {
		m    Measure
		h    int
		x    int
		n    int
		ceil float64
	}{
		{FOR, 1, 3, 2000, 0.006}, {FOR, 1, 12, 2000, 0.006}, {FOR, 1, 0, 500, 0.01},
		{FDR, 0, 20, 200, 0.2}, {FDR, 0, 60, 200, 0.2},
	} {
		n := []int{0, 0}
		n[c.h] = c.n
		y := []int{0, 0}
		if c.m == FOR {
			y[c.h] = c.x // positives among the predicted negatives
		} else {
			y[c.h] = c.n - c.x // negatives among the predicted positives
		}
		cd := ClaimDesign{Claim: Claim{0, c.m, c.ceil}, Counted: n}
		for _, alpha := range []float64{0.05, 0.01} {
			v, err := cd.Judge(p, withPositives(y, n), alpha)
			if err != nil {
				t.Fatal(err)
			}
			N := p.Strata[c.h].Population
			wantP := plan.HypergeometricPValueAtLeast(c.x, c.n, N, c.ceil)
			wantU := plan.HypergeometricUpper(c.x, c.n, N, 1-alpha)
			if v.PValue != wantP || v.Upper != wantU {
				t.Errorf("%s, %d of %d, α %v: p %v upper %v; plan gives %v and %v", c.m, c.x, c.n, alpha, v.PValue, v.Upper, wantP, wantU)
			}
			if v.Accepted != (wantP <= alpha) || v.Accepted != (v.Upper < c.ceil) {
				t.Errorf("%s, %d of %d: accepted %v with p %v, upper %v", c.m, c.x, c.n, v.Accepted, wantP, v.Upper)
			}
			if v.EventsA != c.x || v.CountedA != c.n {
				t.Errorf("%s: counted %d events of %d, want %d of %d", c.m, v.EventsA, v.CountedA, c.x, c.n)
			}
		}
	}
}

// TestJudgeProportionBands: over several strata a proportion is the count
// rule of plan/stratified with the same counted items: the same p-value,
// bound and decision.
func TestJudgeProportionBands(t *testing.T) {
	p := banded([]int64{50000, 40000, 5000, 1200, 1800}, 3)
	counted := []int{900, 720, 90, 0, 0}
	y := []int{0, 1, 4, 0, 0}
	cd := ClaimDesign{Claim: Claim{0, FOR, 0.006}, Counted: counted}
	v, err := cd.Judge(p, withPositives(y, counted), 0.05)
	if err != nil {
		t.Fatal(err)
	}
	d := stratified.Design{}
	for h := 0; h < 3; h++ {
		d.Strata = append(d.Strata, stratified.Stratum{Label: p.Strata[h].Label, Population: p.Strata[h].Population, Sample: counted[h]})
	}
	r, err := stratified.NewCountRule(d, nil, 0.006, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	want, err := r.Judge(y[:3])
	if err != nil {
		t.Fatal(err)
	}
	if v.PValue != want.PValue || v.Upper != want.Upper || v.Accepted != want.Accepted {
		t.Errorf("measure: p %v upper %v accepted %v; stratified: %v %v %v", v.PValue, v.Upper, v.Accepted, want.PValue, want.Upper, want.Accepted)
	}
}

// TestJudgeRatioConsistent: for a ratio the decision, the p-value and the
// bound agree for every outcome of a realistic design (accepted exactly
// when p ≤ α and exactly when the bound is below the ceiling), the bound
// falls as the misses fall, and a denominator side above its acceptance
// number rejects with bound 1.
func TestJudgeRatioConsistent(t *testing.T) {
	p := binary(4000, 96000)
	pr := Problem{Population: p, Claims: []Claim{{0, FNR, 0.2}}, Anticipated: Composition{Positives: []int64{2700, 300}},
		Confidence: 0.95, Multiplicity: plan.Bonferroni, ProducerRisk: 0.1}
	res, err := Search(pr)
	if err != nil {
		t.Fatal(err)
	}
	cd := res.Design.Claims[0].ClaimDesign
	n := cd.Counted
	prev := -1.0
	for x := 30; x >= 0; x-- { // misses among the counted predicted negatives
		for _, fp := range []int{0, cd.BAccept, cd.BAccept + 1} {
			y := []int{n[0] - fp, x}
			v, err := cd.Judge(p, withPositives(y, n), res.Design.Level)
			if err != nil {
				t.Fatal(err)
			}
			if v.Accepted != (v.PValue <= res.Design.Level) || v.Accepted != (v.Upper < 0.2) {
				t.Errorf("x %d, fp %d: accepted %v, p %v, upper %v", x, fp, v.Accepted, v.PValue, v.Upper)
			}
			if fp > cd.BAccept && (v.Accepted || v.Upper != 1) {
				t.Errorf("x %d, fp %d above c_B %d: accepted %v, upper %v", x, fp, cd.BAccept, v.Accepted, v.Upper)
			}
			if fp == cd.BAccept {
				if prev >= 0 && v.Upper > prev {
					t.Errorf("the bound rose from %v to %v as the misses fell to %d", prev, v.Upper, x)
				}
				prev = v.Upper
			}
		}
	}
}

// TestJudgeRefusesBadInput: a sample that does not fit the claim's design
// or the population is an error, never a verdict.
func TestJudgeRefusesBadInput(t *testing.T) {
	p := binary(40, 100)
	cd := ClaimDesign{Claim: Claim{0, FNR, 0.3}, Counted: []int{10, 20}, Floor: 20, BAccept: 3}
	good := withPositives([]int{8, 1}, []int{10, 20})
	if _, err := cd.Judge(p, good, 0.05); err != nil {
		t.Fatalf("a good sample: %v", err)
	}
	flags := withPositives([]int{8, 1}, []int{10, 20})
	flags[0][0].Wrong = []bool{true, false} // two flags for one candidate
	for name, c := range map[string]struct {
		cd ClaimDesign
		s  Sample
		a  float64
	}{
		"too few labels":        {cd, withPositives([]int{8, 1}, []int{10, 19}), 0.05},
		"a stratum missing":     {cd, good[:1], 0.05},
		"level 0":               {cd, good, 0},
		"floor above N_b":       {ClaimDesign{Claim: cd.Claim, Counted: cd.Counted, Floor: 41, BAccept: 3}, good, 0.05},
		"c_B above the counted": {ClaimDesign{Claim: cd.Claim, Counted: cd.Counted, Floor: 20, BAccept: 11}, good, 0.05},
		"ceiling 1":             {ClaimDesign{Claim: Claim{0, FNR, 1}, Counted: cd.Counted, Floor: 20}, good, 0.05},
		"wrong flags":           {cd, Sample{{{Positive: true, Wrong: []bool{true, false}}}, nil}, 0.05},
	} {
		if _, err := c.cd.Judge(p, c.s, c.a); !errors.Is(err, ErrPopulation) {
			t.Errorf("%s: %v, want ErrPopulation", name, err)
		}
	}
}

// TestEstimate: the weighted confusion matrix adds up to the population
// and its prevalence is the weighted share of positives.
func TestEstimate(t *testing.T) {
	p := binary(400, 9600)
	s := withPositives([]int{30, 2}, []int{40, 200})
	cf, err := Estimate(p, s)
	if err != nil {
		t.Fatal(err)
	}
	c := cf[0]
	if total := c.TP + c.FP + c.FN + c.TN; math.Abs(total-10000) > 1e-9 {
		t.Errorf("the matrix holds %v decisions", total)
	}
	if want := (400*30.0/40 + 9600*2.0/200) / 10000; math.Abs(c.Prevalence-want) > 1e-15 || !c.Complete {
		t.Errorf("prevalence %v (complete %v), want %v", c.Prevalence, c.Complete, want)
	}
}

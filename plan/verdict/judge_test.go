package verdict

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/record"
)

func judge(t *testing.T, in Input) *Result {
	t.Helper()
	r, err := Judge(in)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestVerdictAgreesWithPlanC: for a self-weighting sample the verdict is
// exactly the plan's rule "accept iff errors ≤ c", for every x in 0..n, and
// the reported bound and p-value tell the same story. c is derived here by
// scanning the binomial CDF (plan.BinomialCDF), independently of Judge.
func TestVerdictAgreesWithPlanC(t *testing.T) {
	cases := []struct {
		n            int
		ceiling      float64
		confidence   float64
		m            int
		multiplicity plan.Multiplicity
	}{
		{1271, 0.02, 0.95, 1, plan.Bonferroni}, // the example plan (c = 17)
		{150, 0.02, 0.95, 1, plan.Bonferroni},
		{59, 0.05, 0.95, 1, plan.Bonferroni}, // zero-failure plan (c = 0)
		{300, 0.05, 0.99, 3, plan.Bonferroni},
		{200, 0.10, 0.90, 2, plan.FixedSequence},
		{400, 0.03, 0.95, 4, plan.Holm},
	}
	for _, tc := range cases {
		level := (1 - tc.confidence) / float64(tc.m)
		if tc.multiplicity == plan.FixedSequence {
			level = 1 - tc.confidence
		}
		c := largestC(tc.n, tc.ceiling, level)
		if c < 0 {
			t.Fatalf("n = %d admits no c", tc.n)
		}
		if tc.n == 1271 && c != 17 {
			t.Errorf("n = 1271: c = %d, want 17 (the issue's example)", c)
		}
		p := testPlan(tc.n, c, tc.ceiling, tc.confidence, tc.m, tc.multiplicity)
		d := oneStratum(tc.n)
		for x := 0; x <= tc.n; x++ {
			errs := make([][]int, tc.m)
			for k := range errs {
				errs[k] = []int{x}
			}
			r := judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, errs)})
			cand := r.Candidates[0]
			want := record.Reject
			if x <= c {
				want = record.Accept
			}
			if cand.Verdict != want {
				t.Fatalf("n=%d c=%d x=%d: verdict %s, want %s (%s)", tc.n, c, x, cand.Verdict, want, cand.Reason)
			}
			if (cand.UpperBound < tc.ceiling) != (x <= c) {
				t.Fatalf("n=%d c=%d x=%d: bound %v vs ceiling %v disagrees with the rule", tc.n, c, x, cand.UpperBound, tc.ceiling)
			}
			if (cand.PValue <= level) != (x <= c) {
				t.Fatalf("n=%d c=%d x=%d: p-value %v vs level %v disagrees with the rule", tc.n, c, x, cand.PValue, level)
			}
			if r.Method.Bound != plan.BoundClopperPearson || r.Applied.Kind != PlanRule || r.Method.Rule.Name != record.RulePlan {
				t.Fatalf("bound %s, rule %+v", r.Method.Bound, r.Method.Rule)
			}
		}
		// The far end as well: all errors.
		errs := make([][]int, tc.m)
		for k := range errs {
			errs[k] = []int{tc.n}
		}
		r := judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, errs)})
		if r.Candidates[0].Verdict != record.Reject || r.Candidates[0].UpperBound != 1 {
			t.Errorf("n=%d all errors: %+v", tc.n, r.Candidates[0])
		}
	}
}

// TestHypergeometricVerdictAgreesWithPlanC does the same for a finite lot:
// c is the largest x with P(X ≤ x | N, D1, n) ≤ α, D1 = ⌈ceiling·N⌉.
func TestHypergeometricVerdictAgreesWithPlanC(t *testing.T) {
	for _, tc := range []struct {
		N       int64
		n       int
		ceiling float64
	}{{2000, 250, 0.02}, {500, 120, 0.05}, {10000, 300, 0.01}} {
		D1 := plan.BadLotErrors(tc.N, tc.ceiling)
		c := -1
		for x := 0; x <= tc.n; x++ {
			if plan.HypergeometricCDF(x, tc.N, D1, tc.n) <= 0.05 {
				c = x
			}
		}
		p := testPlan(tc.n, c, tc.ceiling, 0.95, 1, plan.Bonferroni)
		p.Rule.Model, p.Inputs.Population = plan.ModelHypergeometric, tc.N
		d := Design{Strata: []Stratum{{Label: "lot", Population: tc.N, Sample: tc.n}}}
		for x := 0; x <= tc.n; x++ {
			r := judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{x}})})
			cand := r.Candidates[0]
			if (cand.Verdict == record.Accept) != (x <= c) || (cand.UpperBound < tc.ceiling) != (x <= c) {
				t.Fatalf("N=%d n=%d c=%d x=%d: %s, bound %v (%s)", tc.N, tc.n, c, x, cand.Verdict, cand.UpperBound, cand.Reason)
			}
			if r.Method.Bound != plan.BoundExactHypergeometric {
				t.Fatalf("bound %s", r.Method.Bound)
			}
		}
	}
}

// TestEdgeCasesAgainstScipy: zero errors, all errors, n = 1, a bound at
// confidence 0.999999 and a stratum with no errors, each against
// scipy.stats.beta.ppf (Clopper–Pearson) and scipy.stats.binom.cdf.
func TestEdgeCasesAgainstScipy(t *testing.T) {
	type edge struct {
		name       string
		x, n       int
		confidence float64
		ceiling    float64
	}
	edges := []edge{
		{"zero errors", 0, 50, 0.95, 0.05},
		{"all errors", 20, 20, 0.95, 0.05},
		{"n = 1, no error", 0, 1, 0.95, 0.5},
		{"n = 1, one error", 1, 1, 0.95, 0.5},
		{"confidence 0.999999", 3, 1000, 0.999999, 0.02},
		{"confidence 0.999999, zero errors", 0, 20000, 0.999999, 0.001},
	}
	var script strings.Builder
	script.WriteString("import json\nfrom scipy.stats import beta, binom\nout=[]\n")
	for _, e := range edges {
		fmt.Fprintf(&script, "x,n,c,ce=%d,%d,%s,%s\nout.append([1.0 if x==n else float(beta.ppf(c,x+1,n-x)), float(binom.cdf(x,n,ce)), 0.0 if x==0 else float(beta.ppf(0.025,x,n-x+1)), 1.0 if x==n else float(beta.ppf(0.975,x+1,n-x))])\n",
			e.x, e.n, pyFloat(e.confidence), pyFloat(e.ceiling))
	}
	script.WriteString("print(json.dumps(out))\n")
	var want [][4]float64
	python(t, script.String(), &want)
	const tol = 1e-9 // relative; the bound is solved to full double precision
	for i, e := range edges {
		p := testPlan(e.n, 0, e.ceiling, e.confidence, 1, plan.Bonferroni)
		d := oneStratum(e.n)
		r := judge(t, Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{e.x}})})
		c := r.Candidates[0]
		checks := []struct {
			what      string
			got, want float64
		}{
			{"upper bound (scipy.stats.beta.ppf)", c.UpperBound, want[i][0]},
			{"p-value (scipy.stats.binom.cdf)", c.PValue, want[i][1]},
			{"stratum lower 95 % (scipy.stats.beta.ppf)", c.Strata[0].Lower, want[i][2]},
			{"stratum upper 95 % (scipy.stats.beta.ppf)", c.Strata[0].Upper, want[i][3]},
		}
		for _, ch := range checks {
			if !close(ch.got, ch.want, tol) {
				t.Errorf("%s: %s = %.17g, scipy %.17g", e.name, ch.what, ch.got, ch.want)
			}
		}
		if c.Estimate != float64(e.x)/float64(e.n) {
			t.Errorf("%s: estimate %v", e.name, c.Estimate)
		}
	}
}

// TestStratifiedAgainstScipy: the stratified estimate, its variance and
// the per-stratum exact intervals on a sample with unequal weights and a
// stratum with no errors, against numpy arithmetic and
// scipy.stats.beta.ppf.
func TestStratifiedAgainstScipy(t *testing.T) {
	N := []int64{5000, 3000, 800, 200}
	n := []int{60, 40, 40, 40}
	x := []int{2, 1, 0, 3}
	d := Design{}
	for h := range N {
		d.Strata = append(d.Strata, Stratum{Label: fmt.Sprint("s", h), Population: N[h], Sample: n[h]})
	}
	var want struct {
		Est, Var float64
		Lo, Hi   []float64
	}
	python(t, `
import json, numpy as np
from scipy.stats import beta
N=np.array([5000,3000,800,200.]); n=np.array([60,40,40,40.]); x=np.array([2,1,0,3.])
W=N/N.sum(); p=x/n
s2=n*p*(1-p)/(n-1)
est=float((W*p).sum()); var=float((W**2*(1-n/N)*s2/n).sum())
lo=[0.0 if xi==0 else float(beta.ppf(0.025,xi,ni-xi+1)) for xi,ni in zip(x,n)]
hi=[float(beta.ppf(0.975,xi+1,ni-xi)) for xi,ni in zip(x,n)]
print(json.dumps(dict(Est=est,Var=var,Lo=lo,Hi=hi)))`, &want)
	e, err := d.Stratified(x)
	if err != nil {
		t.Fatal(err)
	}
	if !close(e.Rate, want.Est, 1e-12) || !close(e.Variance, want.Var, 1e-12) {
		t.Errorf("estimate %.17g var %.17g; numpy %.17g %.17g", e.Rate, e.Variance, want.Est, want.Var)
	}
	p := testPlan(180, 3, 0.08, 0.95, 1, plan.Bonferroni)
	items := itemsWithErrors(d, [][]int{x})
	r := judge(t, Input{Plan: p, Design: d, Items: items})
	c := r.Candidates[0]
	if !close(c.Estimate, want.Est, 1e-12) {
		t.Errorf("candidate estimate %v, want %v", c.Estimate, want.Est)
	}
	for h := range N {
		if !close(c.Strata[h].Lower, want.Lo[h], 1e-9) || !close(c.Strata[h].Upper, want.Hi[h], 1e-9) {
			t.Errorf("stratum %d: [%v, %v], scipy [%v, %v]", h, c.Strata[h].Lower, c.Strata[h].Upper, want.Lo[h], want.Hi[h])
		}
	}
	if c.Strata[2].Errors != 0 || c.Strata[2].Lower != 0 {
		t.Errorf("stratum with no errors: %+v", c.Strata[2])
	}
	if r.Method.Bound != plan.BoundStratifiedCount || r.Method.Approximate || r.Method.Rule.Name != record.RuleStratifiedCount {
		t.Errorf("unequal weights judged with %s (approximate %v), rule %+v", r.Method.Bound, r.Method.Approximate, r.Method.Rule)
	}
	if c.KornGraubardUpper == nil || c.CountedErrors == nil {
		t.Errorf("the count rule reports the counted errors and the descriptive Korn–Graubard bound: %+v", c)
	}
}

func pyFloat(x float64) string { return fmt.Sprintf("%.17g", x) }

func close(got, want, rel float64) bool {
	if got == want {
		return true
	}
	return math.Abs(got-want) <= rel*math.Max(math.Abs(want), 1e-300)
}

func TestSequentialPlanRefused(t *testing.T) {
	p := testPlan(10, 0, 0.1, 0.9, 1, plan.Bonferroni)
	p.Sequential = &plan.SequentialRule{MaxSampleSize: 10}
	d := oneStratum(10)
	_, err := Judge(Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{0}})})
	if !errors.Is(err, ErrSequential) {
		t.Errorf("got %v, want ErrSequential", err)
	}
}

package verdict

import (
	"fmt"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/record"
)

// exactCase is a small invented population with a given allocation, for
// which the chance of acceptance is computed exactly through Judge.
type exactCase struct {
	N       []int64
	n       []int
	ceiling float64
	conf    float64
	p0      *float64
}

// errorItems are the items of design d for one candidate that errs on the
// first x[h] counted items of stratum h and on the first y[h] items after
// the counted ones (counted[h] items count in stratum h).
func errorItems(d Design, counted, x, y []int) []Item {
	var items []Item
	for h, s := range d.Strata {
		for i := 0; i < s.Sample; i++ {
			p := "ok"
			if i < x[h] || (i >= counted[h] && i < counted[h]+y[h]) {
				p = "defect"
			}
			items = append(items, Item{RecordID: fmt.Sprintf("r%d-%d", h, i), Item: len(items) + 1, Stratum: h, Label: "ok", Predictions: []string{p}})
		}
	}
	return items
}

// TestExactAcceptanceThroughJudge computes, for small populations and
// every allocation shape (proportional with a rounded share, equal, a
// stratum with no item, a dominant stratum), the exact chance that Judge
// accepts a candidate when the population holds D* = ⌈ceiling·N⌉ errors
// (and up to 3 more), for every spread of them over the strata: the
// sampled items of stratum h are a random n_h-subset, its counted items a
// random k_h-subset of those, so the errors among them are hypergeometric
// and P(accept) = Σ_x Π_h Hyp(N_h, d_h, k_h)(x_h) · 1[Judge accepts x].
// Judge is called on every vector x of counted errors (with errors among
// the uncounted items as well, which must not change the verdict), and the
// worst spread must be accepted with probability at most α.
func TestExactAcceptanceThroughJudge(t *testing.T) {
	p0 := 0.05
	cases := []exactCase{
		{N: []int64{60, 30, 10}, n: []int{10, 10, 10}, ceiling: 0.25, conf: 0.8},        // equal
		{N: []int64{60, 30, 10}, n: []int{12, 6, 0}, ceiling: 0.2, conf: 0.8},           // a stratum with no item
		{N: []int64{50, 30, 20}, n: []int{15, 9, 6}, ceiling: 0.25, conf: 0.8},          // exactly proportional
		{N: []int64{53, 31, 16}, n: []int{16, 10, 5}, ceiling: 0.25, conf: 0.8},         // proportional, rounded up
		{N: []int64{80, 20}, n: []int{8, 12}, ceiling: 0.2, conf: 0.85, p0: &p0},        // Neyman-like
		{N: []int64{40, 40, 3}, n: []int{12, 12, 1}, ceiling: 0.3, conf: 0.75},          // a small share rounded up
		{N: []int64{40, 40, 3}, n: []int{13, 12, 0}, ceiling: 0.3, conf: 0.75, p0: &p0}, // the same rounded down
	}
	var table strings.Builder
	for _, c := range cases {
		d := Design{}
		var N int64
		n := 0
		for h := range c.N {
			d.Strata = append(d.Strata, Stratum{Label: fmt.Sprint("s", h), Population: c.N[h], Sample: c.n[h]})
			N += c.N[h]
			n += c.n[h]
		}
		alpha := 1 - c.conf
		p := testPlan(n, max(largestC(n, c.ceiling, alpha), 0), c.ceiling, c.conf, 1, plan.Bonferroni)
		p.Inputs.Anticipated = c.p0
		a, err := Choose(p, d, nil)
		if err != nil {
			t.Fatal(err)
		}
		counted := make([]int, len(c.N))
		for h := range counted {
			counted[h] = c.n[h]
			if a.Kind == CountRule {
				counted[h] = a.Count.Counted[h]
			}
		}
		// accept(x) through Judge, with errors among the uncounted items
		accept := map[string]bool{}
		var xs [][]int
		var rec func(h int, x []int)
		rec = func(h int, x []int) {
			if h == len(x) {
				xs = append(xs, append([]int(nil), x...))
				return
			}
			for v := 0; v <= counted[h]; v++ {
				x[h] = v
				rec(h+1, x)
			}
		}
		rec(0, make([]int, len(c.N)))
		for _, x := range xs {
			got := map[bool]bool{}
			for _, y := range [][]int{make([]int, len(x)), uncountedAll(c.n, counted)} {
				r, err := Judge(Input{Plan: p, Design: d, Items: errorItems(d, counted, x, y)})
				if err != nil {
					t.Fatal(err)
				}
				got[r.Overall == record.Accept] = true
			}
			if len(got) != 1 {
				t.Fatalf("N %v n %v: counted errors %v: the verdict depends on the uncounted items", c.N, c.n, x)
			}
			accept[fmt.Sprint(x)] = got[true]
		}
		worst, where := 0.0, []int64(nil)
		dstar := plan.BadLotErrors(N, c.ceiling)
		for total := dstar; total <= min(dstar+3, N); total++ {
			compositions(c.N, total, func(dh []int64) {
				var pr float64
				for _, x := range xs {
					if !accept[fmt.Sprint(x)] {
						continue
					}
					q := 1.0
					for h := range x {
						q *= plan.HypergeometricPMF(x[h], c.N[h], dh[h], counted[h])
					}
					pr += q
				}
				if pr > worst {
					worst, where = pr, append([]int64(nil), dh...)
				}
			})
		}
		rule := "plan's rule"
		if a.Kind == CountRule {
			rule = fmt.Sprintf("count rule c = %d of %v", a.Count.Accept, counted)
		}
		fmt.Fprintf(&table, "N %v n %v ceiling %v α %.2f (%s): worst spread %v, P(accept) = %.4f\n", c.N, c.n, c.ceiling, alpha, rule, where, worst)
		if worst > alpha+1e-12 {
			t.Errorf("N %v n %v: P(accept) = %.6g at the spread %v exceeds α = %v", c.N, c.n, worst, where, alpha)
		}
	}
	t.Logf("exact chance of acceptance at the ceiling, through Judge:\n%s", table.String())
}

// uncountedAll errs on every item after the counted ones.
func uncountedAll(n, counted []int) []int {
	y := make([]int, len(n))
	for h := range n {
		y[h] = n[h] - counted[h]
	}
	return y
}

// compositions calls f with every d (0 ≤ d_h ≤ N_h) with Σ d_h = total.
func compositions(N []int64, total int64, f func(d []int64)) {
	d := make([]int64, len(N))
	var rec func(h int, rest int64)
	rec = func(h int, rest int64) {
		if h == len(N)-1 {
			if rest <= N[h] {
				d[h] = rest
				f(d)
			}
			return
		}
		var cap int64
		for _, v := range N[h+1:] {
			cap += v
		}
		for v := max(0, rest-cap); v <= min(rest, N[h]); v++ {
			d[h] = v
			rec(h+1, rest-v)
		}
	}
	rec(0, total)
}

// TestHolmPerCandidateRiskExact: under Holm's step-down a candidate at the
// ceiling judged beside a perfect one is tested at the second step, at the
// full δ: its exact chance of acceptance (binomial, through Judge) lies
// above δ/M — which the plan and record once stated as its risk — and at
// most δ, the family-wise risk Holm controls and the record now states.
func TestHolmPerCandidateRiskExact(t *testing.T) {
	const n, ceiling, conf = 400, 0.03, 0.95
	delta := 1 - conf
	p := testPlan(n, largestC(n, ceiling, delta/2), ceiling, conf, 2, plan.Holm)
	d := oneStratum(n)
	var pr float64
	for x := 0; x <= n; x++ {
		r, err := Judge(Input{Plan: p, Design: d, Items: itemsWithErrors(d, [][]int{{x}, {0}})})
		if err != nil {
			t.Fatal(err)
		}
		if r.Candidates[0].Verdict == record.Accept {
			pr += plan.BinomialPMF(x, n, ceiling)
		}
	}
	t.Logf("Holm, 2 candidates, δ = %v: a candidate at the ceiling beside a perfect one is accepted with probability %.4f (δ/2 = %v)", delta, pr, delta/2)
	if !(pr > delta/2) || pr > delta+1e-12 {
		t.Errorf("P(accept) = %.6g, want in (δ/2, δ] = (%v, %v]", pr, delta/2, delta)
	}
}

package stratified

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// everAccepts is the exact chance that the sequential judgement accepts at
// some look when stratum h holds D[h] errors and items are labeled in the
// given order of strata (order[t] is the stratum of the t-th label), by
// dynamic programming over the errors seen so far per stratum.
func everAccepts(t *testing.T, s Sequential, N []int64, D []int64, order []int) float64 {
	t.Helper()
	H := len(N)
	type state string
	key := func(x []int) state { return state(fmt.Sprint(x)) }
	seen := make([]int, H)
	cur := map[state][]int{key(make([]int, H)): make([]int, H)}
	prob := map[state]float64{key(make([]int, H)): 1}
	accepted := 0.0
	memo := map[string]bool{}
	judge := func(n, x []int) bool {
		k := fmt.Sprint(n, x)
		if v, ok := memo[k]; ok {
			return v
		}
		d := s.Design
		d.Strata = append([]Stratum(nil), d.Strata...)
		for h := range d.Strata {
			d.Strata[h].Sample = n[h]
		}
		q := s
		q.Design = d
		v, err := q.Judge(x)
		if err != nil {
			t.Fatal(err)
		}
		memo[k] = v.Accepted
		return v.Accepted
	}
	for _, h := range order {
		nextCur := map[state][]int{}
		nextProb := map[state]float64{}
		for k, x := range cur {
			p := prob[k]
			left := N[h] - int64(seen[h])
			pe := float64(D[h]-int64(x[h])) / float64(left)
			for _, e := range []int{0, 1} {
				q := pe
				if e == 0 {
					q = 1 - pe
				}
				if q <= 0 {
					continue
				}
				y := append([]int(nil), x...)
				y[h] += e
				ky := key(y)
				nextCur[ky] = y
				nextProb[ky] += p * q
			}
		}
		seen[h]++
		cur, prob = map[state][]int{}, map[state]float64{}
		for k, y := range nextCur {
			if judge(seen, y) {
				accepted += nextProb[k]
				continue
			}
			cur[k], prob[k] = y, nextProb[k]
		}
	}
	return accepted
}

// TestSequentialAnytimeExact checks the anytime guarantee exactly: for
// small populations, every spread of D* errors (and up to 3 more) and two
// priors, the chance that the judgement accepts at any look during the
// labeling of the whole sample is at most α.
func TestSequentialAnytimeExact(t *testing.T) {
	cases := []struct {
		N     []int64
		n     []int
		order func(n []int) []int
	}{
		{N: []int64{14, 6}, n: []int{10, 6}, order: roundRobin},
		{N: []int64{12, 8, 3}, n: []int{8, 4, 0}, order: roundRobin},
		{N: []int64{20, 4}, n: []int{16, 1}, order: roundRobin},
	}
	var table strings.Builder
	for _, c := range cases {
		d := design(c.N, c.n)
		order := c.order(c.n)
		for _, ceiling := range []float64{0.15, 0.3} {
			for _, prior := range []Prior{AnticipatedPrior(ceiling / 4), PriorAt(0.5, 2)} {
				priors := make([]Prior, len(c.N))
				for h := range priors {
					priors[h] = prior
				}
				s := Sequential{Design: d, Ceiling: ceiling, Confidence: 0.8, Priors: priors}
				worst, where := -1.0, []int64(nil)
				dstar := d.BadLotErrors(ceiling)
				for total := dstar; total <= min(dstar+3, d.Population()); total++ {
					compositions(c.N, total, func(D []int64) {
						if p := everAccepts(t, s, c.N, D, order); p > worst {
							worst, where = p, append([]int64(nil), D...)
						}
					})
				}
				fmt.Fprintf(&table, "N %v n %v ceiling %v prior %+v: worst d %v, P(ever accept) %.4g\n", c.N, c.n, ceiling, prior, where, worst)
				if worst > 0.2+1e-12 {
					t.Errorf("N %v n %v ceiling %v prior %+v: P(ever accept) = %.6g at d = %v exceeds α = 0.2", c.N, c.n, ceiling, prior, worst, where)
				}
			}
		}
	}
	t.Logf("anytime risk (exact):\n%s", table.String())
}

// roundRobin labels one item of each stratum in turn while it has any
// left.
func roundRobin(n []int) []int {
	var order []int
	left := append([]int(nil), n...)
	for more := true; more; {
		more = false
		for h := range left {
			if left[h] > 0 {
				order = append(order, h)
				left[h]--
				more = true
			}
		}
	}
	return order
}

// TestSequentialBasics: no labels give p = 1 and an upper bound of 1; an
// empty stratum keeps its decisions unknown; a clean sample of a large
// part of the population accepts; evidence only grows with fewer errors.
func TestSequentialBasics(t *testing.T) {
	d := design([]int64{400, 100}, []int{0, 0})
	s := Sequential{Design: d, Ceiling: 0.1, Confidence: 0.95, Priors: []Prior{AnticipatedPrior(0.02), AnticipatedPrior(0.02)}}
	v, err := s.Judge([]int{0, 0})
	if err != nil {
		t.Fatal(err)
	}
	if v.PValue != 1 || v.Accepted || v.UpperErrors != 500 {
		t.Fatalf("no labels: %+v", v)
	}
	s.Design = design([]int64{400, 100}, []int{300, 0})
	v, err = s.Judge([]int{0, 0})
	if err != nil {
		t.Fatal(err)
	}
	if v.UpperErrors < 100 || v.Accepted {
		t.Fatalf("stratum of 100 left empty must stay unknown (upper ≥ 100 of 500, no acceptance at a 10 %% ceiling): %+v", v)
	}
	s.Design = design([]int64{400, 100}, []int{300, 80})
	prev := math.Inf(1)
	for x := 0; x <= 6; x++ {
		v, err := s.Judge([]int{x, 0})
		if err != nil {
			t.Fatal(err)
		}
		if x == 0 && !v.Accepted {
			t.Fatalf("380 clean labels of 500 should accept a 10 %% ceiling: %+v", v)
		}
		if v.LogEvidence > prev+1e-12 {
			t.Fatalf("evidence grew with more errors: %v after %v", v.LogEvidence, prev)
		}
		prev = v.LogEvidence
	}
	if _, err := (Sequential{Design: d, Ceiling: 0.1, Confidence: 0.95, Priors: []Prior{{0, 1}, {1, 1}}}).Judge([]int{0, 0}); err == nil {
		t.Fatal("a prior with A = 0 was accepted")
	}
}

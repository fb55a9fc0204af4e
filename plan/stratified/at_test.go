package stratified

import (
	"math"
	"testing"
)

// TestPValueAtAndCountDistribution: the helpers that let a rule serve any
// error count agree with the rule's own judgement and operating
// characteristic (regression guard, exact arithmetic on both sides).
func TestPValueAtAndCountDistribution(t *testing.T) {
	N := []int64{8000, 5000, 1500, 300}
	for _, n := range [][]int{{300, 190, 60, 12}, {140, 140, 140, 140}, {400, 0, 100, 30}} {
		d := design(N, n)
		r, err := NewCountRule(d, nil, 0.03, 0.9)
		if err != nil {
			t.Fatal(err)
		}
		errs := []int{4, 2, 1, 0}
		for h := range errs {
			errs[h] = min(errs[h], n[h])
		}
		v, err := r.Judge(errs)
		if err != nil {
			t.Fatal(err)
		}
		if got := r.PValueAt(v.Errors, r.BadLot); got != v.PValue {
			t.Errorf("n %v: PValueAt(S, D*) = %v, Judge's p-value %v", n, got, v.PValue)
		}
		// the upper bound is the largest D the test does not reject
		if v.UpperErrors < d.Population() {
			if p := r.PValueAt(v.Errors, v.UpperErrors); !(p > 0.1) {
				t.Errorf("n %v: PValueAt at D_U = %d is %v, want > α", n, v.UpperErrors, p)
			}
			if p := r.PValueAt(v.Errors, v.UpperErrors+1); p > 0.1 {
				t.Errorf("n %v: PValueAt at D_U + 1 is %v, want ≤ α", n, p)
			}
		}
		if r.PValueAt(0, 0) != 1 || r.PValueAt(0, d.Population()+1) != 0 {
			t.Errorf("n %v: PValueAt outside 1 … N: %v, %v", n, r.PValueAt(0, 0), r.PValueAt(0, d.Population()+1))
		}
		at := []int64{200, 90, 40, 9}
		want, err := r.AcceptProbability(at)
		if err != nil {
			t.Fatal(err)
		}
		dist, err := r.CountDistribution(at, r.Accept)
		if err != nil {
			t.Fatal(err)
		}
		var got float64
		for _, p := range dist {
			got += p
		}
		if math.Abs(got-want) > 1e-15 {
			t.Errorf("n %v: Σ CountDistribution up to c = %v, AcceptProbability %v", n, got, want)
		}
	}
}

package measure

import (
	"reflect"
	"testing"
)

// TestCoarsen: three thresholds over five bands cut four cells (the two
// bands below the lowest threshold merge), sizes and positives add up, and
// every claim's true value is unchanged.
func TestCoarsen(t *testing.T) {
	p := banded([]int64{500, 400, 60, 20, 20}, 2, 3, 4)
	comp := Composition{Positives: []int64{1, 2, 10, 15, 19}}
	q, qc, merged, err := Coarsen(p, comp)
	if err != nil {
		t.Fatal(err)
	}
	if want := []int{0, 0, 1, 2, 3}; !reflect.DeepEqual(merged, want) {
		t.Errorf("merged %v, want %v", merged, want)
	}
	if len(q.Strata) != 4 || q.Strata[0].Population != 900 || q.Strata[0].Label != "band A + band B" {
		t.Errorf("cells %+v", q.Strata)
	}
	if want := []int64{3, 10, 15, 19}; !reflect.DeepEqual(qc.Positives, want) {
		t.Errorf("positives %v, want %v", qc.Positives, want)
	}
	for j := range p.Candidates {
		for _, m := range Measures() {
			a, okA := trueValue(p, Claim{j, m, 0.5}, comp.Positives)
			b, okB := trueValue(q, Claim{j, m, 0.5}, qc.Positives)
			if okA != okB || a != b {
				t.Errorf("%s of %s: %v before coarsening, %v after", m, p.Candidates[j].Name, a, b)
			}
		}
	}
}

package agreement

import (
	"math"
	"testing"
)

// TestGwetAC1PublishedExamples checks AC1, its chance agreement and its
// standard error against values published with Gwet's own software.
func TestGwetAC1PublishedExamples(t *testing.T) {
	cases := []struct {
		source       string
		counts       [][]int
		ac1, pe, se  float64
		tol, seTol   float64
		observedWant float64
	}{
		{
			// Gwet (2014), Handbook of Inter-Rater Reliability, 4th ed., 3×3
			// abstractors table; values printed (5 digits) in the module
			// docstring of irrCAC/table.py (the Python port of Gwet's irrCAC
			// package): AC1 0.84933, se 0.04322, pa 0.89, pe 0.26992.
			source: "irrCAC table.py docstring, table_cont3x3abstractors",
			counts: [][]int{{13, 0, 0}, {0, 20, 7}, {0, 4, 56}},
			ac1:    0.84933, pe: 0.26992, se: 0.04322,
			tol: 5e-6, seTol: 5e-6, observedWant: 0.89,
		},
		{
			// 4×4 diagnosis table; irrCAC test_gwet.py: AC1 0.456, se 0.043
			// (3 digits).
			source: "irrCAC test_gwet.py, table_cont4x4diagnosis",
			counts: [][]int{{40, 4, 4, 17}, {6, 25, 2, 13}, {4, 1, 21, 12}, {15, 5, 9, 45}},
			ac1:    0.456, pe: math.NaN(), se: 0.043,
			tol: 5e-4, seTol: 5e-4, observedWant: 131.0 / 223.0,
		},
	}
	for _, c := range cases {
		e, err := GwetAC1(table(t, c.counts), 0.95)
		if err != nil {
			t.Fatalf("%s: %v", c.source, err)
		}
		if !near(e.Value, c.ac1, c.tol) {
			t.Errorf("%s: AC1 = %.6f, want %.6f ± %g", c.source, e.Value, c.ac1, c.tol)
		}
		if !math.IsNaN(c.pe) && !near(e.Chance, c.pe, c.tol) {
			t.Errorf("%s: p_e = %.6f, want %.6f", c.source, e.Chance, c.pe)
		}
		if !near(e.StdErr, c.se, c.seTol) {
			t.Errorf("%s: se = %.6f, want %.6f ± %g", c.source, e.StdErr, c.se, c.seTol)
		}
		if !near(e.Observed, c.observedWant, 1e-12) {
			t.Errorf("%s: p_a = %v, want %v", c.source, e.Observed, c.observedWant)
		}
	}
}

// TestGwetAC1StaysHighWhenOneClassDominates is the "kappa paradox" AC1 was
// made for: 95 of 100 items agreed, nearly all in one class. Kappa is low,
// AC1 stays near p_a. Expected values by hand from the formulas in ac1.go
// and kappa.go (common practice, no source): margins (0.96, 0.04) and
// (0.97, 0.03); p_e(κ) = 0.9324, κ = (0.95 − 0.9324)/0.0676;
// π = (0.965, 0.035), p_e(AC1) = 2·0.965·0.035 = 0.06755.
func TestGwetAC1StaysHighWhenOneClassDominates(t *testing.T) {
	tb := table(t, [][]int{{94, 2}, {3, 1}})
	k, err := CohenKappa(tb, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	a, err := GwetAC1(tb, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if want := (0.95 - 0.9324) / (1 - 0.9324); !near(k.Value, want, 1e-12) {
		t.Errorf("kappa = %v, want %v", k.Value, want)
	}
	if want := (0.95 - 0.06755) / (1 - 0.06755); !near(a.Value, want, 1e-12) {
		t.Errorf("AC1 = %v, want %v", a.Value, want)
	}
	if a.Value < 0.9 || k.Value > 0.3 {
		t.Errorf("AC1 %.3f should stay high and kappa %.3f low", a.Value, k.Value)
	}
}

func TestGwetAC1SingleClassIsDefined(t *testing.T) {
	// Both labelers put all 12 items in the first of three classes: π =
	// (1, 0, 0), p_e = 0, AC1 = p_a = 1, variance 0 (exact arithmetic).
	e, err := GwetAC1(table(t, [][]int{{12, 0, 0}, {0, 0, 0}, {0, 0, 0}}), 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if e.Value != 1 || e.Chance != 0 || !near(e.StdErr, 0, 1e-9) {
		t.Errorf("single class: %+v, want AC1 1, p_e 0, se 0", e)
	}
}

func TestGwetAC1UsesAllClasses(t *testing.T) {
	// The same counts on 2 classes and on 3 (one unused) differ: q enters
	// p_e through 1/(q − 1). 2 classes: π = (0.5, 0.5), p_e = 0.5;
	// 3 classes: p_e = 0.5/2 = 0.25 (exact arithmetic).
	two := table(t, [][]int{{4, 1}, {1, 4}})
	three := table(t, [][]int{{4, 1, 0}, {1, 4, 0}, {0, 0, 0}})
	a2, _ := GwetAC1(two, 0.95)
	a3, _ := GwetAC1(three, 0.95)
	if !near(a2.Chance, 0.5, 1e-15) || !near(a3.Chance, 0.25, 1e-15) {
		t.Errorf("p_e = %v (2 classes), %v (3 classes), want 0.5, 0.25", a2.Chance, a3.Chance)
	}
	if !near(a2.Value, 0.6, 1e-12) || !near(a3.Value, (0.8-0.25)/0.75, 1e-12) {
		t.Errorf("AC1 = %v, %v, want 0.6, %v", a2.Value, a3.Value, (0.8-0.25)/0.75)
	}
}

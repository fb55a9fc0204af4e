package agreement

import (
	"errors"
	"math"
	"testing"
)

func table(t *testing.T, counts [][]int) *Table {
	t.Helper()
	names := []string{"c1", "c2", "c3", "c4", "c5", "c6"}
	tb, err := TableFromCounts(names[:len(counts)], counts)
	if err != nil {
		t.Fatal(err)
	}
	return tb
}

func near(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol
}

// TestCohenKappaPublishedExamples checks kappa (and, where the source gives
// them, p_o, p_e and the standard error) on worked examples.
func TestCohenKappaPublishedExamples(t *testing.T) {
	cases := []struct {
		source     string
		counts     [][]int
		po, pe     float64 // NaN: not given by the source
		kappa, tol float64
		se, seTol  float64 // se NaN: not given
	}{
		{
			// Worked example of the English Wikipedia article "Cohen's kappa"
			// (50 grant proposals read by two readers; yes/no), from memory:
			// p_o = 0.7, p_e = 0.5, κ = 0.4.
			source: "Wikipedia 'Cohen's kappa' worked example (from memory)",
			counts: [][]int{{20, 5}, {10, 15}},
			po:     0.7, pe: 0.5, kappa: 0.4, tol: 1e-12,
			se: math.NaN(),
		},
		{
			// Fleiss (1981), Statistical Methods for Rates and Proportions,
			// 2nd ed., ch. 13: 100 patients diagnosed by two psychiatrists as
			// psychotic / neurotic / organic; p_o = .89, p_e = .66,
			// κ = .23/.34 = .676 (from memory).
			source: "Fleiss (1981) ch. 13 diagnosis table (from memory)",
			counts: [][]int{{75, 1, 4}, {5, 4, 1}, {0, 0, 10}},
			po:     0.89, pe: 0.66, kappa: 0.23 / 0.34, tol: 1e-12,
			se: math.NaN(),
		},
		{
			// Gwet (2014), Handbook of Inter-Rater Reliability, 4th ed.: 100
			// pregnancies classified by two abstractors (Ectopic/AIU/NIU).
			// κ = 0.796 as in the tests of the irrCAC Python package
			// (test/unit/irrCAC/table/test_cohen.py, 3 digits).
			source: "Gwet (2014) 3×3 abstractors table; irrCAC test_cohen.py",
			counts: [][]int{{13, 0, 0}, {0, 20, 7}, {0, 4, 56}},
			po:     0.89, pe: math.NaN(), kappa: 0.796, tol: 5e-4,
			se: math.NaN(),
		},
		{
			// 223 patients by clinical vs research diagnosis (4 classes);
			// κ = 0.432, se 0.046 in irrCAC's test_cohen.py (3 digits). That
			// se is Gwet's kappa variance; for this table it agrees with
			// Fleiss–Cohen–Everitt to 3 digits (both 0.0460 here).
			source: "irrCAC test_cohen.py, table_cont4x4diagnosis",
			counts: [][]int{{40, 4, 4, 17}, {6, 25, 2, 13}, {4, 1, 21, 12}, {15, 5, 9, 45}},
			po:     math.NaN(), pe: math.NaN(), kappa: 0.432, tol: 5e-4,
			se: 0.046, seTol: 5e-4,
		},
	}
	for _, c := range cases {
		e, err := CohenKappa(table(t, c.counts), 0.95)
		if err != nil {
			t.Fatalf("%s: %v", c.source, err)
		}
		if !near(e.Value, c.kappa, c.tol) {
			t.Errorf("%s: kappa = %.6f, want %.6f ± %g", c.source, e.Value, c.kappa, c.tol)
		}
		if !math.IsNaN(c.po) && !near(e.Observed, c.po, 1e-12) {
			t.Errorf("%s: p_o = %v, want %v", c.source, e.Observed, c.po)
		}
		if !math.IsNaN(c.pe) && !near(e.Chance, c.pe, 1e-12) {
			t.Errorf("%s: p_e = %v, want %v", c.source, e.Chance, c.pe)
		}
		if !math.IsNaN(c.se) && !near(e.StdErr, c.se, c.seTol) {
			t.Errorf("%s: se = %.5f, want %.5f ± %g", c.source, e.StdErr, c.se, c.seTol)
		}
	}
}

func TestCohenKappaEdgeCases(t *testing.T) {
	// Perfect agreement over two used classes: κ = 1, variance 0 (A = p_o,
	// B = 0, C = 1 → A − C = 0). Exact arithmetic, no source.
	e, err := CohenKappa(table(t, [][]int{{7, 0, 0}, {0, 3, 0}, {0, 0, 0}}), 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if !near(e.Value, 1, 1e-15) || !near(e.StdErr, 0, 1e-7) || e.Upper != 1 {
		t.Errorf("perfect agreement: %+v, want kappa 1, se 0, upper 1", e)
	}
	// Every item in one class by both: p_e = 1, kappa is 0/0.
	if _, err := CohenKappa(table(t, [][]int{{9, 0}, {0, 0}}), 0.95); !errors.Is(err, ErrUndefined) {
		t.Errorf("single-class table: error = %v, want ErrUndefined", err)
	}
	if _, err := CohenKappa(table(t, [][]int{{0, 0}, {0, 0}}), 0.95); !errors.Is(err, ErrUndefined) {
		t.Errorf("empty table: error = %v, want ErrUndefined", err)
	}
	for _, c := range []float64{0, 1, -0.5, math.NaN()} {
		if _, err := CohenKappa(table(t, [][]int{{1, 2}, {3, 4}}), c); !errors.Is(err, ErrConfidence) {
			t.Errorf("confidence %v: error = %v, want ErrConfidence", c, err)
		}
	}
	// Total disagreement on 2×2 with balanced margins: p_o = 0, p_e = 0.5,
	// κ = −1, the lower end of the range (exact arithmetic).
	e, err = CohenKappa(table(t, [][]int{{0, 5}, {5, 0}}), 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if !near(e.Value, -1, 1e-15) || e.Lower < -1 {
		t.Errorf("total disagreement: %+v, want kappa −1 and lower ≥ −1", e)
	}
}

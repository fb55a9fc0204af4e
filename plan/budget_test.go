package plan

import (
	"errors"
	"math"
	"probity/plan/inputerr"
	"testing"
)

func TestBudgetStream(t *testing.T) {
	rows, err := Budget(500, 0.95, 1, Bonferroni, 0, 11)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 11 {
		t.Fatalf("%d rows", len(rows))
	}
	// zero errors: closed form 1 − α^(1/n) (Clopper–Pearson at x = 0).
	if want := 1 - math.Pow(0.05, 1.0/500); relErr(rows[0].Ceiling, want) > 1e-12 {
		t.Errorf("row 0 = %v, want %v", rows[0].Ceiling, want)
	}
	for _, r := range rows {
		if r.Ceiling != ClopperPearsonUpper(r.Errors, 500, 0.95) {
			t.Errorf("row %d = %v, want the Clopper–Pearson bound", r.Errors, r.Ceiling)
		}
	}
	// Bonferroni over 4 candidates uses 1 − 0.05/4.
	rows4, _ := Budget(500, 0.95, 4, Bonferroni, 0, 1)
	if rows4[0].Ceiling != ClopperPearsonUpper(0, 500, 1-0.05/4) {
		t.Errorf("M = 4: %v", rows4[0].Ceiling)
	}
	if rows, _ := Budget(3, 0.95, 1, Bonferroni, 0, 11); len(rows) != 3 {
		t.Errorf("n = 3 gives %d rows, want x = 0, 1, 2", len(rows))
	}
}

// For a lot, row x is D/N for the smallest D with P(X ≤ x | N, D, n) ≤ α,
// checked here against a scan over every D.
func TestBudgetLot(t *testing.T) {
	const N, n = 400, 60
	rows, err := Budget(n, 0.9, 1, Bonferroni, N, 6)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		d := int64(0)
		for ; d <= N; d++ {
			if HypergeometricCDF(r.Errors, N, d, n) <= 1-0.9+1e-15 {
				break
			}
		}
		if want := float64(d) / N; r.Ceiling != want {
			t.Errorf("x = %d: %v, scan gives %v", r.Errors, r.Ceiling, want)
		}
	}
	var ie *inputerr.Error
	if _, err := Budget(500, 0.95, 1, Bonferroni, 100, 3); !errors.As(err, &ie) || ie.Field != "population" {
		t.Errorf("budget above the lot: %v", err)
	}
	if _, err := Budget(0, 0.95, 1, Bonferroni, 0, 3); !errors.As(err, &ie) || ie.Field != "budget" {
		t.Errorf("budget 0: %v", err)
	}
}

func TestAcceptanceNumberFor(t *testing.T) {
	in := inputs(0.02, 0.95)
	if c := AcceptanceNumberFor(1271, in); c != 17 {
		t.Errorf("c for n = 1271 = %d, want 17 (issue 2's plan)", c)
	}
	if c := AcceptanceNumberFor(100, in); c != -1 {
		t.Errorf("c for n = 100 = %d, want −1 (below the zero-failure 149)", c)
	}
	if c := AcceptanceNumberFor(149, in); c != 0 {
		t.Errorf("c for n = 149 = %d, want 0", c)
	}
}

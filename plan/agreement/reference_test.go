package agreement

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os/exec"
	"path/filepath"
	"testing"

	"probity/plan/testkit/needs"
)

// python runs Debian's /usr/bin/python3 on a script in testdata/agreement
// with stdin; it fails the test under CI when the interpreter or its
// modules are missing, and skips it otherwise.
func python(t *testing.T, script string, stdin []byte) []byte {
	t.Helper()
	interp := needs.PythonModules(t, "numpy", "scipy", "statsmodels")
	cmd := exec.Command(interp, filepath.Join("..", "..", "testdata", "agreement", script))
	cmd.Stdin = bytes.NewReader(stdin)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("%s: %v\n%s", script, err, stderr.String())
	}
	return out
}

// randomTables draws agreement tables of 2 to 5 classes and 2 to 400 items:
// half with uniform cell weights, half with a dominant class and rare
// disagreements (the case audits meet). Tables whose kappa is undefined
// (p_e = 1) are left out; the seed is fixed.
func randomTables(count int) [][][]int {
	rng := rand.New(rand.NewPCG(7, 2026))
	var out [][][]int
	for len(out) < count {
		q := 2 + rng.IntN(4)
		n := 2 + rng.IntN(399)
		w := make([]float64, q*q)
		sum := 0.0
		for i := range w {
			w[i] = rng.ExpFloat64()
			if len(out)%2 == 1 {
				r, c := i/q, i%q
				switch {
				case r == 0 && c == 0:
					w[i] *= 200
				case r == c:
					w[i] *= 5
				}
			}
			sum += w[i]
		}
		counts := make([][]int, q)
		for i := range counts {
			counts[i] = make([]int, q)
		}
		for range n {
			u := rng.Float64() * sum
			k := 0
			for k < len(w)-1 && u >= w[k] {
				u -= w[k]
				k++
			}
			counts[k/q][k%q]++
		}
		tb, _ := TableFromCounts([]string{"a", "b", "c", "d", "e"}[:q], counts)
		if _, err := CohenKappa(tb, 0.95); err != nil {
			continue
		}
		out = append(out, counts)
	}
	return out
}

// TestAgainstStatsmodelsAndFormula compares kappa, its standard error and
// its 95 % interval with statsmodels.stats.inter_rater.cohens_kappa
// (Debian python3-statsmodels; Fleiss–Cohen–Everitt variance), and AC1,
// its chance agreement and standard error with an independent Python
// computation of Gwet (2008) written from the expanded variance formula
// (testdata/agreement/reference.py), on 400 random tables. Tolerance:
// 1e-9 absolute (both are closed forms in double precision).
func TestAgainstStatsmodelsAndFormula(t *testing.T) {
	tables := randomTables(400)
	in, err := json.Marshal(tables)
	if err != nil {
		t.Fatal(err)
	}
	var ref []struct {
		Kappa    float64  `json:"kappa"`
		KappaVar float64  `json:"kappa_var"`
		KappaLow *float64 `json:"kappa_low"`
		KappaUpp *float64 `json:"kappa_upp"`
		AC1      float64  `json:"ac1"`
		AC1PE    float64  `json:"ac1_pe"`
		AC1SE    float64  `json:"ac1_se"`
	}
	if err := json.Unmarshal(python(t, "reference.py", in), &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref) != len(tables) {
		t.Fatalf("reference returned %d results for %d tables", len(ref), len(tables))
	}
	const tol = 1e-9
	dominant := 0
	for i, counts := range tables {
		tb, _ := TableFromCounts([]string{"a", "b", "c", "d", "e"}[:len(counts)], counts)
		k, err := CohenKappa(tb, 0.95)
		if err != nil {
			t.Fatalf("table %d %v: %v", i, counts, err)
		}
		a, err := GwetAC1(tb, 0.95)
		if err != nil {
			t.Fatalf("table %d %v: %v", i, counts, err)
		}
		r := ref[i]
		check := func(what string, got, want float64) {
			if !near(got, want, tol) {
				t.Errorf("table %d %v: %s = %.12g, reference %.12g", i, counts, what, got, want)
			}
		}
		check("kappa", k.Value, r.Kappa)
		// Where the true variance is 0 (e.g. one labeler used one class),
		// both sides get a rounding residue of about 1e-15, which the
		// square root turns into 1e-8: compare variances there, and the
		// interval with the residue's width.
		refVar := math.Max(0, r.KappaVar)
		if refVar < 1e-12 {
			if r.KappaVar < -1e-12 || k.StdErr*k.StdErr > 1e-12 {
				t.Errorf("table %d %v: kappa variance %g, reference %g; both should be 0", i, counts, k.StdErr*k.StdErr, r.KappaVar)
			}
			if !near(k.Lower, k.Value, 1e-5) || !near(k.Upper, k.Value, 1e-5) {
				t.Errorf("table %d %v: zero-variance interval [%g, %g] is not the point %g", i, counts, k.Lower, k.Upper, k.Value)
			}
		} else {
			check("kappa se", k.StdErr, math.Sqrt(refVar))
			check("kappa lower", k.Lower, math.Max(-1, *r.KappaLow))
			check("kappa upper", k.Upper, math.Min(1, *r.KappaUpp))
		}
		check("AC1", a.Value, r.AC1)
		check("AC1 p_e", a.Chance, r.AC1PE)
		check("AC1 se", a.StdErr, r.AC1SE)
		if a.Value-k.Value > 0.3 {
			dominant++
		}
	}
	// The dominant-class half must actually exercise the paradox region.
	if dominant < 20 {
		t.Errorf("only %d tables with AC1 − kappa > 0.3; the generator no longer covers skewed tables", dominant)
	}
}

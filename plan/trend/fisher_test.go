package trend

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os/exec"
	"strconv"
	"strings"
	"testing"

	"probity/plan/testkit/needs"
)

// TestFisherExactPublished checks worked examples whose values are printed
// in the literature or follow from a hand count of the hypergeometric law.
func TestFisherExactPublished(t *testing.T) {
	cases := []struct {
		t    Table
		alt  Alternative
		want float64
		tol  float64 // absolute
		src  string
	}{
		// Fisher's tea-tasting experiment: 8 cups, 4 with milk first; the
		// lady picks 3 of the 4 correctly. P(3 or more right) = 17/70.
		{Table{3, 1, 1, 3}, Greater, 17.0 / 70, 1e-13, "Fisher, The Design of Experiments (1935) §2; Agresti, Categorical Data Analysis 3rd ed. §3.5.2: P = 0.243"},
		{Table{4, 0, 0, 4}, Greater, 1.0 / 70, 1e-13, "Fisher (1935) §2: all four right, 1/70"},
		{Table{3, 1, 1, 3}, Less, 69.0 / 70, 1e-13, "complement of P(X = 4) = 1/70, hand count"},
		{Table{0, 4, 4, 0}, Less, 1.0 / 70, 1e-13, "hand count: C(4,0)C(4,4)/C(8,4)"},
		// Empty margins: no information, p = 1 (scipy.stats.fisher_exact 1.10 convention).
		{Table{0, 10, 0, 12}, Greater, 1, 0, "scipy.stats.fisher_exact 1.10 (zero column)"},
		{Table{0, 0, 3, 12}, Greater, 1, 0, "scipy.stats.fisher_exact 1.10 (zero row)"},
		{Table{5, 0, 7, 0}, Less, 1, 0, "scipy.stats.fisher_exact 1.10 (zero column)"},
	}
	for _, c := range cases {
		got, err := FisherExact(c.t, c.alt)
		if err != nil {
			t.Fatalf("%v %v: %v", c.t, c.alt, err)
		}
		if math.Abs(got-c.want) > c.tol {
			t.Errorf("FisherExact(%v, %v) = %.17g, want %.17g ± %g (%s)", c.t, c.alt, got, c.want, c.tol, c.src)
		}
	}
}

func TestFisherExactRejectsNegativeCells(t *testing.T) {
	if _, err := FisherExact(Table{-1, 2, 3, 4}, Greater); !errors.Is(err, ErrTable) {
		t.Fatalf("negative cell: err = %v, want ErrTable", err)
	}
	if _, err := FisherExact(Table{1, 2, 3, 4}, Alternative(7)); !errors.Is(err, ErrTable) {
		t.Fatalf("bad alternative: err = %v, want ErrTable", err)
	}
}

// TestFisherExactMonotone: adding an error to the tested period can only
// lower the "greater" p-value (common practice, no source; a property of the
// hypergeometric upper tail as the observed cell grows with fixed row sizes).
func TestFisherExactMonotone(t *testing.T) {
	prev := 2.0
	for a := 0; a <= 40; a++ {
		p, err := FisherExact(Table{a, 800 - a, 10, 790}, Greater)
		if err != nil {
			t.Fatal(err)
		}
		if p > prev+1e-15 {
			t.Fatalf("a = %d: p = %g rose above %g", a, p, prev)
		}
		prev = p
	}
}

// referenceTables is a fixed set of audit-sized tables (errors out of
// labeled in two periods) plus small and lopsided ones.
func referenceTables() []Table {
	r := rand.New(rand.NewPCG(8, 2026))
	var ts []Table
	for i := 0; i < 300; i++ {
		var n1, n2 int
		switch i % 3 {
		case 0: // small tables
			n1, n2 = 1+r.IntN(30), 1+r.IntN(30)
		case 1: // audit-sized, similar sizes
			n1 = 200 + r.IntN(3000)
			n2 = n1 + r.IntN(200) - 100
		default: // lopsided sizes
			n1, n2 = 50+r.IntN(500), 1000+r.IntN(4000)
		}
		p1 := r.Float64() * 0.08
		p2 := r.Float64() * 0.08
		if i%3 == 0 {
			p1, p2 = r.Float64(), r.Float64()
		}
		a := binomialDraw(r, n1, p1)
		c := binomialDraw(r, n2, p2)
		ts = append(ts, Table{a, n1 - a, c, n2 - c})
	}
	// Far tails: p-values down to ~1e-30.
	ts = append(ts, Table{60, 1940, 5, 1995}, Table{0, 2000, 60, 1940}, Table{120, 880, 2, 998})
	return ts
}

func binomialDraw(r *rand.Rand, n int, p float64) int {
	k := 0
	for i := 0; i < n; i++ {
		if r.Float64() < p {
			k++
		}
	}
	return k
}

// TestFisherExactAgainstScipy compares every reference table, both
// alternatives, with scipy.stats.fisher_exact (scipy 1.10, Debian's
// /usr/bin/python3) to a relative tolerance of 1e-9 (p-values above 1e-300).
func TestFisherExactAgainstScipy(t *testing.T) {
	py := needs.PythonModules(t, "scipy")
	tables := referenceTables()
	var in bytes.Buffer
	for _, tb := range tables {
		fmt.Fprintf(&in, "%d %d %d %d\n", tb.A, tb.B, tb.C, tb.D)
	}
	script := `
import sys
from scipy.stats import fisher_exact
for line in sys.stdin:
    a, b, c, d = map(int, line.split())
    g = fisher_exact([[a, b], [c, d]], alternative='greater')[1]
    l = fisher_exact([[a, b], [c, d]], alternative='less')[1]
    print(repr(float(g)), repr(float(l)))
`
	cmd := exec.Command(py, "-c", script)
	cmd.Stdin = &in
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("scipy reference failed: %v\n%s", err, stderr.String())
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) != len(tables) {
		t.Fatalf("scipy returned %d lines for %d tables", len(lines), len(tables))
	}
	const relTol = 1e-9
	checked, worst := 0, 0.0
	for i, line := range lines {
		f := strings.Fields(line)
		for j, alt := range []Alternative{Greater, Less} {
			want, err := strconv.ParseFloat(f[j], 64)
			if err != nil {
				t.Fatalf("line %d: %v", i+1, err)
			}
			got, err := FisherExact(tables[i], alt)
			if err != nil {
				t.Fatalf("%v: %v", tables[i], err)
			}
			if want < 1e-300 {
				if got > 1e-290 {
					t.Errorf("%v %v: got %g, scipy %g", tables[i], alt, got, want)
				}
				continue
			}
			if math.Abs(got-want) > relTol*want {
				t.Errorf("FisherExact(%v, %v) = %.15g, scipy.stats.fisher_exact = %.15g (rel diff %.2g)", tables[i], alt, got, want, math.Abs(got-want)/want)
			}
			worst = math.Max(worst, math.Abs(got-want)/want)
			worst = math.Max(worst, math.Abs(got-want)/want)
			checked++
		}
	}
	t.Logf("%d p-values agree with scipy.stats.fisher_exact within %g relative (worst %.2g)", checked, relTol, worst)
}

// TestFisherExactAgainstExactArithmetic compares every reference table,
// both alternatives, with the hypergeometric tail summed in exact rational
// arithmetic (Python's fractions and math.comb, Debian's /usr/bin/python3)
// and rounded once to a float64, to a relative tolerance of 1e-13: the
// tails are accurate to a few units in the last place, where the older
// log-gamma sum was off by up to about 1e-12.
func TestFisherExactAgainstExactArithmetic(t *testing.T) {
	py := needs.PythonModules(t)
	tables := referenceTables()
	var in bytes.Buffer
	for _, tb := range tables {
		fmt.Fprintf(&in, "%d %d %d %d\n", tb.A, tb.B, tb.C, tb.D)
	}
	script := `
import sys
from fractions import Fraction
from math import comb
for line in sys.stdin:
    a, b, c, d = map(int, line.split())
    n, k, N = a + b, a + c, a + b + c + d
    lo, hi = max(0, n + k - N), min(n, k)
    terms, t = [], comb(k, lo) * comb(N - k, n - lo)  # C(k, j)·C(N−k, n−j), j = lo … hi
    for j in range(lo, hi + 1):
        terms.append(t)
        t = t * (k - j) * (n - j) // ((j + 1) * (N - k - n + j + 1))
    den = sum(terms)  # = C(N, n)
    g = Fraction(sum(terms[a - lo:]), den)
    l = Fraction(sum(terms[:a - lo + 1]), den)
    print(repr(float(g)), repr(float(l)))
`
	cmd := exec.Command(py, "-c", script)
	cmd.Stdin = &in
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("exact reference failed: %v\n%s", err, stderr.String())
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) != len(tables) {
		t.Fatalf("python returned %d lines for %d tables", len(lines), len(tables))
	}
	const relTol = 1e-13
	worst := 0.0
	for i, line := range lines {
		f := strings.Fields(line)
		for j, alt := range []Alternative{Greater, Less} {
			want, err := strconv.ParseFloat(f[j], 64)
			if err != nil {
				t.Fatalf("line %d: %v", i+1, err)
			}
			got, err := FisherExact(tables[i], alt)
			if err != nil {
				t.Fatalf("%v: %v", tables[i], err)
			}
			if want == 0 {
				if got != 0 {
					t.Errorf("%v %v: got %g, exact 0", tables[i], alt, got)
				}
				continue
			}
			rel := math.Abs(got-want) / want
			if rel > relTol {
				t.Errorf("FisherExact(%v, %v) = %.17g, exact %.17g (rel diff %.2g)", tables[i], alt, got, want, rel)
			}
			worst = math.Max(worst, rel)
		}
	}
	t.Logf("%d tables agree with exact arithmetic within %g relative (worst %.2g)", len(tables), relTol, worst)
}

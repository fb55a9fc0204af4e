package verdict

import (
	"fmt"
	"strings"
	"testing"
)

// TestKornGraubardAgainstR compares the bound with R's survey package:
// svyciprop(method = "beta") on a stratified design with weights N_h/n_h
// and the finite population correction. svyciprop is two-sided, so its
// level is set to 1 − 2α to make its upper end the one-sided bound at
// 1 − α.
func TestKornGraubardAgainstR(t *testing.T) {
	type kgCase struct {
		N     []int64
		n, x  []int
		alpha float64
	}
	cases := []kgCase{
		{[]int64{5000, 3000, 800, 200}, []int{60, 40, 40, 40}, []int{2, 1, 0, 3}, 0.05},
		{[]int64{5000, 3000, 800, 200}, []int{60, 40, 40, 40}, []int{2, 1, 0, 3}, 0.05 / 3},
		{[]int64{120000, 40000, 9000}, []int{400, 300, 300}, []int{3, 7, 12}, 0.01},
		{[]int64{900, 100}, []int{30, 30}, []int{0, 1}, 0.1},
		{[]int64{2000, 2000, 50}, []int{100, 20, 50}, []int{5, 4, 2}, 0.001},
	}
	var r strings.Builder
	r.WriteString("suppressMessages(library(survey)); out <- c()\n")
	for _, c := range cases {
		fmt.Fprintf(&r, "N <- c(%s); n <- c(%s); x <- c(%s); a <- %s\n", join(c.N), join(c.n), join(c.x), pyFloat(c.alpha))
		r.WriteString(`h <- rep(seq_along(n), n)
y <- unlist(lapply(seq_along(n), function(i) c(rep(1,x[i]), rep(0,n[i]-x[i]))))
d <- data.frame(h=h, y=y, w=(N/n)[h], fpc=N[h])
des <- svydesign(ids=~1, strata=~h, weights=~w, fpc=~fpc, data=d)
ci <- svyciprop(~y, des, method="beta", level=1-2*a)
out <- c(out, sprintf("[%.17g, %.17g]", as.numeric(ci), attr(ci, "ci")[2]))
`)
	}
	r.WriteString(`cat("[", paste(out, collapse=","), "]\n")`)
	var want [][2]float64
	rscript(t, r.String(), &want)
	for i, c := range cases {
		d := Design{}
		for h := range c.N {
			d.Strata = append(d.Strata, Stratum{Label: fmt.Sprint(h), Population: c.N[h], Sample: c.n[h]})
		}
		e, err := d.Stratified(c.x)
		if err != nil {
			t.Fatal(err)
		}
		got := KornGraubardUpper(e, d.SampleSize(), 1-c.alpha)
		// R's survey 4.1 svyciprop(method = "beta"); tolerance 1e-9
		// relative (both invert the same regularized incomplete beta).
		if !close(e.Rate, want[i][0], 1e-12) || !close(got, want[i][1], 1e-9) {
			t.Errorf("case %d: estimate %.17g bound %.17g; R svyciprop %.17g %.17g", i, e.Rate, got, want[i][0], want[i][1])
		}
	}
}

func join[T any](v []T) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = fmt.Sprint(x)
	}
	return strings.Join(s, ",")
}

// TestKornGraubardNoVariance: with no errors anywhere the variance is 0 and
// n* falls back to n (Korn & Graubard's convention for p̂ = 0; svyciprop
// gives NaN), so the bound is the Clopper–Pearson bound for 0 in n shrunk
// only by the t adjustment — at most the Clopper–Pearson bound for 0 errors
// in n − H + 1 and at least the one in n.
func TestKornGraubardNoVariance(t *testing.T) {
	d := Design{Strata: []Stratum{{"a", 1000, 50}, {"b", 100, 50}}}
	e, _ := d.Stratified([]int{0, 0})
	got := KornGraubardUpper(e, 100, 0.95)
	lo := 1 - pow(0.05, 1.0/100) // CP upper for x = 0: 1 − α^(1/n), closed form
	hi := 1 - pow(0.05, 1.0/99)
	if !(got >= lo*(1-1e-12) && got <= hi*(1+1e-12)) {
		t.Errorf("bound %v outside [%v, %v]", got, lo, hi)
	}
}

// TestKornGraubardZeroErrorsWithSingletonStratum: a stratum of one item
// gets the conservative s_h² = 1/4, so v̂ > 0 even with no error at all;
// p̂ = 0 still takes n* = n, not 0 (which would give the useless bound 1).
func TestKornGraubardZeroErrorsWithSingletonStratum(t *testing.T) {
	d := Design{Strata: []Stratum{{"a", 5000, 99}, {"b", 10, 1}}}
	e, _ := d.Stratified([]int{0, 0})
	if !(e.Variance > 0) {
		t.Fatalf("variance %v", e.Variance)
	}
	if got := KornGraubardUpper(e, 100, 0.95); !(got < 0.05) {
		t.Errorf("bound %v for 0 errors in 100", got)
	}
}

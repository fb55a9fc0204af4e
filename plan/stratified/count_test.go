package stratified

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os/exec"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/testkit/needs"
)

// runScipy runs a Python program with Debian's interpreter, feeding it in
// as JSON and decoding its JSON output. Without scipy the test fails in CI
// (CI set) and is skipped elsewhere.
func runScipy(t *testing.T, program string, in, out any) {
	t.Helper()
	debianPython := needs.PythonModules(t, "scipy")
	data, err := json.Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(debianPython, "-c", program)
	cmd.Stdin = bytes.NewReader(data)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("python reference failed: %v\n%s", err, stderr.String())
	}
	if err := json.Unmarshal(stdout.Bytes(), out); err != nil {
		t.Fatalf("decoding python output: %v\n%s", err, stdout.String())
	}
}

// The worked example: 100 000 decisions in four strata with shares
// 0.45/0.35/0.18/0.02, the 1271 labels of the simple-random-sample plan
// for a 2 % ceiling at 95 % (binomial, c = 17) allocated in proportion
// with rounding, which gives the 2 % stratum 25 items where its share is
// 25.42.
func workedExample(t *testing.T) *CountRule {
	t.Helper()
	N := []int64{45000, 35000, 18000, 2000}
	d := design(N, allocate(N, 1271, proportional, nil))
	r, err := NewCountRule(d, nil, 0.02, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestWorkedExampleScipy recomputes the worked example's rule
// independently in Python: the least favourable mean by filling the strata
// in order of n_h/N_h, the acceptance number from scipy.stats.binom.cdf,
// and the exact acceptance probability at 1 % errors per stratum by
// convolving scipy.stats.hypergeom.pmf. Tolerances: μ* 1e-12 relative, c
// exact, probabilities 1e-10 absolute.
func TestWorkedExampleScipy(t *testing.T) {
	r := workedExample(t)
	ant := []int64{450, 350, 180, 20}
	p, err := r.AcceptProbability(ant)
	if err != nil {
		t.Fatal(err)
	}
	in := map[string]any{"N": []int64{45000, 35000, 18000, 2000}, "n": sampleSizes(r.Design), "D": 2000, "alpha": 0.05, "ant": ant}
	const program = `
import json, sys, math
import numpy as np
from scipy import stats
a = json.load(sys.stdin)
N, n, D, alpha = a["N"], a["n"], a["D"], a["alpha"]
order = sorted(range(len(N)), key=lambda h: n[h] / N[h])
mu, rest = 0.0, D
for h in order:
    d = min(rest, N[h]); mu += n[h] * d / N[h]; rest -= d
m = sum(n)
c = math.floor(mu - 1)
while c >= 0 and stats.binom.cdf(c, m, mu / m) > alpha:
    c -= 1
dist = np.array([1.0])
for h in range(len(N)):
    dist = np.convolve(dist, stats.hypergeom.pmf(np.arange(n[h] + 1), N[h], a["ant"][h], n[h]))
print(json.dumps({"mu": mu, "c": c, "tail": stats.binom.cdf(c, m, mu / m),
                  "next": stats.binom.cdf(c + 1, m, mu / m), "accept": dist[:c + 1].sum()}))
`
	var want struct {
		Mu, Tail, Next, Accept float64
		C                      int
	}
	runScipy(t, program, in, &want)
	if math.Abs(r.LeastMean-want.Mu) > 1e-12*want.Mu {
		t.Errorf("μ* = %.15g, scipy reference %.15g", r.LeastMean, want.Mu)
	}
	if r.Accept != want.C {
		t.Errorf("c = %d, scipy reference %d", r.Accept, want.C)
	}
	m := r.CountedSize()
	if got := tailBound(r.Accept, m, r.LeastMean); math.Abs(got-want.Tail) > 1e-10 {
		t.Errorf("P(Bin ≤ c) = %.12g, scipy %.12g", got, want.Tail)
	}
	if math.Abs(p-want.Accept) > 1e-10 {
		t.Errorf("P(accept | 1 %% errors) = %.12g, scipy %.12g", p, want.Accept)
	}
	t.Logf("worked example: n_h %v, μ* = %.6g (the simple random sample's n·D*/N = %.6g), c = %d, P(accept at 1 %%) = %.4f",
		sampleSizes(r.Design), r.LeastMean, 1271*0.02, r.Accept, p)
}

func sampleSizes(d Design) []int {
	out := make([]int, len(d.Strata))
	for h, s := range d.Strata {
		out[h] = s.Sample
	}
	return out
}

// TestExactlyProportionalIsTheBinomialRule: with exact proportional
// allocation the least favourable mean is n·D*/N and the rule's c is the
// binomial plan's c (plan.BinomialCDF, the simple random sample's rule).
func TestExactlyProportionalIsTheBinomialRule(t *testing.T) {
	for _, tc := range []struct {
		N       []int64
		n       []int
		ceiling float64
	}{
		{[]int64{40000, 30000, 20000, 10000}, []int{400, 300, 200, 100}, 0.02},
		{[]int64{5000, 5000}, []int{250, 250}, 0.05},
		{[]int64{900, 600, 300}, []int{90, 60, 30}, 0.1},
	} {
		d := design(tc.N, tc.n)
		r, err := NewCountRule(d, nil, tc.ceiling, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		n := d.SampleSize()
		if want := float64(n) * float64(d.BadLotErrors(tc.ceiling)) / float64(d.Population()); math.Abs(r.LeastMean-want) > 1e-9 {
			t.Errorf("%v: μ* = %v, want n·D*/N = %v", tc.n, r.LeastMean, want)
		}
		c := -1
		for plan.BinomialCDF(c+1, n, tc.ceiling) <= 0.05 {
			c++
		}
		if r.Accept != c {
			t.Errorf("%v: c = %d, the binomial plan's c = %d", tc.n, r.Accept, c)
		}
		if ok, why := SimpleRandomShortcut(d, n, c, tc.ceiling, 0.95); !ok {
			t.Errorf("%v: shortcut refused: %s", tc.n, why)
		}
	}
}

// TestJudgeConsistency: over every count of errors, the decision, the
// p-value and the upper bound tell the same story, and none of them moves
// the wrong way as errors grow.
func TestJudgeConsistency(t *testing.T) {
	for _, r := range []*CountRule{workedExample(t), mustRule(t, design([]int64{500, 300, 40}, []int{20, 20, 0}), nil, 0.1, 0.9)} {
		alpha := 1 - r.Confidence
		prevP, prevU := -1.0, int64(-1)
		for s := 0; s <= min(r.CountedSize(), r.Accept+40); s++ {
			errs := make([]int, len(r.Counted))
			rest := s
			for h := range errs {
				errs[h] = min(rest, r.Counted[h])
				rest -= errs[h]
			}
			v, err := r.Judge(errs)
			if err != nil {
				t.Fatal(err)
			}
			if v.Accepted != (v.PValue <= alpha) || v.Accepted != (v.UpperErrors < r.BadLot) || v.Accepted != (s <= r.Accept) {
				t.Fatalf("s = %d: accepted %v, p %v, D_U %d (D* %d), c %d", s, v.Accepted, v.PValue, v.UpperErrors, r.BadLot, r.Accept)
			}
			if v.PValue < prevP || v.UpperErrors < prevU {
				t.Fatalf("s = %d: p-value %v or upper %d fell with more errors (%v, %d)", s, v.PValue, v.UpperErrors, prevP, prevU)
			}
			prevP, prevU = v.PValue, v.UpperErrors
		}
	}
}

func mustRule(t *testing.T, d Design, counted []int, ceiling, conf float64) *CountRule {
	t.Helper()
	r, err := NewCountRule(d, counted, ceiling, conf)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestEmptyStratumIsUnknown: a stratum without items can hold all of its
// decisions as errors; the bound never falls below its share, and a
// ceiling below that share can never be accepted.
func TestEmptyStratumIsUnknown(t *testing.T) {
	d := design([]int64{9000, 900, 100}, []int{400, 40, 0})
	r := mustRule(t, d, nil, 0.005, 0.95)
	if r.Accept != -1 {
		t.Errorf("ceiling 0.5 %% with an empty stratum of 1 %%: c = %d, want −1 (never accept)", r.Accept)
	}
	v, err := r.Judge([]int{0, 0, 0})
	if err != nil {
		t.Fatal(err)
	}
	if v.UpperErrors < 100 {
		t.Errorf("upper bound %d errors is below the empty stratum's 100 decisions", v.UpperErrors)
	}
	r = mustRule(t, d, nil, 0.05, 0.95)
	if r.Spread[2] != 100 {
		t.Errorf("least favourable spread %v does not fill the empty stratum first", r.Spread)
	}
}

// TestSimpleRandomShortcut names why a design does not qualify.
func TestSimpleRandomShortcut(t *testing.T) {
	N := []int64{45000, 35000, 18000, 2000}
	for _, tc := range []struct {
		name    string
		n       []int
		c       int
		ok      bool
		because string
	}{
		{"exact proportion", []int{450, 350, 180, 20}, 12, true, "exactly proportional"},
		{"rounded share", []int{572, 445, 229, 25}, 17, false, `stratum "s1" has 572 items where exact proportion needs 571.95`},
		{"empty stratum", []int{459, 357, 184, 0}, 12, false, `stratum "s1" has 459 items where exact proportion needs 450`},
		{"minimum per stratum", []int{441, 343, 176, 40}, 12, false, `stratum "s1" has 441 items`},
		{"c beyond the risk", []int{450, 350, 180, 20}, 13, false, "P(Bin(1000, D*/N) ≤ 13) = 0.06423"}, // scipy.stats.binom.cdf(13, 1000, 0.02) = 0.064226
		{"c beyond the theorem", []int{450, 350, 180, 20}, 20, false, "allows c = 20 errors but the binomial comparison needs c ≤ n·D*/N − 1 = 19"},
		{"wrong n", []int{450, 350, 180, 20}, 12, false, "not the plan's n = 999"},
	} {
		n := 0
		for _, v := range tc.n {
			n += v
		}
		if tc.name == "wrong n" {
			n = 999
		}
		ok, why := SimpleRandomShortcut(design(N, tc.n), n, tc.c, 0.02, 0.95)
		if ok != tc.ok || !strings.Contains(why, tc.because) {
			t.Errorf("%s: got (%v, %q), want (%v, …%q…)", tc.name, ok, why, tc.ok, tc.because)
		}
	}
}

// TestProportionalCounts thins to the reference stratum's fraction.
func TestProportionalCounts(t *testing.T) {
	d := design([]int64{1000, 500, 100, 7}, []int{20, 20, 20, 7})
	got := ProportionalCounts(d, 0) // f = 0.02: ⌈0.02·N_h⌉
	want := []int{20, 10, 2, 1}
	for h := range want {
		if got[h] != want[h] {
			t.Fatalf("ProportionalCounts = %v, want %v", got, want)
		}
	}
}

// TestRuleErrors: bad inputs are errors that wrap ErrDesign or ErrRule.
func TestRuleErrors(t *testing.T) {
	d := design([]int64{100, 50}, []int{10, 5})
	for _, tc := range []struct {
		d       Design
		counted []int
		ceil    float64
		conf    float64
		want    error
	}{
		{Design{}, nil, 0.1, 0.9, ErrDesign},
		{design([]int64{10}, []int{11}), nil, 0.1, 0.9, ErrDesign},
		{design([]int64{0}, []int{0}), nil, 0.1, 0.9, ErrDesign},
		{d, nil, 0, 0.9, ErrRule},
		{d, nil, 0.1, 1, ErrRule},
		{d, []int{10}, 0.1, 0.9, ErrRule},
		{d, []int{11, 5}, 0.1, 0.9, ErrRule},
	} {
		if _, err := NewCountRule(tc.d, tc.counted, tc.ceil, tc.conf); !errors.Is(err, tc.want) {
			t.Errorf("NewCountRule(%+v, %v, %v, %v) = %v, want %v", tc.d, tc.counted, tc.ceil, tc.conf, err, tc.want)
		}
	}
	r := mustRule(t, d, []int{8, 5}, 0.1, 0.9)
	for _, errs := range [][]int{{1}, {9, 0}, {-1, 0}} {
		if _, err := r.Judge(errs); !errors.Is(err, ErrDesign) {
			t.Errorf("Judge(%v) = %v, want ErrDesign", errs, err)
		}
	}
	if _, err := r.AcceptProbability([]int64{101, 0}); !errors.Is(err, ErrDesign) {
		t.Errorf("AcceptProbability beyond N_h: %v", err)
	}
}

package plan

import (
	"math"
	"math/rand/v2"
	"testing"
)

type tailCase struct {
	K   int     `json:"k"`
	N   int     `json:"n"`
	P   float64 `json:"p"`
	Pop int64   `json:"pop"`
	D   int64   `json:"d"`
}

type tailRef struct {
	CDF float64 `json:"cdf"`
	SF  float64 `json:"sf"`
}

// relErr is |got − want| / |want| (absolute when want is 0).
func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// tailOK applies the accuracy requirement: relative error ≤ 1e-9 for
// reference values ≥ 1e-12; below that (not required) ≤ 1e-6 down to 1e-250.
func tailOK(got, want float64) bool {
	tol := 1e-9
	if want < 1e-12 {
		if want < 1e-250 {
			return true
		}
		tol = 1e-6
	}
	return relErr(got, want) <= tol
}

// exactTailProgram computes binomial or hypergeometric lower and upper tails
// in 50-digit decimal arithmetic from exact integer binomial coefficients
// (Python's math.comb and decimal; no approximation beyond the 50 digits).
// It arbitrates the cases where scipy and probity differ by more than the
// tolerance: scipy.stats.hypergeom.cdf is itself off by ~1e-9 at lots of
// millions.
const exactTailProgram = `
import json, math, sys
from decimal import Decimal as D, getcontext
getcontext().prec = 50
def lower_sum(pk, ratio, x):
    s = D(0); t = pk
    while x >= 0 and t > s * D(10) ** -45:
        s += t; t = t * ratio(x); x -= 1
    return s
out = []
for c in json.load(sys.stdin):
    k, n = c["k"], c["n"]
    if c["pop"]:
        M, d = c["pop"], c["d"]
        pk = D(math.comb(d, k) * math.comb(M - d, n - k)) / D(math.comb(M, n))
        cdf = lower_sum(pk, lambda x: D(x) * D(M - d - n + x) / (D(n + 1 - x) * D(d + 1 - x)), k)
    else:
        p = D(c["p"]); q = 1 - p
        pk = D(math.comb(n, k)) * p ** k * q ** (n - k)
        cdf = lower_sum(pk, lambda x: D(x) / D(n - x + 1) * q / p, k)
    out.append({"cdf": float(cdf), "sf": float(1 - cdf)})
json.dump(out, sys.stdout)
`

// checkTails compares probity's tails with scipy's; where they disagree it
// asks exactTailProgram and requires agreement with that instead.
func checkTails(t *testing.T, what string, cases []tailCase, refs []tailRef, cdf, sf func(tailCase) float64) {
	t.Helper()
	var disputed []tailCase
	for i, c := range cases {
		if !tailOK(cdf(c), refs[i].CDF) || !tailOK(sf(c), refs[i].SF) {
			disputed = append(disputed, c)
		}
	}
	if len(disputed) == 0 {
		return
	}
	var exact []tailRef
	runScipy(t, exactTailProgram, disputed, &exact)
	for i, c := range disputed {
		t.Logf("%s%+v: scipy and probity differ; exact arithmetic gives CDF %.17g", what, c, exact[i].CDF)
		if got := cdf(c); !tailOK(got, exact[i].CDF) {
			t.Errorf("%s CDF%+v = %.17g, exact %.17g (relative error %.3g)", what, c, got, exact[i].CDF, relErr(got, exact[i].CDF))
		}
		// The exact SF is 1 − CDF in 50 digits, meaningful down to ~1e-40.
		if got := sf(c); !tailOK(got, exact[i].SF) {
			t.Errorf("%s SF%+v = %.17g, exact %.17g (relative error %.3g)", what, c, got, exact[i].SF, relErr(got, exact[i].SF))
		}
	}
}

// Reference: scipy.stats.binom.cdf / binom.sf (scipy 1.10, Debian bookworm),
// arbitrated by exact decimal arithmetic where they disagree.
func TestBinomialTailsAgainstScipy(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var cases []tailCase
	for i := 0; i < 600; i++ {
		n := 1 + rng.IntN(10)
		switch i % 3 {
		case 1:
			n = 1 + rng.IntN(5000)
		case 2:
			n = 1 + rng.IntN(2_000_000)
		}
		p := math.Pow(10, -5*rng.Float64()) // 1e-5 … 1
		if p >= 1 {
			p = 0.5
		}
		mean := float64(n) * p
		sd := math.Sqrt(mean*(1-p)) + 1
		k := int(math.Round(mean + sd*(rng.Float64()*16-8)))
		if k < 0 {
			k = rng.IntN(3)
		}
		if k >= n {
			k = n - 1
		}
		cases = append(cases, tailCase{K: k, N: n, P: p})
	}
	var refs []tailRef
	runScipy(t, `
import json, sys
from scipy.stats import binom
out = [{"cdf": float(binom.cdf(c["k"], c["n"], c["p"])), "sf": float(binom.sf(c["k"], c["n"], c["p"]))} for c in json.load(sys.stdin)]
json.dump(out, sys.stdout)
`, cases, &refs)
	checkTails(t, "Binomial", cases, refs,
		func(c tailCase) float64 { return BinomialCDF(c.K, c.N, c.P) },
		func(c tailCase) float64 { return BinomialSF(c.K, c.N, c.P) })
}

// Reference: scipy.stats.hypergeom.cdf / hypergeom.sf (scipy 1.10), arbitrated
// by exact decimal arithmetic where they disagree, with
// scipy's argument order (k, M=population, n=defects, N=sample).
func TestHypergeometricTailsAgainstScipy(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	var cases []tailCase
	for i := 0; i < 600; i++ {
		pop := int64(1 + rng.IntN(50))
		switch i % 3 {
		case 1:
			pop = int64(1 + rng.IntN(20000))
		case 2:
			pop = int64(1 + rng.IntN(5_000_000))
		}
		d := int64(float64(pop) * math.Pow(10, -4*rng.Float64()))
		n := 1 + rng.IntN(int(min(pop, 40000)))
		mean := float64(n) * float64(d) / float64(pop)
		sd := math.Sqrt(mean) + 1
		k := int(math.Round(mean + sd*(rng.Float64()*16-8)))
		lo := max(0, n-int(pop-d))
		hi := min(int64(n), d)
		if k < lo {
			k = lo
		}
		if int64(k) > hi {
			k = int(hi)
		}
		cases = append(cases, tailCase{K: k, N: n, Pop: pop, D: d})
	}
	var refs []tailRef
	runScipy(t, `
import json, sys
from scipy.stats import hypergeom
out = []
for c in json.load(sys.stdin):
    out.append({"cdf": float(hypergeom.cdf(c["k"], c["pop"], c["d"], c["n"])), "sf": float(hypergeom.sf(c["k"], c["pop"], c["d"], c["n"]))})
json.dump(out, sys.stdout)
`, cases, &refs)
	checkTails(t, "Hypergeometric", cases, refs,
		func(c tailCase) float64 { return HypergeometricCDF(c.K, c.Pop, c.D, c.N) },
		func(c tailCase) float64 { return HypergeometricSF(c.K, c.Pop, c.D, c.N) })
}

func TestTailEdges(t *testing.T) {
	// Definitions at the edges (common practice, no source).
	for _, tc := range []struct {
		name      string
		got, want float64
	}{
		{"BinomialCDF k<0", BinomialCDF(-1, 10, 0.3), 0},
		{"BinomialCDF k>=n", BinomialCDF(10, 10, 0.3), 1},
		{"BinomialSF k<0", BinomialSF(-1, 10, 0.3), 1},
		{"BinomialSF k>=n", BinomialSF(10, 10, 0.3), 0},
		{"BinomialCDF p=0", BinomialCDF(0, 10, 0), 1},
		{"BinomialCDF p=1", BinomialCDF(9, 10, 1), 0},
		{"HypergeometricCDF all drawn", HypergeometricCDF(4, 10, 5, 10), 0},
		{"HypergeometricCDF all drawn, k=D", HypergeometricCDF(5, 10, 5, 10), 1},
		{"HypergeometricSF no defects", HypergeometricSF(0, 10, 0, 7), 0},
		{"BinomialPMF(0; 3, 0.5)", BinomialPMF(0, 3, 0.5), 0.125},
	} {
		if math.Abs(tc.got-tc.want) > 1e-15 {
			t.Errorf("%s = %v, want %v", tc.name, tc.got, tc.want)
		}
	}
	for _, v := range []float64{BinomialCDF(1, -1, 0.5), BinomialSF(1, 5, 1.5), HypergeometricCDF(1, 10, 11, 3), HypergeometricSF(1, 10, 3, 11)} {
		if !math.IsNaN(v) {
			t.Errorf("out-of-domain call returned %v, want NaN", v)
		}
	}
}

// The CDF and SF of the same point add to one (identity, no source).
func TestTailsComplement(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for i := 0; i < 2000; i++ {
		n := 1 + rng.IntN(3000)
		k := rng.IntN(n)
		p := rng.Float64()
		if s := BinomialCDF(k, n, p) + BinomialSF(k, n, p); math.Abs(s-1) > 1e-12 {
			t.Fatalf("binomial n=%d k=%d p=%v: CDF+SF = %v", n, k, p, s)
		}
		pop := int64(n + rng.IntN(3000))
		d := rng.Int64N(pop + 1)
		if s := HypergeometricCDF(k, pop, d, n) + HypergeometricSF(k, pop, d, n); math.Abs(s-1) > 1e-12 {
			t.Fatalf("hypergeometric N=%d D=%d n=%d k=%d: CDF+SF = %v", pop, d, n, k, s)
		}
	}
}

package sequential

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Published worked examples of Wald's item-by-item sequential plan.
// Numbers are given to the precision the sources print them.
var waldExamples = []struct {
	source              string
	p0, p1, alpha, beta float64
	h1, h2, s           float64
	tolH, tolS          float64
	// rows of the source's item-by-item table: n, acceptance number
	// (−1 for "N/A") and rejection number (0 for "N/A"); empty when the
	// source's table is not remembered
	rows [][3]int
}{
	{
		// NIST/SEMATECH e-Handbook of Statistical Methods, §6.2.6 "What is
		// Sequential Sampling?": AQL p1 = 0.01 (α = 0.05), LTPD p2 = 0.10
		// (β = 0.10); acceptance line −0.939 + 0.0397n, rejection line
		// 1.205 + 0.0397n, and the item-by-item table starting "1 N/A
		// N/A", "2 N/A 2" with the first acceptance at "24 0 3". From
		// memory of that page.
		source: "NIST/SEMATECH e-Handbook §6.2.6 (from memory)",
		p0:     0.01, p1: 0.10, alpha: 0.05, beta: 0.10,
		h1: 0.939, h2: 1.205, s: 0.0397, tolH: 0.0006, tolS: 0.00006,
		rows: [][3]int{{1, -1, 0}, {2, -1, 2}, {23, -1, 3}, {24, 0, 3}},
	},
	{
		// Montgomery, Introduction to Statistical Quality Control,
		// chapter on acceptance sampling for attributes, item-by-item
		// sequential example with p1 = 0.01, α = 0.05, p2 = 0.06,
		// β = 0.10: h1 = 1.22, h2 = 1.57, s = 0.028 (from memory).
		source: "Montgomery, Introduction to SQC, sequential example (from memory)",
		p0:     0.01, p1: 0.06, alpha: 0.05, beta: 0.10,
		h1: 1.22, h2: 1.57, s: 0.028, tolH: 0.006, tolS: 0.0006,
	},
}

func TestWaldLinesPublishedExamples(t *testing.T) {
	for _, ex := range waldExamples {
		l, err := WaldLines(ex.p0, ex.p1, ex.alpha, ex.beta)
		if err != nil {
			t.Fatalf("%s: %v", ex.source, err)
		}
		if math.Abs(l.HAccept-ex.h1) > ex.tolH || math.Abs(l.HReject-ex.h2) > ex.tolH || math.Abs(l.Slope-ex.s) > ex.tolS {
			t.Errorf("%s: h1 = %.4f, h2 = %.4f, s = %.5f; want %v, %v, %v", ex.source, l.HAccept, l.HReject, l.Slope, ex.h1, ex.h2, ex.s)
		}
		for _, row := range ex.rows {
			n := float64(row[0])
			acc := int(math.Floor(l.Slope*n - l.HAccept))
			if acc < 0 {
				acc = -1
			}
			rej := int(math.Ceil(l.Slope*n + l.HReject))
			if rej > row[0] {
				rej = 0
			}
			if acc != row[1] || rej != row[2] {
				t.Errorf("%s: n = %d: accept %d, reject %d; table says %d, %d", ex.source, row[0], acc, rej, row[1], row[2])
			}
		}
	}
}

// Wald's OC and ASN approximations at their three closed-form points
// (Wald 1947, §5.3–5.4): L(p0) = 1 − α, L(p1) = β, L(s) = h2/(h1 + h2);
// E_{p0}N = [(1 − α)h1 − αh2]/(s − p0), E_{p1}N = [(1 − β)h2 − βh1]/(p1 − s),
// E_sN = h1h2/(s(1 − s)). For the Montgomery example these give
// E_{p0}N ≈ 59.7 and E_{p1}N ≈ 40.4 (computed here from the closed forms;
// no published ASN figure to hand, so they are a regression guard).
func TestWaldApproximationsClosedForms(t *testing.T) {
	for _, ex := range waldExamples {
		l, _ := WaldLines(ex.p0, ex.p1, ex.alpha, ex.beta)
		checks := []struct {
			name      string
			got, want float64
		}{
			{"L(p0)", l.OC(ex.p0), 1 - ex.alpha},
			{"L(p1)", l.OC(ex.p1), ex.beta},
			{"L(s)", l.OC(l.Slope), l.HReject / (l.HAccept + l.HReject)},
			{"ASN(p0)", l.ASN(ex.p0), ((1-ex.alpha)*l.HAccept - ex.alpha*l.HReject) / (l.Slope - ex.p0)},
			{"ASN(p1)", l.ASN(ex.p1), ((1-ex.beta)*l.HReject - ex.beta*l.HAccept) / (ex.p1 - l.Slope)},
			{"ASN(s)", l.ASN(l.Slope), l.HAccept * l.HReject / (l.Slope * (1 - l.Slope))},
		}
		for _, c := range checks {
			if math.Abs(c.got-c.want) > 1e-7*math.Max(1, math.Abs(c.want)) {
				t.Errorf("%s: %s = %.9g, want %.9g", ex.source, c.name, c.got, c.want)
			}
		}
		// OC is continuous through s and decreasing
		prev := 1.0
		for p := 0.001; p < 0.2; p += 0.001 {
			v := l.OC(p)
			if v > prev+1e-9 {
				t.Fatalf("%s: OC rises at p = %v", ex.source, p)
			}
			prev = v
		}
	}
	l, _ := WaldLines(0.01, 0.06, 0.05, 0.10)
	if a0, a1 := l.ASN(0.01), l.ASN(0.06); math.Abs(a0-59.73) > 0.01 || math.Abs(a1-40.42) > 0.01 {
		t.Errorf("Montgomery example ASN = %.2f, %.2f; want 59.73, 40.42", a0, a1)
	}
}

// The untruncated SPRT simulated (100 000 runs per point, fixed seed):
// Wald's approximations neglect the overshoot of the boundaries, so the
// actual risks are at most α and β and the actual ASN lies between Wald's
// value and the value with both intercepts one error wider (an overshoot
// is under one error; common practice, no source). Tolerances: 4.5
// standard errors. The same lines truncated far out (T = 4000, where the
// running mass is below 1e-15) are evaluated exactly by the dynamic
// programme, which must agree with the simulation within 4.5 standard
// errors too.
func TestWaldApproximationsMonteCarlo(t *testing.T) {
	l, _ := WaldLines(0.01, 0.06, 0.05, 0.10)
	wide := l
	wide.HAccept++
	wide.HReject++
	long := lineBounds(4000, int(math.Ceil(l.Slope*4000+l.HReject))-1, l.Slope, l.HAccept, l.HReject)
	rng := rand.New(rand.NewPCG(8, 3))
	const runs = 100_000
	for _, pt := range []struct {
		p      float64
		maxAcc float64 // bound on P(accept), or −1
		maxRej float64
	}{
		{0.01, -1, 0.05},
		{0.06, 0.10, -1},
	} {
		acc, sumN, sumN2 := 0, 0.0, 0.0
		for i := 0; i < runs; i++ {
			e := 0
			for n := 1; ; n++ {
				if rng.Float64() < pt.p {
					e++
				}
				st := l.Slope * float64(n)
				if float64(e) <= st-l.HAccept {
					acc++
					sumN += float64(n)
					sumN2 += float64(n * n)
					break
				}
				if float64(e) >= st+l.HReject {
					sumN += float64(n)
					sumN2 += float64(n * n)
					break
				}
			}
		}
		pa := float64(acc) / runs
		se := math.Sqrt(pa * (1 - pa) / runs)
		if pt.maxAcc >= 0 && pa > pt.maxAcc+4.5*se {
			t.Errorf("p = %v: P(accept) = %.4f above β = %v", pt.p, pa, pt.maxAcc)
		}
		if pt.maxRej >= 0 && 1-pa > pt.maxRej+4.5*se {
			t.Errorf("p = %v: P(reject) = %.4f above α = %v", pt.p, 1-pa, pt.maxRej)
		}
		asn := sumN / runs
		seN := math.Sqrt((sumN2/runs - asn*asn) / runs)
		if lo, hi := l.ASN(pt.p), wide.ASN(pt.p); asn < lo-4.5*seN || asn > hi+4.5*seN {
			t.Errorf("p = %v: simulated ASN %.2f outside [Wald %.2f, widened %.2f]", pt.p, asn, lo, hi)
		}
		exact := long.evaluate(Binomial{P: pt.p})
		if math.Abs(exact.Accept-pa) > 4.5*se || math.Abs(exact.ASN-asn) > 4.5*seN {
			t.Errorf("p = %v: DP P(accept) %.5f, ASN %.3f; simulated %.5f ± %.5f, %.3f ± %.3f", pt.p, exact.Accept, exact.ASN, pa, se, asn, seN)
		}
		t.Logf("p = %v: simulated P(accept) %.4f, ASN %.2f; exact DP %.4f, %.2f; Wald %.4f, %.2f",
			pt.p, pa, asn, exact.Accept, exact.ASN, l.OC(pt.p), l.ASN(pt.p))
	}
}

func TestWaldLinesDomain(t *testing.T) {
	bad := [][4]float64{{0, 0.1, 0.05, 0.1}, {0.1, 0.1, 0.05, 0.1}, {0.2, 0.1, 0.05, 0.1}, {0.01, 0.1, 0, 0.1}, {0.01, 0.1, 0.6, 0.5}, {0.01, 1, 0.05, 0.1}}
	for _, b := range bad {
		if _, err := WaldLines(b[0], b[1], b[2], b[3]); err == nil {
			t.Errorf("WaldLines%v: no error", b)
		}
	}
}

package sequential

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// For a fixed plan without curtailment (accept or reject only at t = n)
// the stage-wise p-value is P(X ≤ x | n, p) and the bound is
// Clopper–Pearson's, here from gonum's Beta quantile: the one-sided upper
// bound for x errors in n is the (1 − α) quantile of Beta(x + 1, n − x)
// (Clopper & Pearson, Biometrika 26, 1934). Tolerance 1e-9 relative.
func TestUpperBoundEqualsClopperPearsonAtTruncation(t *testing.T) {
	for _, nc := range [][3]int{{50, 2, 1}, {50, 2, 2}, {50, 2, 3}, {200, 5, 0}, {200, 5, 9}, {1271, 17, 17}} {
		n, c, x := nc[0], nc[1], nc[2]
		r := fixedOnlyAtEnd(n, c)
		d := Accept
		if x > c {
			d = Reject
		}
		ub, err := UpperBound(r, Outcome{T: n, E: x, D: d}, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		want := distuv.Beta{Alpha: float64(x + 1), Beta: float64(n - x)}.Quantile(0.95)
		if math.Abs(ub-want) > 1e-9*want {
			t.Errorf("n %d x %d: bound %.12g, Clopper–Pearson %.12g", n, x, ub, want)
		}
	}
}

// An acceptance of the designed plan has p-value ≤ the consumer's risk
// and an upper bound below the ceiling; an early rejection's bound is
// above the anticipated error.
func TestSequentialBoundAgreesWithDecision(t *testing.T) {
	d, err := Search(Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271})
	if err != nil {
		t.Fatal(err)
	}
	r, _ := NewRule(d.Rule)
	// first acceptance with no error
	at := r.ToAcceptWithoutErrors(0, 0)
	o := Outcome{T: at, E: 0, D: Accept}
	pv, _ := PValue(d.Rule, o, 0.02)
	if pv > d.ConsumerRisk+1e-15 {
		t.Errorf("p-value %v above the consumer's risk %v", pv, d.ConsumerRisk)
	}
	ub, _ := UpperBound(d.Rule, o, 0.95)
	if ub >= 0.02 {
		t.Errorf("accepted at %d with 0 errors: bound %v not below the ceiling", at, ub)
	}
	// every acceptance outcome: bound < ceiling
	for tt := 1; tt <= d.Rule.MaxSampleSize; tt++ {
		a := d.Rule.AcceptIfErrorsAtMost[tt-1]
		if a < 0 {
			continue
		}
		if tt%97 != 0 && tt != d.Rule.MaxSampleSize {
			continue
		}
		ub, err := UpperBound(d.Rule, Outcome{T: tt, E: a, D: Accept}, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if ub >= 0.02 {
			t.Errorf("accept at t %d with %d errors: bound %v ≥ ceiling", tt, a, ub)
		}
	}
	rej := r.ToRejectWithErrors(0, 0)
	ub, _ = UpperBound(d.Rule, Outcome{T: rej, E: rej, D: Reject}, 0.95)
	if ub <= 0.01 {
		t.Errorf("early rejection: bound %v", ub)
	}
	if _, err := UpperBound(d.Rule, Outcome{T: 5, E: 0, D: Accept}, 0.95); err == nil {
		t.Error("impossible outcome accepted")
	}
}

// fixedOnlyAtEnd is the fixed plan (n, c) decided only at t = n.
func fixedOnlyAtEnd(n, c int) *planRule {
	acc := make([]int, n)
	rej := make([]*int, n)
	for i := range acc {
		acc[i] = -1
	}
	acc[n-1] = c
	v := c + 1
	rej[n-1] = &v
	return &planRule{MaxSampleSize: n, AcceptIfErrorsAtMost: acc, RejectIfErrorsAtLeast: rej}
}

// A rule that never stops before t = n (no early boundary at all) has the
// plain binomial OC and ASN = n: the dynamic programme must track every
// count up to n (regression: an array sized by the reject boundary alone
// overflowed here).
func TestEvaluateWithoutEarlyBoundaries(t *testing.T) {
	r := fixedOnlyAtEnd(60, 2)
	perf, err := Evaluate(r, Binomial{P: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	want := distuv.Binomial{N: 60, P: 0.05}.CDF(2)
	if math.Abs(perf.Accept-want) > 1e-12 || math.Abs(perf.ASN-60) > 1e-9 {
		t.Errorf("P(accept) %.15g (want %.15g), ASN %v (want 60)", perf.Accept, want, perf.ASN)
	}
}

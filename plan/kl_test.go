package plan

import (
	"math"
	"testing"
)

// kl(q‖p) reference values computed by hand from the definition
// q ln(q/p) + (1−q) ln((1−q)/(1−p)) (common practice, no source);
// tolerance 1e-12 relative.
func TestBernoulliKL(t *testing.T) {
	for _, tc := range []struct{ q, p, want float64 }{
		{0.01, 0.02, 0.01*math.Log(0.5) + 0.99*math.Log(0.99/0.98)},
		{0, 0.02, -math.Log(0.98)},
		{0.5, 0.5, 0},
		{1, 0.5, math.Log(2)},
	} {
		if got := BernoulliKL(tc.q, tc.p); math.Abs(got-tc.want) > 1e-12*math.Max(tc.want, 1e-300) && got != tc.want {
			t.Errorf("kl(%v‖%v) = %v, want %v", tc.q, tc.p, got, tc.want)
		}
	}
}

// TestBernoulliKLAgainstHighPrecision: kl(q‖p) from its definition in
// 60-digit decimal arithmetic (Python's decimal module, run by Debian's
// python3), tolerance 1e-13 relative, over moderate and small rates; the
// small ones are where the log1p form keeps its digits (the plain
// ln((1−q)/(1−p)) loses about half of them at 1e-7).
func TestBernoulliKLAgainstHighPrecision(t *testing.T) {
	type row struct{ Q, P float64 }
	rows := []row{{0.01, 0.02}, {0.2, 0.1}, {0.05, 0.5}, {0, 0.3}, {1, 0.7}, {0.001, 0.0025}, {3e-7, 1e-6}, {1e-9, 4e-8}, {0, 1e-8}}
	var want []float64
	runScipy(t, `
import json, sys
from decimal import Decimal as D, getcontext
getcontext().prec = 60
def kl(q, p):
    q, p = D(q), D(p)
    s = D(0)
    if q > 0: s += q * (q / p).ln()
    if q < 1: s += (1 - q) * ((1 - q) / (1 - p)).ln()
    return float(s)
print(json.dumps([kl(r["Q"], r["P"]) for r in json.load(sys.stdin)]))`, rows, &want)
	for i, r := range rows {
		got := BernoulliKL(r.Q, r.P)
		if math.Abs(got-want[i]) > 1e-13*want[i] {
			t.Errorf("kl(%v‖%v) = %.17g, 60-digit %.17g (rel %.2g)", r.Q, r.P, got, want[i], (got-want[i])/want[i])
		}
	}
}

package stratified

import (
	"math"
	"testing"
)

// benchDesign is the size the package must judge in well under a second:
// 100 strata, 5 000 000 decisions (so a 2 % ceiling puts D* at 100 000),
// 20 000 labels allocated in proportion with a minimum of 20 per stratum.
// Stratum sizes fall geometrically from about 190 000 to 4 000.
func benchDesign() (Design, []int64) {
	N := make([]int64, 100)
	var total float64
	w := make([]float64, 100)
	for h := range w {
		w[h] = math.Pow(0.962, float64(h))
		total += w[h]
	}
	for h := range N {
		N[h] = int64(5e6 * w[h] / total)
	}
	nh := allocate(N, 20000, withMin(proportional, 20), nil)
	ant := make([]int64, len(N))
	for h := range N {
		ant[h] = N[h] / 100
	}
	return design(N, nh), ant
}

// BenchmarkCountRuleJudge: building the rule and judging one sample
// (decision, p-value, upper bound by bisection over the error count).
func BenchmarkCountRuleJudge(b *testing.B) {
	d, _ := benchDesign()
	errs := make([]int, len(d.Strata))
	for h, s := range d.Strata {
		errs[h] = s.Sample / 100
	}
	for b.Loop() {
		r, err := NewCountRule(d, nil, 0.02, 0.95)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := r.Judge(errs); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkAcceptProbability: the exact operating characteristic at one
// configuration of errors (a convolution of 100 hypergeometric laws).
func BenchmarkAcceptProbability(b *testing.B) {
	d, ant := benchDesign()
	r, err := NewCountRule(d, nil, 0.02, 0.95)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := r.AcceptProbability(ant); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCountedForPower: choosing the counted sub-sample (one rule and
// one convolution per distinct sampling fraction).
func BenchmarkCountedForPower(b *testing.B) {
	d, ant := benchDesign()
	for b.Loop() {
		if _, _, err := CountedForPower(d, ant, 0.02, 0.95); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSequentialJudge: one look of the anytime-valid judgement (the
// least favourable spread of 100 000 errors over 100 convex costs, and the
// upper end of the confidence sequence).
func BenchmarkSequentialJudge(b *testing.B) {
	d, _ := benchDesign()
	errs := make([]int, len(d.Strata))
	priors := make([]Prior, len(d.Strata))
	for h, s := range d.Strata {
		errs[h] = s.Sample / 100
		priors[h] = AnticipatedPrior(0.01)
	}
	s := Sequential{Design: d, Ceiling: 0.02, Confidence: 0.95, Priors: priors}
	for b.Loop() {
		if _, err := s.Judge(errs); err != nil {
			b.Fatal(err)
		}
	}
}

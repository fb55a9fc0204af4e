package stratified

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// expSum is the distribution of T = Σ_j w_j Y_j for independent standard
// exponential Y_j and weights w_j > 0: the null distribution of the
// weighted Fisher statistic Σ_j w_j (−ln p_j) for independent uniform
// p-values (Good, "On the weighted combination of significance tests",
// JRSS B 17, 1955). With equal weights w it is a gamma distribution, and
// 2T/w is Fisher's χ² with 2J degrees of freedom.
//
// It is computed as a mixture of gamma distributions: an exponential with
// mean w_j is the sum of G_j exponentials with mean w_min, G_j geometric
// on {1, 2, …} with success probability q_j = w_min/w_j, so
//
//	T = Gamma(M, w_min),  M = J + Σ_j (G_j − 1),
//	P(T ≥ t) = Σ_m P(M = m) · P(Poisson(t/w_min) ≤ m − 1)
//
// (the series of Moschopoulos, Ann. Inst. Stat. Math. 37, 1985, in
// probabilistic form). The mixing law of M is the convolution of the
// geometric laws, truncated where less than 1e-15 of its mass is left;
// Survival adds that remainder, so it never understates P(T ≥ t).
type expSum struct {
	scale float64   // w_min
	shape int       // J
	mix   []float64 // P(M − J = k), k = 0 … K
	rest  float64   // 1 − Σ mix, added to Survival
}

// newExpSum builds the distribution for the weights; every weight must be
// positive and finite.
func newExpSum(weights []float64) *expSum {
	wmin := math.Inf(1)
	for _, w := range weights {
		wmin = math.Min(wmin, w)
	}
	e := &expSum{scale: wmin, shape: len(weights)}
	// Size the truncation from the mean and spread of M − J, then grow it
	// until the mass left out is below 1e-15.
	var mean, vari, qmin float64 = 0, 0, 1
	for _, w := range weights {
		q := wmin / w
		mean += (1 - q) / q
		vari += (1 - q) / (q * q)
		qmin = math.Min(qmin, q)
	}
	k := int(mean+12*math.Sqrt(vari)+40/qmin) + 1
	for {
		mix := make([]float64, k+1)
		mix[0] = 1
		for _, w := range weights {
			q := wmin / w
			if q >= 1 {
				continue
			}
			// convolution with the geometric law q(1−q)^i, i ≥ 0:
			// a_i = (1−q) a_{i−1} + q b_i.
			prev := 0.0
			for i := range mix {
				prev = (1-q)*prev + q*mix[i]
				mix[i] = prev
			}
		}
		var sum float64
		for _, v := range mix {
			sum += v
		}
		if rest := 1 - sum; rest < 1e-15 || k > 1<<24 {
			e.mix, e.rest = mix, math.Max(rest, 0)
			return e
		}
		k *= 2
	}
}

// Survival is P(T ≥ t), never below the true value by more than rounding.
func (e *expSum) Survival(t float64) float64 {
	if !(t > 0) {
		return 1
	}
	s := t / e.scale
	// P(Poisson(s) ≤ m−1) = Q(m, s), the regularized upper incomplete
	// gamma function; successive m add the Poisson term e^{−s} s^{m−1}/(m−1)!.
	q := mathext.GammaIncRegComp(float64(e.shape), s)
	logTerm := float64(e.shape)*math.Log(s) - s - lgamma(float64(e.shape)+1)
	var p float64
	for k, w := range e.mix {
		p += w * q
		m := float64(e.shape + k) // next: Q(m+1, s) = Q(m, s) + e^{−s} s^m/m!
		q += math.Exp(logTerm)
		logTerm += math.Log(s) - math.Log(m+1)
		if q >= 1 {
			// every later term has Q = 1
			var tail float64
			for _, v := range e.mix[k+1:] {
				tail += v
			}
			p += tail
			break
		}
	}
	return math.Min(1, p+e.rest)
}

// Quantile is the t with Survival(t) = α for 0 < α < 1, by bisection (the
// survival function is continuous and falls from 1 to the remainder).
func (e *expSum) Quantile(alpha float64) float64 {
	lo, hi := 0.0, e.scale*float64(e.shape+len(e.mix))
	for e.Survival(hi) > alpha {
		lo, hi = hi, 2*hi
	}
	for i := 0; i < 200; i++ {
		mid := lo + (hi-lo)/2
		if mid <= lo || mid >= hi {
			break
		}
		if e.Survival(mid) > alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return hi
}

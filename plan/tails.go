package plan

import "math"

// BinomialCDF returns P(X ≤ k) for X ~ Bin(n, p). It equals the
// regularized incomplete beta function I_{1−p}(n−k, k+1) (Abramowitz &
// Stegun 26.5.24) but is computed by summing the smaller tail from an
// accurate saddle-point probability (see BinomialPMF) with the ratio
// recurrence P(X = x−1)/P(X = x) = x q / ((n−x+1) p): gonum's RegIncBeta
// loses about 1e-9 relative accuracy at n ≈ 10^6, and plans reach 10^8.
// k < 0 gives 0 and k ≥ n gives 1. It returns NaN when n < 0 or p is
// outside [0, 1].
func BinomialCDF(k, n int, p float64) float64 {
	if n < 0 || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	switch {
	case k < 0:
		return 0
	case k >= n:
		return 1
	case p == 0:
		return 1
	case p == 1:
		return 0
	}
	return binomTail(float64(k), float64(n), p, true)
}

// BinomialSF returns the survival function P(X > k) for X ~ Bin(n, p)
// (I_p(k+1, n−k)), computed directly (not as 1 − CDF), so that deep upper
// tails keep their relative accuracy. k < 0 gives 1 and k ≥ n gives 0. It
// returns NaN when n < 0 or p is outside [0, 1].
func BinomialSF(k, n int, p float64) float64 {
	if n < 0 || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	switch {
	case k < 0:
		return 1
	case k >= n:
		return 0
	case p == 0:
		return 0
	case p == 1:
		return 1
	}
	return binomTail(float64(k), float64(n), p, false)
}

// binomTail is P(X ≤ k) (lower) or P(X > k) for 0 ≤ k < n, 0 < p < 1. It
// sums whichever tail lies away from the mean, term by term from its
// largest term, until a term no longer changes the sum; the other tail is
// its complement (then at least about one half, so no accuracy is lost).
func binomTail(k, n, p float64, lower bool) float64 {
	q := 1 - p
	var tail float64
	if k < n*p {
		// lower tail: x = k, k−1, …, 0
		t := binomPMFRaw(k, n, p, q)
		sum := 0.0
		r := q / p
		for x := k; x >= 0 && t > 0; x-- {
			sum += t
			if t < 0x1p-53*sum {
				break
			}
			t *= x / (n - x + 1) * r
		}
		tail = min(sum, 1)
		if lower {
			return tail
		}
		return 1 - tail
	}
	// upper tail: x = k+1, …, n
	t := binomPMFRaw(k+1, n, p, q)
	sum := 0.0
	r := p / q
	for x := k + 1; x <= n && t > 0; x++ {
		sum += t
		if t < 0x1p-53*sum {
			break
		}
		t *= (n - x) / (x + 1) * r
	}
	tail = min(sum, 1)
	if lower {
		return 1 - tail
	}
	return tail
}

// BinomialPMF returns P(X = k) for X ~ Bin(n, p), computed with Loader's
// saddle-point expansion (C. Loader, "Fast and accurate computation of
// binomial probabilities", 2000), which keeps full relative accuracy for
// large n. It returns 0 outside 0 ≤ k ≤ n and NaN for n < 0 or p outside
// [0, 1].
func BinomialPMF(k, n int, p float64) float64 {
	if n < 0 || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	return binomPMFRaw(float64(k), float64(n), p, 1-p)
}

// HypergeometricPMF returns P(X = k) where X is the number of defectives in
// a sample of n drawn without replacement from a lot of population items of
// which defects are defective. It is the product of three binomial
// saddle-point terms (the form used by R's dhyper):
//
//	P(X = k) = b(k; D, q) · b(n−k; N−D, q) / b(n; N, q),   q = n/N.
//
// It returns NaN when the arguments are outside 0 ≤ defects ≤ population,
// 0 ≤ n ≤ population.
func HypergeometricPMF(k int, population, defects int64, n int) float64 {
	if !hyperDomain(population, defects, n) {
		return math.NaN()
	}
	return hyperPMF(float64(k), float64(defects), float64(population-defects), float64(n))
}

// HypergeometricCDF returns P(X ≤ k) for the hypergeometric X of
// HypergeometricPMF. It sums the smaller tail by the ratio recurrence
//
//	P(X = x−1) / P(X = x) = x (N−D−n+x) / ((n+1−x)(D+1−x)),
//
// starting from an accurately computed P(X = x), so both tails keep their
// relative accuracy. It returns NaN outside the domain of HypergeometricPMF.
func HypergeometricCDF(k int, population, defects int64, n int) float64 {
	if !hyperDomain(population, defects, n) {
		return math.NaN()
	}
	return hyperTail(float64(k), float64(defects), float64(population-defects), float64(n), true)
}

// HypergeometricSF returns P(X > k) for the hypergeometric X of
// HypergeometricPMF, computed directly (not as 1 − CDF). It returns NaN
// outside the domain of HypergeometricPMF.
func HypergeometricSF(k int, population, defects int64, n int) float64 {
	if !hyperDomain(population, defects, n) {
		return math.NaN()
	}
	return hyperTail(float64(k), float64(defects), float64(population-defects), float64(n), false)
}

func hyperDomain(population, defects int64, n int) bool {
	return population >= 0 && defects >= 0 && defects <= population && n >= 0 && int64(n) <= population
}

// hyperTail is P(X ≤ x) (lower) or P(X > x) (upper) for x red balls in a
// draw of n from nr red and nb black, following R's phyper: it swaps to the
// tail below the mean, then sums the recurrence down from x.
func hyperTail(x, nr, nb, n float64, lower bool) float64 {
	x = math.Floor(x)
	if x*(nr+nb) > n*nr {
		nr, nb = nb, nr
		x = n - x - 1
		lower = !lower
	}
	if x < 0 || x < n-nb {
		if lower {
			return 0
		}
		return 1
	}
	if x >= nr || x >= n {
		if lower {
			return 1
		}
		return 0
	}
	d := hyperPMF(x, nr, nb, n)
	// sum of P(X = x−j)/P(X = x) for j ≥ 0.
	sum, term := 1.0, 1.0
	for xx := x; xx > 0 && term >= 0x1p-53*sum; xx-- {
		term *= xx * (nb - n + xx) / ((n + 1 - xx) * (nr + 1 - xx))
		sum += term
	}
	p := d * sum
	if p > 1 {
		p = 1
	}
	if lower {
		return p
	}
	return 1 - p
}

// hyperPMF is the hypergeometric probability of x red in a draw of n from
// nr red and nb black (R's dhyper).
func hyperPMF(x, nr, nb, n float64) float64 {
	if x < 0 || x > nr || n-x < 0 || n-x > nb {
		return 0
	}
	total := nr + nb
	if n == 0 || n == total {
		if (n == 0 && x == 0) || (n == total && x == nr) {
			return 1
		}
		return 0
	}
	p := n / total
	q := (total - n) / total
	p1 := binomPMFRaw(x, nr, p, q)
	p2 := binomPMFRaw(n-x, nb, p, q)
	p3 := binomPMFRaw(n, total, p, q)
	return p1 * p2 / p3
}

// binomPMFRaw is Loader's saddle-point binomial probability b(x; n, p), with
// q = 1 − p passed separately for accuracy:
//
//	b(x; n, p) = exp(δ(n) − δ(x) − δ(n−x) − D(x, np) − D(n−x, nq)) · sqrt(n / (2π x (n−x)))
//
// where δ is the Stirling error and D the deviance term bd0.
func binomPMFRaw(x, n, p, q float64) float64 {
	if p == 0 {
		if x == 0 {
			return 1
		}
		return 0
	}
	if q == 0 {
		if x == n {
			return 1
		}
		return 0
	}
	if x < 0 || x > n {
		return 0
	}
	if x == 0 {
		if n == 0 {
			return 1
		}
		if p < 0.1 {
			return math.Exp(-bd0(n, n*q) - n*p)
		}
		return math.Exp(n * math.Log(q))
	}
	if x == n {
		if q < 0.1 {
			return math.Exp(-bd0(n, n*p) - n*q)
		}
		return math.Exp(n * math.Log(p))
	}
	lc := stirlerr(n) - stirlerr(x) - stirlerr(n-x) - bd0(x, n*p) - bd0(n-x, n*q)
	lf := math.Log(2*math.Pi) + math.Log(x) + math.Log1p(-x/n)
	return math.Exp(lc - 0.5*lf)
}

// stirlerrSmall holds δ(n) = ln n! − ln(sqrt(2πn) (n/e)^n) for n = 0 … 15.
var stirlerrSmall = func() [16]float64 {
	var t [16]float64
	for i := 1; i < len(t); i++ {
		n := float64(i)
		lg, _ := math.Lgamma(n + 1)
		t[i] = lg - (n+0.5)*math.Log(n) + n - 0.5*math.Log(2*math.Pi)
	}
	return t
}()

// stirlerr is the Stirling error δ(n) for integer-valued n ≥ 0, from its
// asymptotic series 1/(12n) − 1/(360n³) + 1/(1260n⁵) − … for n > 15.
func stirlerr(n float64) float64 {
	const (
		s0 = 1.0 / 12
		s1 = 1.0 / 360
		s2 = 1.0 / 1260
		s3 = 1.0 / 1680
		s4 = 1.0 / 1188
	)
	if n <= 15 {
		return stirlerrSmall[int(n)]
	}
	nn := n * n
	switch {
	case n > 500:
		return (s0 - s1/nn) / n
	case n > 80:
		return (s0 - (s1-s2/nn)/nn) / n
	case n > 35:
		return (s0 - (s1-(s2-s3/nn)/nn)/nn) / n
	}
	return (s0 - (s1-(s2-(s3-s4/nn)/nn)/nn)/nn) / n
}

// bd0 is the deviance term x ln(x/np) + np − x, computed without
// cancellation when x is close to np.
func bd0(x, np float64) float64 {
	if math.Abs(x-np) < 0.1*(x+np) {
		v := (x - np) / (x + np)
		s := (x - np) * v
		if math.Abs(s) < math.SmallestNonzeroFloat64*0x1p52 {
			return s
		}
		ej := 2 * x * v
		v *= v
		for j := 1; j < 1000; j++ {
			ej *= v
			s1 := s + ej/float64(2*j+1)
			if s1 == s {
				return s1
			}
			s = s1
		}
	}
	return x*math.Log(x/np) + np - x
}

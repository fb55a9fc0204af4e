package stratified

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"

	"probity/plan"
)

// poissonBinomial is the exact law of a sum of independent Bernoulli
// trials with the given success probabilities.
func poissonBinomial(p []float64) []float64 {
	dist := []float64{1}
	for _, q := range p {
		next := make([]float64, len(dist)+1)
		for i, a := range dist {
			next[i] += a * (1 - q)
			next[i+1] += a * q
		}
		dist = next
	}
	return dist
}

// TestHoeffdingLowerTail checks Hoeffding's Theorem 4 (1956) in the form
// the count rule uses, P(S ≤ c) ≤ P(Bin(n, μ/n) ≤ c) for c ≤ μ − 1, over
// every vector of success probabilities on a grid of step 1/10 for
// n ≤ 5 trials (exhaustive; 0 and 1 included).
func TestHoeffdingLowerTail(t *testing.T) {
	const steps = 10
	checked := 0
	for n := 1; n <= 5; n++ {
		idx := make([]int, n)
		for {
			p := make([]float64, n)
			var mu float64
			for i, k := range idx {
				p[i] = float64(k) / steps
				mu += p[i]
			}
			dist := poissonBinomial(p)
			var cdf float64
			for c := 0; float64(c) <= mu-1+1e-12; c++ {
				cdf += dist[c]
				b := plan.BinomialCDF(c, n, math.Min(mu/float64(n), 1))
				if cdf > b+1e-12 {
					t.Fatalf("p = %v: P(S ≤ %d) = %.15g exceeds the binomial %.15g", p, c, cdf, b)
				}
				checked++
			}
			// next grid point, nondecreasing vectors only (order does not matter)
			i := n - 1
			for i >= 0 && idx[i] == steps {
				i--
			}
			if i < 0 {
				break
			}
			idx[i]++
			for j := i + 1; j < n; j++ {
				idx[j] = idx[i]
			}
		}
	}
	if checked < 1000 {
		t.Fatalf("only %d comparisons", checked)
	}
}

// TestHypergeometricIsPoissonBinomial checks, for every lot of N ≤ 14
// decisions, D errors and draw of n, that the generating function
// Σ_x P(X = x) z^x of the hypergeometric count has only real roots ≤ 0
// (Vatutin & Mikhailov 1982): the count is then a sum of independent
// Bernoulli trials with success probabilities 1/(1 − root). The roots are
// the eigenvalues of the companion matrix (gonum), and the Bernoulli law
// rebuilt from them must give back the hypergeometric probabilities.
func TestHypergeometricIsPoissonBinomial(t *testing.T) {
	for N := int64(1); N <= 14; N++ {
		for D := int64(0); D <= N; D++ {
			for n := 1; int64(n) <= N; n++ {
				lo := max(0, int64(n)-(N-D))
				hi := min(int64(n), D)
				coef := make([]float64, hi+1) // coefficients of z^0 … z^hi
				for x := lo; x <= hi; x++ {
					coef[x] = plan.HypergeometricPMF(int(x), N, D, n)
				}
				// factor out z^lo (roots at 0: trials that always succeed)
				poly := coef[lo:]
				deg := len(poly) - 1
				var probs []float64
				for i := int64(0); i < lo; i++ {
					probs = append(probs, 1)
				}
				if deg > 0 {
					comp := mat.NewDense(deg, deg, nil)
					for j := 0; j < deg; j++ {
						comp.Set(0, j, -poly[deg-1-j]/poly[deg])
					}
					for i := 1; i < deg; i++ {
						comp.Set(i, i-1, 1)
					}
					var eig mat.Eigen
					if !eig.Factorize(comp, mat.EigenNone) {
						t.Fatalf("N=%d D=%d n=%d: eigen decomposition failed", N, D, n)
					}
					for _, r := range eig.Values(nil) {
						if math.Abs(imag(r)) > 1e-6*(1+cmplx.Abs(r)) || real(r) > 1e-9 {
							t.Fatalf("N=%d D=%d n=%d: root %v is not real and ≤ 0", N, D, n, r)
						}
						probs = append(probs, 1/(1-real(r)))
					}
				}
				for len(probs) < n {
					probs = append(probs, 0)
				}
				got := poissonBinomial(probs)
				for x := 0; x <= n; x++ {
					want := plan.HypergeometricPMF(x, N, D, n)
					if math.Abs(got[x]-want) > 1e-7 {
						t.Fatalf("N=%d D=%d n=%d x=%d: Bernoulli law gives %.12g, hypergeometric %.12g", N, D, n, x, got[x], want)
					}
				}
			}
		}
	}
}

package agreement

import "fmt"

// GwetAC1 returns Gwet's first-order agreement coefficient AC1 for two
// labelers (Gwet 2008, British Journal of Mathematical and Statistical
// Psychology 61:29–48) with its variance from the same paper, taken with no
// finite-population correction (f = 0: the doubled items stand for an
// unbounded stream), and a normal-theory interval at confidence.
//
// With q classes, p_kl = n_kl/n and π_k = (p_k. + p_.k)/2 the mean share
// of class k over both labelers:
//
//	p_a = Σ_k p_kk,  p_e = Σ_k π_k(1 − π_k)/(q − 1),  γ = (p_a − p_e)/(1 − p_e)
//
//	Var(γ) = [Σ_k Σ_l p_kl·(δ_kl − 2(1 − γ)·(1 − (π_k + π_l)/2)/(q − 1))²
//	          − (p_a − 2(1 − γ)·p_e)²] / (n·(1 − p_e)²)
//
// where δ_kl is 1 on the diagonal and 0 elsewhere. Unlike kappa, p_e ≤ 1/q
// < 1, so AC1 is defined for every table with n ≥ 1; it stays near p_a
// when one class dominates, where kappa collapses. q is the number of
// classes the labelers could choose from (the table's classes).
func GwetAC1(t *Table, confidence float64) (Estimate, error) {
	if err := checkConfidence(confidence); err != nil {
		return Estimate{}, err
	}
	n := t.N()
	if n == 0 {
		return Estimate{}, fmt.Errorf("%w: no items with two labels", ErrUndefined)
	}
	p, row, col := t.proportions()
	q := len(t.Classes)
	qm1 := float64(q - 1)
	pi := make([]float64, q)
	pa, pe := 0.0, 0.0
	for k := range q {
		pi[k] = (row[k] + col[k]) / 2
		pa += p[k][k]
		pe += pi[k] * (1 - pi[k])
	}
	pe /= qm1
	g := (pa - pe) / (1 - pe)
	s := 0.0
	for k := range q {
		for l := range q {
			if p[k][l] == 0 {
				continue
			}
			d := 0.0
			if k == l {
				d = 1
			}
			x := d - 2*(1-g)*(1-(pi[k]+pi[l])/2)/qm1
			s += p[k][l] * x * x
		}
	}
	m := pa - 2*(1-g)*pe
	v := (s - m*m) / (float64(n) * (1 - pe) * (1 - pe))
	e := Estimate{Value: g, Observed: pa, Chance: pe, N: n}
	return withInterval(e, v, confidence), nil
}

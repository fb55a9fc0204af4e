package agreement

import "fmt"

// CohenKappa returns Cohen's (1960) kappa of the table with the
// large-sample standard error of Fleiss, Cohen & Everitt (1969,
// Psychological Bulletin 72:323–327), the one most software reports, and a
// normal-theory interval at confidence.
//
// With p_ij = n_ij/n, row margins p_i. (first labeler), column margins p_.j
// (second labeler):
//
//	p_o = Σ_i p_ii,  p_e = Σ_i p_i.·p_.i,  κ = (p_o − p_e)/(1 − p_e)
//
//	Var(κ) = [A + B − C] / (n·(1 − p_e)²), where
//	A = Σ_i p_ii·[1 − (p_i. + p_.i)(1 − κ)]²
//	B = (1 − κ)²·Σ_{i≠j} p_ij·(p_.i + p_j.)²
//	C = [κ − p_e(1 − κ)]²
//
// Domain: n ≥ 1 and p_e < 1 (kappa is 0/0 when both labelers put every
// item in one and the same class: ErrUndefined). The variance is not the
// simple p_o(1 − p_o)/(n(1 − p_e)²) of Cohen (1960), which ignores the
// sampling error of the margins. The interval assumes n large; it is
// degenerate (zero width) when the labelers agree on every item.
func CohenKappa(t *Table, confidence float64) (Estimate, error) {
	if err := checkConfidence(confidence); err != nil {
		return Estimate{}, err
	}
	n := t.N()
	if n == 0 {
		return Estimate{}, fmt.Errorf("%w: no items with two labels", ErrUndefined)
	}
	p, row, col := t.proportions()
	q := len(t.Classes)
	po, pe := 0.0, 0.0
	for i := range q {
		po += p[i][i]
		pe += row[i] * col[i]
	}
	if pe >= 1 {
		return Estimate{}, fmt.Errorf("%w: both labelers put all %d items in one class, so chance agreement is 1", ErrUndefined, n)
	}
	k := (po - pe) / (1 - pe)
	a, b := 0.0, 0.0
	for i := range q {
		d := 1 - (row[i]+col[i])*(1-k)
		a += p[i][i] * d * d
		for j := range q {
			if i != j {
				s := col[i] + row[j]
				b += p[i][j] * s * s
			}
		}
	}
	b *= (1 - k) * (1 - k)
	c := k - pe*(1-k)
	c *= c
	v := (a + b - c) / (float64(n) * (1 - pe) * (1 - pe))
	e := Estimate{Value: k, Observed: po, Chance: pe, N: n}
	return withInterval(e, v, confidence), nil
}

package sequential

import (
	"fmt"
	"math"
)

// Lines are the acceptance and rejection lines of Wald's sequential
// probability ratio test (SPRT) of H0: p = P0 against H1: p = P1 (P0 < P1)
// for Bernoulli errors (Wald, Sequential Analysis, 1947, ch. 5; the form
// below is the one of the NIST/SEMATECH e-Handbook of Statistical Methods,
// §6.2.6). With
//
//	k = ln[P1(1 − P0) / (P0(1 − P1))],
//	s = ln[(1 − P0)/(1 − P1)] / k,
//	h1 = ln[(1 − α)/β] / k,   h2 = ln[(1 − β)/α] / k,
//
// α the producer's risk P(reject | P0) and β the consumer's risk
// P(accept | P1), the test accepts after t items with e errors when
// e ≤ s·t − h1, rejects when e ≥ s·t + h2, and continues otherwise.
type Lines struct {
	P0, P1       float64
	ProducerRisk float64 // α
	ConsumerRisk float64 // β
	K            float64 // k
	Slope        float64 // s
	HAccept      float64 // h1
	HReject      float64 // h2
}

// WaldLines returns the SPRT lines for 0 < p0 < p1 < 1 and risks in
// (0, 1) with α + β < 1.
func WaldLines(p0, p1, producerRisk, consumerRisk float64) (Lines, error) {
	if !(p0 > 0 && p0 < p1 && p1 < 1) {
		return Lines{}, fmt.Errorf("%w: need 0 < p0 < p1 < 1, got p0 = %v, p1 = %v", ErrDomain, p0, p1)
	}
	a, b := producerRisk, consumerRisk
	if !(a > 0 && a < 1 && b > 0 && b < 1 && a+b < 1) {
		return Lines{}, fmt.Errorf("%w: risks %v and %v must lie in (0, 1) and sum below 1", ErrDomain, a, b)
	}
	k := math.Log(p1*(1-p0)) - math.Log(p0*(1-p1))
	return Lines{
		P0: p0, P1: p1, ProducerRisk: a, ConsumerRisk: b,
		K:       k,
		Slope:   (math.Log1p(-p0) - math.Log1p(-p1)) / k,
		HAccept: math.Log((1-a)/b) / k,
		HReject: math.Log((1-b)/a) / k,
	}, nil
}

// OC is Wald's approximation to the probability of acceptance at error
// rate p, neglecting the overshoot of the boundaries (Wald 1947, §5.3):
// for the h ≠ 0 that solves
//
//	p = [1 − ((1 − P1)/(1 − P0))^h] / [(P1/P0)^h − ((1 − P1)/(1 − P0))^h],
//
// L(p) = (A^h − 1)/(A^h − B^h) with A = (1 − β)/α, B = β/(1 − α); at
// p = s (h = 0) L = h2/(h1 + h2). It gives 1 − α at P0 and β at P1.
func (l Lines) OC(p float64) float64 {
	if !(p > 0 && p < 1) {
		if p <= 0 {
			return 1
		}
		return 0
	}
	A := (1 - l.ConsumerRisk) / l.ProducerRisk
	B := l.ConsumerRisk / (1 - l.ProducerRisk)
	if math.Abs(p-l.Slope) < 1e-12 {
		return l.HReject / (l.HAccept + l.HReject)
	}
	// p(h) is decreasing in h; find h with p(h) = p by bisection on a
	// bracket that is widened until it holds p.
	ph := func(h float64) float64 {
		u := math.Pow((1-l.P1)/(1-l.P0), h)
		v := math.Pow(l.P1/l.P0, h)
		return (1 - u) / (v - u)
	}
	lo, hi := -1.0, 1.0
	for ph(lo) < p && lo > -1e4 {
		lo *= 2
	}
	for ph(hi) > p && hi < 1e4 {
		hi *= 2
	}
	for i := 0; i < 200; i++ {
		mid := (lo + hi) / 2
		if mid == 0 {
			mid = 1e-9
		}
		if ph(mid) > p {
			lo = mid
		} else {
			hi = mid
		}
	}
	h := (lo + hi) / 2
	ah, bh := math.Pow(A, h), math.Pow(B, h)
	return (ah - 1) / (ah - bh)
}

// ASN is Wald's approximation to the average sample number of the
// untruncated SPRT at error rate p (Wald 1947, §5.4):
//
//	E_p[N] ≈ [L(p)·ln B + (1 − L(p))·ln A] / [p·ln(P1/P0) + (1 − p)·ln((1 − P1)/(1 − P0))]
//	       = [(1 − L(p))·h2 − L(p)·h1] / (p − s),
//
// and at p = s, where both vanish, E[N] ≈ h1·h2 / (s(1 − s)).
func (l Lines) ASN(p float64) float64 {
	if math.Abs(p-l.Slope) < 1e-9 {
		return l.HAccept * l.HReject / (l.Slope * (1 - l.Slope))
	}
	L := l.OC(p)
	return ((1-L)*l.HReject - L*l.HAccept) / (p - l.Slope)
}

package measure

import (
	"fmt"
	"math"
)

// Label is what one labeled decision tells the measures.
type Label struct {
	// Positive reports whether the label is the positive (critical) class.
	Positive bool
	// Wrong[j] reports whether candidate j's prediction differs from the
	// label. Nil for binary labels: then it is wrong exactly when Positive
	// differs from the candidate's side of the stratum.
	Wrong []bool
}

// Sample is the labeled decisions of each stratum, in key order (the
// order of the worksheet within the stratum).
type Sample [][]Label

// Verdict is the judgement of one claim.
type Verdict struct {
	Claim
	// Level is the α the claim was judged at (its share of the family's
	// risk, or the level of the step that reached it).
	Level float64
	// CountedA items of the claim's strata (for a ratio, of the strata of
	// its numerator) were counted and EventsA of them are events: wrong
	// decisions (error), positives among the predicted negatives (for,
	// fnr), negatives among the predicted positives (fdr, fpr).
	CountedA, EventsA int
	// For a ratio, CountedB items of the other strata were counted and
	// EventsB of them are the complement of the denominator's other part
	// (false positives for fnr, false negatives for fpr).
	CountedB, EventsB int
	// Estimate is the weighted estimate of the measure from every labeled
	// item of its strata (each stratum's rate weighted by N_h); for a
	// ratio the ratio of the weighted totals, which is Begg & Greenes'
	// verification-bias-corrected estimator (Biometrics 39, 1983).
	// Estimated is false when it is undefined: a stratum without labels,
	// or a ratio whose estimated denominator is 0.
	Estimate  float64
	Estimated bool
	// Upper is the one-sided upper confidence bound at 1 − Level (see
	// ClaimDesign.Judge); the claim is accepted exactly when Upper is
	// below the ceiling.
	Upper float64
	// PValue is the p-value of "the measure is at or above the ceiling";
	// the claim is accepted at level α exactly when PValue ≤ α.
	PValue   float64
	Accepted bool
}

// Judge judges the claim at level α from the labeled sample.
//
// A proportion (error, for, fdr) is the exact test of "the claim's
// strata hold at least D* = ⌈ceiling·N_G⌉ events" from the events among
// the counted items: the hypergeometric test for one stratum, the
// stratified count rule for several (see tally). Upper is D_U/N_G, the
// test inverted.
//
// A ratio R = A/(A + B) (fnr, fpr) has its sides in disjoint strata: A's
// events S_a (false negatives for fnr, false positives for fpr) and the
// complement events S_b of B's strata (false positives for fnr, false
// negatives for fpr; B = N_b minus them). It is accepted when S_b ≤ c_B,
// fixed in the design, and S_a ≤ c_A, the largest count whose size
//
//	size(c_A) = max( p_a(c_A, a*(b₀)), max_j p_a(c_A, a*(L_{j+1}))·p_b(c_B, N_b − L_j + 1) )
//
// is at most α, where p_a, p_b are the sides' exact tails (p(s, D): the
// chance of at most s counted events when the side holds D, exact for one
// stratum and a bound valid for every spread for several), a*(B) the
// least A with A/(A + B) ≥ ceiling, b₀ the design's floor and
// [L_{j+1}, L_j − 1] the intervals of floorLattice below it. Why it keeps
// its risk: the sides are sampled independently, so a population with
// parts (A, B) is accepted with probability at most p_a(c_A, A)·p_b(c_B,
// N_b − B). At or above the ceiling A ≥ a*(B); when B ≥ b₀ that is at most
// p_a(c_A, a*(b₀)), and when B lies in interval j at most p_a(c_A,
// a*(L_{j+1}))·p_b(c_B, N_b − L_j + 1) — the first factor is largest at
// the interval's smallest B, the second at its largest. It is a
// union–intersection test over the nuisance B with exact tails, the
// product taking the place of a split of the risk between the sides;
// with c_B at level α it reduces to the intersection–union test of
// Berger (Technometrics 24, 1982) with floor b₀, which it never does
// worse than. Its p-value is size(S_a) (1 when S_b > c_B). Inverting it
// over the ceiling gives Upper: the largest A/(A + L) over the A whose
// tail keeps p_a(S_a, A)·w above α (w = 1 with L = b₀, w = p_b(c_B,
// N_b − L_j + 1) with L = L_{j+1}), 1 when S_b > c_B.
func (cd ClaimDesign) Judge(p Population, s Sample, alpha float64) (Verdict, error) {
	if err := p.Validate(); err != nil {
		return Verdict{}, err
	}
	if !(alpha > 0 && alpha < 1) {
		return Verdict{}, fmt.Errorf("%w: level %v is not between 0 and 1", ErrPopulation, alpha)
	}
	r, err := cd.rule(p)
	if err != nil {
		return Verdict{}, err
	}
	if len(s) != len(p.Strata) {
		return Verdict{}, fmt.Errorf("%w: labels for %d of %d strata", ErrPopulation, len(s), len(p.Strata))
	}
	for h := range p.Strata {
		if len(s[h]) < cd.Counted[h] {
			return Verdict{}, fmt.Errorf("%w: stratum %q has %d labeled items, the claim %s counts %d", ErrPopulation, p.Strata[h].Label, len(s[h]), cd.name(p), cd.Counted[h])
		}
		if int64(len(s[h])) > p.Strata[h].Population {
			return Verdict{}, fmt.Errorf("%w: stratum %q has %d labeled items among %d decisions", ErrPopulation, p.Strata[h].Label, len(s[h]), p.Strata[h].Population)
		}
		for _, l := range s[h] {
			if l.Wrong != nil && len(l.Wrong) != len(p.Candidates) {
				return Verdict{}, fmt.Errorf("%w: a label of stratum %q says for %d of %d candidates whether they are wrong", ErrPopulation, p.Strata[h].Label, len(l.Wrong), len(p.Candidates))
			}
		}
	}
	v := Verdict{Claim: cd.Claim, Level: alpha}
	v.CountedA, v.EventsA = countEvents(p, s, r.a, cd.Counted)
	if r.tb == nil {
		v.PValue = r.ta.pValue(v.EventsA, r.aStar)
		v.Upper = float64(r.ta.upper(v.EventsA, alpha)) / float64(r.ta.total)
	} else {
		v.CountedB, v.EventsB = countEvents(p, s, r.b, cd.Counted)
		v.PValue, v.Upper = 1, 1
		if !r.unacceptable && v.EventsB <= cd.BAccept {
			v.PValue = r.size(v.EventsA)
			v.Upper = r.upperRatio(v.EventsA, alpha)
		}
	}
	v.Accepted = v.PValue <= alpha
	v.Estimate, v.Estimated = estimate(p, s, r.a, r.b, cd.Measure.Ratio())
	return v, nil
}

// upperRatio is the ratio's upper confidence bound after s numerator
// events (the b side having passed): the largest A/(A + L) over the terms
// of size, A the largest count with w·p_a(s, A) > α.
func (r *claimRule) upperRatio(s int, alpha float64) float64 {
	u := ratioOf(r.ta.upper(s, alpha), r.Floor)
	for j, w := range r.w {
		if w > alpha {
			u = math.Max(u, ratioOf(r.ta.upperScaled(s, alpha, w), r.lat[j+1]))
		}
	}
	return u
}

// ratioOf is a/(a + b), and 1 when both are 0 (no denominator: at or
// above every ceiling).
func ratioOf(a, b int64) float64 {
	if a+b == 0 {
		return 1
	}
	return float64(a) / float64(a+b)
}

// countEvents counts the side's events among the first counted[h] items
// of its strata.
func countEvents(p Population, s Sample, sd side, counted []int) (n, events int) {
	for _, h := range sd.strata {
		for _, l := range s[h][:counted[h]] {
			if sd.is(l, p, h) {
				events++
			}
		}
		n += counted[h]
	}
	return n, events
}

// weightedTotal is Σ_h N_h·e_h/n_h over the side's strata, e_h the events
// among all n_h labeled items of stratum h; ok is false when a stratum has
// no labels.
func weightedTotal(p Population, s Sample, sd side) (total float64, ok bool) {
	for _, h := range sd.strata {
		n := len(s[h])
		if n == 0 {
			return 0, false
		}
		e := 0
		for _, l := range s[h] {
			if sd.is(l, p, h) {
				e++
			}
		}
		total += float64(p.Strata[h].Population) * float64(e) / float64(n)
	}
	return total, true
}

// estimate is the weighted estimate of a proportion (its weighted events
// over N_G) or of a ratio Â/(Â + B̂), B̂ = N_b minus the weighted
// complement events.
func estimate(p Population, s Sample, a, b side, ratio bool) (float64, bool) {
	ta, ok := weightedTotal(p, s, a)
	if !ok {
		return 0, false
	}
	if !ratio {
		return ta / float64(a.population(p)), true
	}
	tc, ok := weightedTotal(p, s, b)
	if !ok {
		return 0, false
	}
	tb := float64(b.population(p)) - tc
	if ta+tb <= 0 {
		return 0, false
	}
	return ta / (ta + tb), true
}

// Confusion is a candidate's one-vs-rest confusion matrix as estimated
// population counts: each stratum's labeled rates weighted by its N_h.
type Confusion struct {
	Candidate      string
	TP, FP, FN, TN float64
	// Prevalence is the estimated share of true positives, (TP + FN)/N.
	Prevalence float64
	// Complete is false when some stratum has no labels (its decisions
	// are then left out of every count and of the prevalence).
	Complete bool
}

// Estimate returns each candidate's estimated confusion matrix.
func Estimate(p Population, s Sample) ([]Confusion, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if len(s) != len(p.Strata) {
		return nil, fmt.Errorf("%w: labels for %d of %d strata", ErrPopulation, len(s), len(p.Strata))
	}
	out := make([]Confusion, len(p.Candidates))
	for j, c := range p.Candidates {
		cf := Confusion{Candidate: c.Name, Complete: true}
		var N float64 // decisions of the labeled strata
		for h, st := range p.Strata {
			n := len(s[h])
			if n == 0 {
				cf.Complete = false
				continue
			}
			N += float64(st.Population)
			pos := 0
			for _, l := range s[h] {
				if l.Positive {
					pos++
				}
			}
			w := float64(st.Population) / float64(n)
			if c.Positive[h] {
				cf.TP += w * float64(pos)
				cf.FP += w * float64(n-pos)
			} else {
				cf.FN += w * float64(pos)
				cf.TN += w * float64(n-pos)
			}
		}
		if N > 0 {
			cf.Prevalence = (cf.TP + cf.FN) / N
		}
		out[j] = cf
	}
	return out, nil
}

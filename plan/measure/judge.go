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
// A ratio R = A/(A + B) (fnr, fpr) is the intersection–union test of
// Berger (Technometrics 24, 1982) with the floor b₀ fixed in the design:
// "R ≥ ceiling" implies "B < b₀" or "A ≥ a*", a* the least A with
// A/(A + b₀) ≥ ceiling, so the claim is accepted when both are rejected,
// each by its exact test at the full level α — the b side shows B ≥ b₀
// through its complement events, the a side shows A < a*. A population at
// or above the ceiling lies in one of the two hypotheses, whose test
// rejects with probability at most α; no split of α is needed. Its
// p-value is the larger of the two. Inverting the tests over the ceiling
// (b₀ fixed) gives Upper = A_U/(A_U + b₀) when B ≥ b₀ is shown (A_U the
// a side's upper bound at 1 − α), else 1.
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
		pa, pb := r.ta.pValue(v.EventsA, r.aStar), r.tb.pValue(v.EventsB, r.cStar)
		v.PValue = math.Max(pa, pb)
		v.Upper = 1
		if pb <= alpha {
			au := r.ta.upper(v.EventsA, alpha)
			v.Upper = float64(au) / float64(au+cd.Floor)
		}
	}
	v.Accepted = v.PValue <= alpha
	v.Estimate, v.Estimated = estimate(p, s, r.a, r.b, cd.Measure.Ratio())
	return v, nil
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

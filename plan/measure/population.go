package measure

import (
	"errors"
	"fmt"
	"math"
)

// Stratum is one stratum of the log. Strata are cut so that every
// candidate predicts the same side for all of a stratum's decisions: the
// model's predicted class (label-column candidates, one-vs-rest for the
// positive class), a score band (threshold candidates: each threshold's
// predicted-negative set is a union of bands), possibly crossed with the
// user's own strata. The prediction is in the log before any label, so
// the strata are known exactly.
type Stratum struct {
	Label string
	// Population is N_h ≥ 1, the decisions of the period in the stratum.
	Population int64
}

// Candidate is a model or a threshold under audit.
type Candidate struct {
	Name string
	// Positive[h] reports whether the candidate predicts the positive
	// class for the decisions of stratum h.
	Positive []bool
}

// Population is the strata of a period and the candidates judged on them.
type Population struct {
	Strata     []Stratum
	Candidates []Candidate
}

// Claim is one judgement of a family: a measure of one candidate must be
// below its ceiling.
type Claim struct {
	// Candidate is an index into Population.Candidates.
	Candidate int
	Measure   Measure
	// Ceiling is in (0, 1).
	Ceiling float64
}

// String names the claim in messages ("fnr of t0.35 below 0.05").
func (c Claim) name(p Population) string {
	return fmt.Sprintf("%s of %s", c.Measure, p.Candidates[c.Candidate].Name)
}

// Composition is what the decisions of a population are, stratum by
// stratum: how many are truly positive and how many each candidate gets
// wrong. It is the hidden truth of a period, or what a plan anticipates.
type Composition struct {
	// Positives[h] is the number of truly positive decisions in stratum h.
	Positives []int64
	// Wrong[j][h] is the number of decisions of stratum h that candidate
	// j gets wrong (its prediction differs from the label, any class).
	// Nil means binary labels: the wrong decisions are the positives of
	// the strata the candidate predicts negative and the negatives of
	// those it predicts positive (one-vs-rest is then the whole story).
	Wrong [][]int64
}

// ErrPopulation is wrapped by every error about a population, a
// composition, a claim or a sample that does not fit them.
var ErrPopulation = errors.New("invalid measures population")

// Validate checks the strata (at least one, N_h ≥ 1, a total that fits an
// int64) and the candidates (a name and a side for every stratum).
func (p Population) Validate() error {
	if len(p.Strata) == 0 {
		return fmt.Errorf("%w: no strata", ErrPopulation)
	}
	var total int64
	for _, s := range p.Strata {
		if s.Population < 1 {
			return fmt.Errorf("%w: stratum %q has %d decisions", ErrPopulation, s.Label, s.Population)
		}
		if total > math.MaxInt64-s.Population {
			return fmt.Errorf("%w: the strata hold more than %d decisions", ErrPopulation, int64(math.MaxInt64))
		}
		total += s.Population
	}
	if len(p.Candidates) == 0 {
		return fmt.Errorf("%w: no candidates", ErrPopulation)
	}
	for _, c := range p.Candidates {
		if len(c.Positive) != len(p.Strata) {
			return fmt.Errorf("%w: candidate %q names a side for %d of %d strata", ErrPopulation, c.Name, len(c.Positive), len(p.Strata))
		}
	}
	return nil
}

// checkClaim validates one claim against the population.
func (p Population) checkClaim(c Claim) error {
	if c.Candidate < 0 || c.Candidate >= len(p.Candidates) {
		return fmt.Errorf("%w: claim on candidate %d of %d", ErrPopulation, c.Candidate, len(p.Candidates))
	}
	if c.Measure <= MeasureUnset || c.Measure > FDR {
		return fmt.Errorf("%w: claim with measure %v", ErrPopulation, c.Measure)
	}
	if !(c.Ceiling > 0 && c.Ceiling < 1) {
		return fmt.Errorf("%w: %s has ceiling %v, not between 0 and 1", ErrPopulation, c.name(p), c.Ceiling)
	}
	return nil
}

// Validate checks the composition against the population: one count per
// stratum, 0 ≤ positives ≤ N_h, and (when given) one row of wrong
// decisions per candidate with 0 ≤ wrong ≤ N_h.
func (c Composition) Validate(p Population) error {
	if len(c.Positives) != len(p.Strata) {
		return fmt.Errorf("%w: %d positive counts for %d strata", ErrPopulation, len(c.Positives), len(p.Strata))
	}
	for h, s := range p.Strata {
		if c.Positives[h] < 0 || c.Positives[h] > s.Population {
			return fmt.Errorf("%w: stratum %q cannot hold %d positives in %d decisions", ErrPopulation, s.Label, c.Positives[h], s.Population)
		}
	}
	if c.Wrong == nil {
		return nil
	}
	if len(c.Wrong) != len(p.Candidates) {
		return fmt.Errorf("%w: wrong decisions for %d of %d candidates", ErrPopulation, len(c.Wrong), len(p.Candidates))
	}
	for j, row := range c.Wrong {
		if len(row) != len(p.Strata) {
			return fmt.Errorf("%w: candidate %q has wrong decisions for %d of %d strata", ErrPopulation, p.Candidates[j].Name, len(row), len(p.Strata))
		}
		for h, s := range p.Strata {
			if row[h] < 0 || row[h] > s.Population {
				return fmt.Errorf("%w: candidate %q cannot get %d of %d decisions of stratum %q wrong", ErrPopulation, p.Candidates[j].Name, row[h], s.Population, s.Label)
			}
		}
	}
	return nil
}

// event is what a side of a claim counts in its strata.
type event int

const (
	positives event = iota // truly positive decisions
	negatives              // truly negative decisions
	wrong                  // decisions the claim's candidate gets wrong
)

// side is a group of strata and the event a claim counts in it.
type side struct {
	strata []int
	ev     event
	cand   int
}

// count is the number of the side's events in stratum h of composition c.
func (sd side) count(p Population, c Composition, h int) int64 {
	switch sd.ev {
	case positives:
		return c.Positives[h]
	case negatives:
		return p.Strata[h].Population - c.Positives[h]
	}
	if c.Wrong != nil {
		return c.Wrong[sd.cand][h]
	}
	if p.Candidates[sd.cand].Positive[h] {
		return p.Strata[h].Population - c.Positives[h]
	}
	return c.Positives[h]
}

// counts is the side's events per member stratum.
func (sd side) counts(p Population, c Composition) []int64 {
	out := make([]int64, len(sd.strata))
	for i, h := range sd.strata {
		out[i] = sd.count(p, c, h)
	}
	return out
}

// is reports whether one labeled item is an event of the side.
func (sd side) is(l Label, p Population, h int) bool {
	switch sd.ev {
	case positives:
		return l.Positive
	case negatives:
		return !l.Positive
	}
	if l.Wrong != nil {
		return l.Wrong[sd.cand]
	}
	return l.Positive != p.Candidates[sd.cand].Positive[h]
}

// population is N_G, the decisions of the side's strata.
func (sd side) population(p Population) int64 {
	var n int64
	for _, h := range sd.strata {
		n += p.Strata[h].Population
	}
	return n
}

// predicted lists the strata candidate j predicts positive (want true) or
// negative.
func (p Population) predicted(j int, want bool) []int {
	var out []int
	for h := range p.Strata {
		if p.Candidates[j].Positive[h] == want {
			out = append(out, h)
		}
	}
	return out
}

// sides returns what a claim counts. A proportion (error, for, fdr) has
// one side: its events among the decisions of its strata. A ratio (fnr,
// fpr) R = A / (A + B) has two, on disjoint strata: a, whose events are
// A, and b, whose events are the complement of B within its strata (B is
// the known size of b's strata minus them). For fnr, A is the false
// negatives (positives among the predicted negatives) and B the true
// positives, bounded below through the false positives of the predicted
// positives; for fpr, A is the false positives and B the true negatives,
// bounded below through the false negatives.
func (c Claim) sides(p Population) (a, b side) {
	pos, neg := p.predicted(c.Candidate, true), p.predicted(c.Candidate, false)
	switch c.Measure {
	case Error:
		all := make([]int, len(p.Strata))
		for h := range all {
			all[h] = h
		}
		return side{strata: all, ev: wrong, cand: c.Candidate}, side{}
	case FOR:
		return side{strata: neg, ev: positives}, side{}
	case FDR:
		return side{strata: pos, ev: negatives}, side{}
	case FNR:
		return side{strata: neg, ev: positives}, side{strata: pos, ev: negatives}
	case FPR:
		return side{strata: pos, ev: negatives}, side{strata: neg, ev: positives}
	}
	return side{}, side{}
}

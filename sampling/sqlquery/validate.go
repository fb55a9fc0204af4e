package sqlquery

import (
	"fmt"
	"slices"

	"probity/sampling"
)

// validate checks what the draw from a file checks before reading a log,
// so that a query is never printed for a draw the file draw would refuse.
func (s *Spec) validate() error {
	if len(s.Candidates) == 0 {
		return fmt.Errorf("%w: %w: it declares no candidates (models or thresholds) to judge", ErrSpec, sampling.ErrNotDrawable)
	}
	if s.SampleSize < 1 {
		return fmt.Errorf("%w: sample size %d is below 1", ErrSpec, s.SampleSize)
	}
	if s.Double < 0 || s.Double > s.SampleSize {
		return fmt.Errorf("%w: --double %d is outside 0…%d, the sample size", ErrSpec, s.Double, s.SampleSize)
	}
	if s.MinPerStratum < 0 || s.Spare < 0 {
		return fmt.Errorf("%w: --min-per-stratum and --spare cannot be negative", ErrSpec)
	}
	switch s.Allocation {
	case ruleProportional, ruleEqual:
	case sampling.Neyman:
		if s.Dialect.TwoStep() {
			// The allocation runs in Go between the two queries, but the
			// draw description carries no anticipated errors yet.
			return fmt.Errorf("%w: neyman allocation is not available for a %s draw; use proportional or equal, or draw from an export with --log", ErrSpec, s.Dialect)
		}
		return fmt.Errorf("%w: neyman allocation cannot run inside the engine: its weights N_h·√(p_h(1−p_h)) are divided in exact rational arithmetic that SQL cannot reproduce bit for bit; use proportional or equal, or draw from an export with --log", ErrSpec)
	default:
		return fmt.Errorf("%w: unknown allocation rule %q (proportional or equal inside the engine)", ErrSpec, s.Allocation)
	}
	want := s.Seed
	if s.Period != "" {
		want = sampling.PeriodSeed(s.Seed, s.Period)
	}
	if s.SelectionSeed != want {
		return fmt.Errorf("%w: the selection seed does not follow from the seed and period", ErrSpec)
	}
	if s.IDColumn == "" {
		return fmt.Errorf("%w: the id column is empty", ErrSpec)
	}
	return s.checkShow()
}

// checkShow refuses --show columns that would let labelers see the model's
// answer or the stratum, with the draw from a file's wording.
func (s *Spec) checkShow() error {
	seen := map[string]bool{}
	for _, c := range s.Show {
		why := ""
		switch {
		case c == s.IDColumn:
			why = "is the id column, which the worksheet already has"
		case slices.Contains(s.Strata, c):
			why = "is a strata column; labelers must not see the stratum"
		case seen[c]:
			why = "is listed twice"
		}
		for _, t := range s.Bands {
			if b, err := sampling.ParseBand(t); err == nil && b.Column == c {
				why = "is a band (score) column; labelers must not see the model's score"
			}
		}
		for _, cand := range s.Candidates {
			if cand.Columns()[0] == c {
				why = fmt.Sprintf("holds candidate %s's prediction or score; labelers must not see the model's answer", cand.Name)
			}
		}
		if why != "" {
			return fmt.Errorf("%w: --show %s: the column %s", ErrSpec, c, why)
		}
		seen[c] = true
	}
	return nil
}

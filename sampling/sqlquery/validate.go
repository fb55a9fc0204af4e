package sqlquery

import (
	"errors"
	"fmt"
	"slices"

	"probity/plan/inputerr"
	"probity/sampling"
)

// specError is the input error about a Spec that cannot be turned into a
// query: field is the Spec's JSON key at fault ("" when the message says
// what it is about), the message begins with the value when there is one,
// and the cause is ErrSpec (and what a %w verb wrapped).
func specError(field, format string, args ...any) *inputerr.Error {
	e := inputerr.Errorf(format, args...)
	e.Field, e.Err = field, errors.Join(ErrSpec, e.Err)
	return e
}

// validate checks what the draw from a file checks before reading a log,
// so that a query is never printed for a draw the file draw would refuse.
func (s *Spec) validate() error {
	if len(s.Candidates) == 0 {
		return specError("", "%w: it declares no candidates (models or thresholds) to judge", sampling.ErrNotDrawable)
	}
	if s.SampleSize < 1 {
		return specError("sample_size", "%d is below 1", s.SampleSize)
	}
	if s.Double < 0 || s.Double > s.SampleSize {
		return specError("double", "%d: must be between 0 and the sample size %d", s.Double, s.SampleSize)
	}
	if s.MinPerStratum < 0 {
		return specError("min_per_stratum", "%d is negative", s.MinPerStratum)
	}
	if s.Spare < 0 {
		return specError("spare", "%d is negative", s.Spare)
	}
	if s.Spare > s.SampleSize {
		return specError("spare", "%d: at most the sample size %d per stratum", s.Spare, s.SampleSize)
	}
	switch s.Allocation {
	case ruleProportional, ruleEqual, sampling.Measures:
	case sampling.Neyman:
		if s.Dialect.TwoStep() {
			// The allocation runs in Go between the two queries, but the
			// draw description carries no anticipated errors yet.
			return specError("", "neyman allocation is not available for a %s draw; use proportional or equal, or draw from an export of the table", s.Dialect)
		}
		return specError("", "neyman allocation cannot run inside the engine: its weights N_h·√(p_h(1−p_h)) are divided in exact rational arithmetic that SQL cannot reproduce bit for bit; use proportional or equal, or draw from an export of the table")
	default:
		return specError("", "unknown allocation rule %q (proportional or equal inside the engine)", s.Allocation)
	}
	want := s.Seed
	if s.Period != "" {
		want = sampling.PeriodSeed(s.Seed, s.Period)
	}
	if s.SelectionSeed != want {
		return specError("", "the selection seed does not follow from the seed and period")
	}
	if s.IDColumn == "" {
		return specError("id_column", "is empty")
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
			return specError("show", "%s: the column %s", c, why)
		}
		seen[c] = true
	}
	return nil
}

package plan

import (
	"fmt"
	"strconv"
	"time"

	"probity/plan/chrono"
	"probity/plan/inputerr"
)

// Meta is what a plan file records besides its sizing: the tool, the time,
// the selection seed, the system under audit and its pre-registered
// candidates.
type Meta struct {
	// ToolVersion is the probity version writing the plan.
	ToolVersion string
	// Created is when the plan was made; it is stored in UTC to the second.
	// CreatedFrom says where it came from (the clock, or the operator).
	Created     time.Time
	CreatedFrom chrono.Source
	// Seed is the selection seed, used exactly as written (non-empty).
	Seed string
	// System and SystemVersion name the classifier (optional).
	System, SystemVersion string
	// Classes are the label values; required with Candidates.
	Classes []string
	// Candidates are declared in testing order; when present their number
	// is M and must agree with Inputs.CandidateCount.
	Candidates []Candidate
	// TimeColumn is the log's time column, when declared (File.TimeColumn).
	TimeColumn string
}

// Build sizes the plan for the inputs (see Size) and assembles the plan
// file with its metadata. The result passes the same checks Parse applies.
func Build(in Inputs, m Meta) (*File, error) {
	if len(m.Candidates) > 0 && in.CandidateCount != len(m.Candidates) {
		return nil, outOfRange("candidates", strconv.Itoa(in.CandidateCount), fmt.Sprintf("%d, the number of candidates declared (or omitted)", len(m.Candidates)))
	}
	rule, cmp, err := Size(in)
	if err != nil {
		return nil, err
	}
	f := &File{
		Format:        FileFormat,
		ToolVersion:   m.ToolVersion,
		Created:       chrono.Second(m.Created),
		CreatedFrom:   m.CreatedFrom,
		System:        m.System,
		SystemVersion: m.SystemVersion,
		Seed:          m.Seed,
		Inputs:        in,
		Rule:          rule,
		Comparison:    cmp,
		Classes:       m.Classes,
		Candidates:    m.Candidates,
		TimeColumn:    m.TimeColumn,
	}
	if err := f.validate(); err != nil {
		return nil, inputerr.Errorf("%w", err)
	}
	return f, nil
}

// ComparisonSize returns the sample size the named rule needs (see
// RuleSize), and whether the plan lists that rule.
func (f *File) ComparisonSize(rule string) (int64, bool) {
	for _, r := range f.Comparison {
		if r.Rule == rule {
			return r.SampleSize, true
		}
	}
	return 0, false
}

package trend

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// TestName describes the flagging test in reports.
const TestName = "Fisher's exact test, one-sided: is the period's error higher than the baseline period's?"

// Options are the choices of a trend.
type Options struct {
	// Baseline is the period every other period is compared with; "" means
	// the first period.
	Baseline string
	// Alpha is the level of each comparison, in (0, 1): a period is flagged
	// when its p-value is at most Alpha.
	Alpha float64
	// Measure and Candidate choose, for records with measures, the measure
	// charted and its candidate (see MeasureTrend; "" takes the defaults).
	// Records without measures refuse either.
	Measure, Candidate string
}

// Trend is the audits of several periods side by side. Its JSON form is the
// stable layout of `probity trend --json`.
type Trend struct {
	// System and SystemVersion name the classifier, from the latest record.
	System        string `json:"system"`
	SystemVersion string `json:"system_version"`
	Class         Class  `json:"class"`
	// Baseline is the period compared against.
	Baseline string `json:"baseline"`
	// Alpha is the level of each comparison (not adjusted for the number
	// of periods compared).
	Alpha float64 `json:"alpha"`
	// Test names the flagging test.
	Test string `json:"test"`
	// Periods lists the records in period order.
	Periods []Period `json:"periods"`
	// Candidates are the series, in the latest record's order followed by
	// candidates seen only in earlier records (in order of appearance).
	Candidates []Series `json:"candidates"`
	// Latest is the last period, whose verdict decides the exit code.
	Latest Period `json:"latest"`
	// Warnings are the differences between records that do not stop a
	// trend (plans, candidate sets, bound confidences, weighting).
	Warnings []string `json:"warnings"`
	// Unauthenticated lists, in period order, the periods whose records
	// are charted without having been authenticated.
	Unauthenticated []string `json:"unauthenticated"`
	// Measure is set when the records judged measures: the series are one
	// measure's claims (nil for records of the overall error alone).
	Measure *MeasureTrend `json:"measure,omitempty"`
}

// Period is one record on the trend.
type Period struct {
	Label           string `json:"period"`
	File            string `json:"file"`
	RecordID        string `json:"record_id"`
	Date            string `json:"date"`
	PlanFingerprint string `json:"plan_fingerprint"`
	SampleSize      int    `json:"sample_size"`
	OverallVerdict  string `json:"overall_verdict"`
	// Authenticated is false for a record charted without its signatures
	// authenticating it.
	Authenticated bool `json:"authenticated"`
}

// Series is one candidate across the periods it appears in.
type Series struct {
	Name string `json:"name"`
	// Flagged lists the periods whose error is significantly higher than
	// the baseline's.
	Flagged []string `json:"flagged"`
	// Tested is false when the candidate is not in the baseline period, so
	// no period could be compared.
	Tested bool    `json:"tested"`
	Rows   []Point `json:"rows"`
}

// Point is one candidate in one period.
type Point struct {
	Period          string  `json:"period"`
	Labeled         int     `json:"labeled"`
	Errors          int     `json:"errors"`
	Estimate        float64 `json:"estimate"`
	UpperBound      float64 `json:"upper_bound"`
	BoundConfidence float64 `json:"bound_confidence"`
	Ceiling         float64 `json:"ceiling"`
	Verdict         string  `json:"verdict"`
	// PValue is the one-sided Fisher p-value against the baseline; nil for
	// the baseline itself and when the candidate is not in the baseline.
	PValue  *float64 `json:"p_value"`
	Flagged bool     `json:"flagged"`
}

// RepeatedPeriodError reports two records of the same period.
type RepeatedPeriodError struct {
	Period        string
	First, Second string // files
	SameRecord    bool   // both carry the same record_id
}

// Error names the period and both files.
func (e *RepeatedPeriodError) Error() string {
	return fmt.Sprintf("period %s is repeated: %s and %s are both records of it", e.Period, e.First, e.Second)
}

// Hint suggests the fix.
func (e *RepeatedPeriodError) Hint() string {
	if e.SameRecord {
		return "both files hold the same record (same record_id); name it once"
	}
	return "keep the record that was signed off for that period and leave the other out"
}

// PeriodShapeError reports period labels that would not sort in time order.
type PeriodShapeError struct {
	First, Second         string // labels
	FirstFile, SecondFile string
}

// Error names both labels and files.
func (e *PeriodShapeError) Error() string {
	return fmt.Sprintf("%s: period %q is written differently from %q in %s (shapes %s and %s), so sorting them would not give time order",
		e.SecondFile, e.Second, e.First, e.FirstFile, Shape(e.Second), Shape(e.First))
}

// Hint suggests the fix.
func (e *PeriodShapeError) Hint() string {
	return "write every period the same way, zero-padded and year first (2026-09, not 2026-9)"
}

// BaselineError reports a baseline period that is not one of the periods.
type BaselineError struct {
	Label     string
	Available []string
}

// Error names the label.
func (e *BaselineError) Error() string {
	return fmt.Sprintf("baseline period %q is not among the records", e.Label)
}

// Hint lists the periods.
func (e *BaselineError) Hint() string {
	return "the periods are " + strings.Join(e.Available, ", ")
}

// asInput returns a refusal of Build as the input error callers map to
// exit code 2: the message and hint of e, with e as the cause.
func asInput(e interface {
	error
	Hint() string
}) error {
	return &inputerr.Error{Msg: e.Error(), Hint: e.Hint(), Err: e}
}

// ErrOptions is wrapped by errors about Options.
var ErrOptions = errors.New("invalid trend options")

// Build puts the entries in period order, refuses repeated periods,
// inconsistent period labels and mixed plan classes, and compares every
// candidate's error in each period with the baseline period's by Fisher's
// exact test (one-sided, H1: higher now).
//
// With X the period's errors out of n labeled and Y the baseline's out of
// m, the p-value is P(X' ≥ X) for X' hypergeometric given X+Y errors among
// n+m items (see FisherExact). The test compares error counts; where the
// estimate is stratified with unequal weights the counts are not the
// weighted rates, and a warning says so. For finite lots (hypergeometric
// plans) it asks whether the two months' samples could come from one error
// rate and ignores the lot sizes; for sequential plans it treats the stopped
// samples as fixed ones, which a warning calls approximate.
func Build(entries []Entry, opts Options) (*Trend, error) {
	if !(opts.Alpha > 0 && opts.Alpha < 1) {
		return nil, inputerr.Errorf("%w: alpha %v is outside (0, 1)", ErrOptions, opts.Alpha)
	}
	if len(entries) == 0 {
		return nil, inputerr.Errorf("%w: no records", ErrOptions)
	}
	es := append([]Entry(nil), entries...)
	sort.SliceStable(es, func(i, j int) bool { return es[i].Record.Period < es[j].Record.Period })
	for i := 1; i < len(es); i++ {
		a, b := &es[i-1], &es[i]
		if a.Record.Period == b.Record.Period {
			return nil, asInput(&RepeatedPeriodError{Period: a.Record.Period, First: a.Path, Second: b.Path,
				SameRecord: a.Record.RecordID == b.Record.RecordID})
		}
	}
	first := &es[0]
	for i := 1; i < len(es); i++ {
		e := &es[i]
		if Shape(e.Record.Period) != Shape(first.Record.Period) {
			return nil, asInput(&PeriodShapeError{First: first.Record.Period, Second: e.Record.Period, FirstFile: first.Path, SecondFile: e.Path})
		}
		if f, va, vb, ok := ClassOf(&first.Record).differ(ClassOf(&e.Record)); ok {
			return nil, asInput(&MixedClassError{Field: f, First: va, Second: vb, FirstFile: first.Path, SecondFile: e.Path,
				FirstPeriod: first.Record.Period, SecondPeriod: e.Record.Period})
		}
	}

	latest := &es[len(es)-1].Record
	t := &Trend{
		System:          latest.System,
		SystemVersion:   latest.SystemVersion,
		Class:           ClassOf(&first.Record),
		Alpha:           opts.Alpha,
		Test:            TestName,
		Warnings:        []string{},
		Unauthenticated: []string{},
	}
	labels := make([]string, len(es))
	for i, e := range es {
		labels[i] = e.Record.Period
		t.Periods = append(t.Periods, Period{
			Label:           e.Record.Period,
			File:            e.Path,
			RecordID:        e.Record.RecordID,
			Date:            e.Record.Date,
			PlanFingerprint: e.Record.Plan.Fingerprint,
			SampleSize:      e.Record.Plan.SampleSize,
			OverallVerdict:  e.Record.OverallVerdict,
			Authenticated:   !e.Unauthenticated,
		})
		if e.Unauthenticated {
			t.Unauthenticated = append(t.Unauthenticated, e.Record.Period)
		}
	}
	t.Latest = t.Periods[len(t.Periods)-1]
	base := 0
	if opts.Baseline != "" {
		base = sort.SearchStrings(labels, opts.Baseline)
		if base == len(labels) || labels[base] != opts.Baseline {
			return nil, asInput(&BaselineError{Label: opts.Baseline, Available: labels})
		}
	}
	t.Baseline = labels[base]

	if hasMeasures(latest) || opts.Measure != "" || opts.Candidate != "" {
		if !hasMeasures(latest) {
			return nil, &inputerr.Error{Field: "measure", Msg: "the records hold no measures: only the overall error can be charted"}
		}
		if err := measureSeries(t, es, opts); err != nil {
			return nil, err
		}
		t.Warnings = append(t.Warnings, planWarnings(t.Periods)...)
		return t, nil
	}
	names := candidateOrder(es)
	for _, name := range names {
		s, err := series(name, es, base, t.Class.Ceiling, opts.Alpha)
		if err != nil {
			return nil, err
		}
		t.Candidates = append(t.Candidates, s)
	}
	t.Warnings = append(t.Warnings, planWarnings(t.Periods)...)
	t.Warnings = append(t.Warnings, candidateWarnings(t, labels)...)
	t.Warnings = append(t.Warnings, weightWarnings(es)...)
	if t.Class.Design == plan.DesignSequential && len(es) > 1 {
		t.Warnings = append(t.Warnings, "the design is sequential: how many items were labeled depends on where the boundaries stopped, "+
			"and the test treats each period's count as a fixed sample, so its p-values are approximate")
	}
	return t, nil
}

// candidateOrder is the latest record's candidates, then those seen only in
// earlier records, latest first.
func candidateOrder(es []Entry) []string {
	var names []string
	seen := map[string]bool{}
	for i := len(es) - 1; i >= 0; i-- {
		for _, c := range es[i].Record.Candidates {
			if !seen[c.Name] {
				seen[c.Name] = true
				names = append(names, c.Name)
			}
		}
	}
	return names
}

// find returns the candidate named name in r, or nil.
func find(r *record.Record, name string) *record.Candidate {
	for i := range r.Candidates {
		if r.Candidates[i].Name == name {
			return &r.Candidates[i]
		}
	}
	return nil
}

// series builds one candidate's rows and flags.
func series(name string, es []Entry, base int, ceiling, alpha float64) (Series, error) {
	s := Series{Name: name, Flagged: []string{}, Rows: []Point{}}
	b := find(&es[base].Record, name)
	s.Tested = b != nil
	for i := range es {
		c := find(&es[i].Record, name)
		if c == nil {
			continue
		}
		p := Point{
			Period:          es[i].Record.Period,
			Labeled:         c.Labeled,
			Errors:          c.Errors,
			Estimate:        c.Estimate,
			UpperBound:      c.UpperBound,
			BoundConfidence: c.BoundConfidence,
			Ceiling:         ceiling,
			Verdict:         c.Verdict,
		}
		if b != nil && i != base {
			pv, err := FisherExact(Table{A: c.Errors, B: c.Labeled - c.Errors, C: b.Errors, D: b.Labeled - b.Errors}, Greater)
			if err != nil {
				return Series{}, fmt.Errorf("%s, candidate %s: %w", es[i].Path, name, err)
			}
			p.PValue = &pv
			p.Flagged = pv <= alpha
			if p.Flagged {
				s.Flagged = append(s.Flagged, p.Period)
			}
		}
		s.Rows = append(s.Rows, p)
	}
	return s, nil
}

// listPeriods joins labels, shortening long lists.
func listPeriods(ls []string) string {
	if len(ls) <= 6 {
		return strings.Join(ls, ", ")
	}
	return fmt.Sprintf("%s, … %s (%d periods)", strings.Join(ls[:3], ", "), ls[len(ls)-1], len(ls))
}

// short is the first 12 hex digits of a fingerprint.
func short(fp string) string {
	if len(fp) > 12 {
		return fp[:12]
	}
	if fp == "" {
		return "(none)"
	}
	return fp
}

// planWarnings reports records made from different plan files.
func planWarnings(ps []Period) []string {
	var order []string
	by := map[string][]string{}
	for _, p := range ps {
		if _, ok := by[p.PlanFingerprint]; !ok {
			order = append(order, p.PlanFingerprint)
		}
		by[p.PlanFingerprint] = append(by[p.PlanFingerprint], p.Label)
	}
	if len(order) < 2 {
		return nil
	}
	parts := make([]string, len(order))
	for i, fp := range order {
		parts[i] = fmt.Sprintf("plan %s in %s", short(fp), listPeriods(by[fp]))
	}
	return []string{fmt.Sprintf("records come from %d different plans: %s", len(order), strings.Join(parts, "; "))}
}

// candidateWarnings reports candidates missing from some periods, untested
// candidates and bounds at different confidences.
func candidateWarnings(t *Trend, labels []string) []string {
	var ws []string
	for _, s := range t.Candidates {
		if len(s.Rows) < len(labels) {
			have := map[string]bool{}
			for _, r := range s.Rows {
				have[r.Period] = true
			}
			var miss []string
			for _, l := range labels {
				if !have[l] {
					miss = append(miss, l)
				}
			}
			ws = append(ws, fmt.Sprintf("candidate sets differ: %s is not in %s", s.Name, listPeriods(miss)))
		}
		if !s.Tested {
			ws = append(ws, fmt.Sprintf("%s is not in the baseline period %s, so none of its periods is tested", s.Name, t.Baseline))
		}
		var confs []string
		seen := map[float64]bool{}
		for _, r := range s.Rows {
			if !seen[r.BoundConfidence] {
				seen[r.BoundConfidence] = true
				confs = append(confs, fmt.Sprintf("%s from %s", numfmt.Confidence(r.BoundConfidence), r.Period))
			}
		}
		if len(confs) > 1 {
			ws = append(ws, fmt.Sprintf("%s's upper bounds are at different confidences (%s): the multiplicity split changed", s.Name, strings.Join(confs, ", ")))
		}
	}
	return ws
}

// weightWarnings reports periods whose estimates are weighted, where the
// count-based test does not test the weighted rate.
func weightWarnings(es []Entry) []string {
	var ls []string
	for _, e := range es {
		for _, c := range e.Record.Candidates {
			if c.Labeled > 0 && math.Abs(c.Estimate-float64(c.Errors)/float64(c.Labeled)) > 1e-9 {
				ls = append(ls, e.Record.Period)
				break
			}
		}
	}
	if len(ls) == 0 {
		return nil
	}
	return []string{fmt.Sprintf("estimates in %s are stratified with unequal weights; the test compares raw error counts, not the weighted rates", listPeriods(ls))}
}

package trend

import (
	"fmt"
	"slices"

	"probity/plan/inputerr"
	"probity/plan/measure"
	"probity/plan/record"
)

// MeasureTrend says which measure a trend of records with measures
// charts (issue: error measures with their own denominators). Each
// series is then one candidate's claim on that measure: its counted items
// and events (for a ratio, on the numerator's side), the weighted
// estimate, the one-sided upper bound at the claim's level and the
// claim's ceiling; Trend.Class.Ceiling is that ceiling. No period is
// compared with the baseline: a measure's estimate is weighted over
// strata sampled at different rates, which a two-proportion test on the
// counts does not fit.
type MeasureTrend struct {
	// Measure is its name (fnr, …) and Title what a reader calls it.
	Measure string `json:"measure"`
	Title   string `json:"title"`
	// Ceiling is the claims' ceiling, the same in every record.
	Ceiling float64 `json:"ceiling"`
	// Released lists, per period in order, the candidate the record's
	// release rule released ("" for none, or no rule).
	Released []string `json:"released"`
}

// Quantity names what the trend charts, short enough for a chart's axis:
// "error rate", or the measure's name ("fnr").
func (t *Trend) Quantity() string {
	if t.Measure != nil {
		return t.Measure.Measure
	}
	return "error rate"
}

// hasMeasures reports whether a record judged measures.
func hasMeasures(r *record.Record) bool { return len(r.Measures) > 0 }

// measureSeries builds the series of a trend of records with measures:
// the measure named (default: the latest record's first claim's), for the
// candidate named (default: the latest record's released candidate, else
// every candidate with a claim on the measure). Every record must hold
// measures and the measure's ceiling must be the same in all of them.
func measureSeries(t *Trend, es []Entry, opts Options) error {
	latest := &es[len(es)-1].Record
	for _, e := range es {
		if !hasMeasures(&e.Record) {
			return inputerr.Errorf("%s holds no measures, but %s does: a trend charts one or the other", e.Path, es[len(es)-1].Path).
				WithHint("chart the records with measures apart from the others")
		}
	}
	name := opts.Measure
	if name == "" {
		name = latest.Measures[0].Measure
	}
	m, err := measure.ParseMeasure(name)
	if err != nil {
		return &inputerr.Error{Field: "measure", Msg: fmt.Sprintf("%q is not a measure (error, fnr, fpr, for or fdr)", name)}
	}
	var names []string
	switch {
	case opts.Candidate != "":
		names = []string{opts.Candidate}
	case latest.Released != nil && latest.Released.Candidate != "":
		names = []string{latest.Released.Candidate}
	default:
		for i := len(es) - 1; i >= 0; i-- {
			for _, mv := range es[i].Record.Measures {
				if mv.Measure == name && !slices.Contains(names, mv.Candidate) {
					names = append(names, mv.Candidate)
				}
			}
		}
	}
	mt := &MeasureTrend{Measure: name, Title: m.Title(), Ceiling: -1, Released: []string{}}
	t.Candidates = nil
	for _, cand := range names {
		s := Series{Name: cand, Flagged: []string{}, Rows: []Point{}}
		for _, e := range es {
			i := slices.IndexFunc(e.Record.Measures, func(mv record.MeasureVerdict) bool { return mv.Measure == name && mv.Candidate == cand })
			if i < 0 {
				continue
			}
			mv := e.Record.Measures[i]
			if mt.Ceiling < 0 {
				mt.Ceiling = mv.Ceiling
			} else if mv.Ceiling != mt.Ceiling {
				return inputerr.Errorf("%s: the %s ceiling of %s is %v, another record's %v: a trend charts one ceiling", e.Path, name, cand, mv.Ceiling, mt.Ceiling)
			}
			p := Point{Period: e.Record.Period, Labeled: mv.Labeled, Errors: mv.Events, UpperBound: mv.UpperBound,
				BoundConfidence: 1 - mv.Level, Ceiling: mv.Ceiling, Verdict: mv.Verdict}
			if mv.Estimate != nil {
				p.Estimate = *mv.Estimate
			}
			s.Rows = append(s.Rows, p)
		}
		if len(s.Rows) == 0 {
			return &inputerr.Error{Field: "candidate", Msg: fmt.Sprintf("no record holds a %s claim for %q", name, cand)}
		}
		t.Candidates = append(t.Candidates, s)
	}
	for _, e := range es {
		rel := ""
		if e.Record.Released != nil {
			rel = e.Record.Released.Candidate
		}
		mt.Released = append(mt.Released, rel)
	}
	t.Measure = mt
	t.Class.Ceiling = mt.Ceiling
	return nil
}

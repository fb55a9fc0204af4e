package sampling

import (
	"fmt"
	"slices"
	"sort"
	"strconv"
	"strings"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/measure"
	"probity/sampling/drawfolder"
)

// Measures is the allocation rule of a plan with measures: the strata are
// the user's crossed with the candidates' predictions, and n_h is the
// smallest design meeting every claim of the plan (plan/measure) on the
// log's actual stratum sizes.
const Measures = "measures"

// PredictionStrata returns what a plan with measures adds to the draw's
// strata: the label columns of its candidates, or one band on the score
// column at its thresholds (a threshold's predicted positives are the
// bands at or above it). Nil and nil for a plan without measures.
func PredictionStrata(p *plan.File) ([]string, *Band) {
	if p.Measures == nil || len(p.Candidates) == 0 {
		return nil, nil
	}
	if p.Candidates[0].ScoreColumn != "" {
		b := &Band{Column: p.Candidates[0].ScoreColumn}
		for _, c := range p.Candidates {
			if !slices.Contains(b.Edges, *c.Threshold) {
				b.Edges = append(b.Edges, *c.Threshold)
			}
		}
		sort.Float64s(b.Edges)
		return nil, b
	}
	var cols []string
	for _, c := range p.Candidates {
		if !slices.Contains(cols, c.Column) {
			cols = append(cols, c.Column)
		}
	}
	return cols, nil
}

// AddPredictionStrata adds the plan's prediction strata to the draw's
// own, after them, and sets the allocation rule; a user's stratum on the
// same column is refused (the band would be cut twice).
func AddPredictionStrata(in *DrawInput) error {
	cols, band := PredictionStrata(in.Plan)
	if cols == nil && band == nil {
		return nil
	}
	for _, c := range cols {
		if slices.Contains(in.StrataColumns, c) {
			return &inputerr.Error{Field: "strata_columns", Msg: fmt.Sprintf("%s holds a candidate's prediction, which the plan's measures stratify by already", c)}
		}
	}
	if band != nil {
		for _, b := range in.Bands {
			if b.Column == band.Column {
				return &inputerr.Error{Field: "bands", Msg: fmt.Sprintf("%s is the candidates' score, which the plan's measures band at the thresholds already", b.Column)}
			}
		}
		in.Bands = append(in.Bands, *band)
	}
	in.StrataColumns = append(in.StrataColumns, cols...)
	in.Alloc.Rule = Measures
	return nil
}

// measureStrata returns, for each stratum of the draw, which candidates
// predict the positive class for all of its decisions, read from the
// stratum's label (its prediction parts come last, as AddPredictionStrata
// put them).
func measureStrata(in DrawInput, counts []StratumCount) ([][]bool, error) {
	p := in.Plan
	cols, band := PredictionStrata(p)
	var bandLabels []string
	if band != nil {
		bandLabels = band.Labels()
	}
	out := make([][]bool, len(counts))
	for i, c := range counts {
		parts := strings.Split(c.Label, "|")
		want := len(in.StrataColumns) + len(in.Bands)
		if len(parts) != want {
			return nil, fmt.Errorf("internal: stratum label %q has %d parts, not %d", c.Label, len(parts), want)
		}
		fl := make([]bool, len(p.Candidates))
		for j, cand := range p.Candidates {
			if band != nil {
				k := slices.Index(bandLabels, parts[len(parts)-1])
				if k < 0 {
					return nil, fmt.Errorf("internal: band %q not found", parts[len(parts)-1])
				}
				fl[j] = k > 0 && *cand.Threshold <= band.Edges[k-1]
				continue
			}
			pos := len(in.StrataColumns) - len(cols) + slices.Index(cols, cand.Column)
			fl[j] = parts[pos] == p.Measures.Positive
		}
		out[i] = fl
	}
	return out, nil
}

// AllocateMeasures is the allocation of a plan with measures for strata
// counted elsewhere (a draw inside a database): strata and bands are the
// draw's, the plan's prediction strata included (as AddPredictionStrata
// adds them), counts the strata sorted by label. It is the file draw's own
// allocation (allocateMeasures), so both give the same design.
func AllocateMeasures(p *plan.File, strata []string, bands []Band, spare int, counts []StratumCount) ([]StratumAllocation, *drawfolder.MeasuresInfo, error) {
	in := DrawInput{Plan: p, StrataColumns: strata, Bands: bands, Alloc: AllocOptions{Rule: Measures, Spare: spare}}
	return allocateMeasures(in, counts)
}

// allocateMeasures sizes the plan's design on the log's actual strata
// and allocates it: n_h is the design's, the spares follow.
func allocateMeasures(in DrawInput, counts []StratumCount) ([]StratumAllocation, *drawfolder.MeasuresInfo, error) {
	flagged, err := measureStrata(in, counts)
	if err != nil {
		return nil, nil, err
	}
	strata := make([]measure.Stratum, len(counts))
	for i, c := range counts {
		strata[i] = measure.Stratum{Label: c.Label, Population: c.Population}
	}
	pd, err := measure.NewPeriodDesign(in.Plan, strata, flagged)
	if err != nil {
		return nil, nil, inputerr.Errorf("the plan's measures cannot be met on this log's strata: %v", err).WithHint("plan again with shares of predictions like this log's, or larger ceilings")
	}
	out := make([]StratumAllocation, len(counts))
	for i, c := range counts {
		n := pd.Sample[i]
		spare := min(int64(in.Alloc.Spare), c.Population-int64(n))
		a := StratumAllocation{Label: c.Label, Population: c.Population, Sample: n, Spare: int(spare)}
		if n > 0 {
			a.Weight = float64(c.Population) / float64(n)
		}
		out[i] = a
	}
	info := &drawfolder.MeasuresInfo{Positive: in.Plan.Measures.Positive, Flagged: flagged, Uniform: pd.Uniform, Level: roundRisk(pd.Level)}
	if d := pd.Departure; d != nil {
		info.Departure = &drawfolder.MeasuresDeparture{Cell: d.Cell, LogShare: roundRisk(d.Log), PlanShare: roundRisk(d.Plan)}
	}
	for i, cd := range pd.Claims {
		info.Claims = append(info.Claims, drawfolder.MeasureClaimInfo{Candidate: in.Plan.Candidates[cd.Candidate].Name,
			Measure: cd.Measure.String(), Ceiling: cd.Ceiling, Counted: cd.Counted, Floor: cd.Floor, BAccept: cd.BAccept,
			ProducerRisk: roundRisk(pd.ProducerRisk[i]), Planned: !slices.Contains(pd.Unplanned, i)})
	}
	return out, info, nil
}

// roundRisk keeps six significant digits of a risk, so the manifest reads
// well and the same draw gives the same bytes.
func roundRisk(v float64) float64 {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 6, 64), 64)
	return r
}

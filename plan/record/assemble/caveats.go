package assemble

import (
	"fmt"
	"math"
	"strconv"

	"probity/plan/record"
	"probity/templates"
)

// caveats are the findings that change what a verdict means, for page 1:
//
//   - for each accepted candidate, when the label error measured on the
//     doubled items is at least its margin: a single labeler was wrong on
//     at least ε = (disagreements / compared) / 2 of the items (when two
//     labels differ, at least one is wrong), and a share ε of wrong
//     reference labels can move the measured error by up to ε (see
//     agreement's note), so the guarantee "true error below the ceiling"
//     holds only if ε < ceiling − upper bound; when even ε ≥ ceiling −
//     estimate, label error of that size alone could put the true error at
//     the ceiling;
//   - for a safety, medical or vehicle use judged without a measure of
//     label error (no double labeling, or no doubled item both labelers
//     put in a class): that label error was not measured.
func caveats(rec *record.Record) []record.Caveat {
	lq := rec.LabelQuality
	ceiling := rec.Plan.Ceiling
	if lq == nil || lq.Compared == 0 {
		if !templates.SafetyRelevant(rec.Use) {
			return nil
		}
		why := "no item was given a second, independent label"
		if lq != nil {
			why = "no doubled item was put in a class by both labelers"
		}
		return []record.Caveat{{Kind: record.CaveatLabelErrorUnmeasured, Text: fmt.Sprintf(
			"Label error was not measured: %s, so nothing in this record shows how often the reference labels are wrong. "+
				"Every bound holds only if they are right; for a %s use, have part of the sample labeled twice, independently.", why, rec.Use)}}
	}
	eps := lq.DisagreementRate / 2
	if eps <= 0 {
		return nil
	}
	var out []record.Caveat
	for _, c := range rec.Candidates {
		if c.Verdict != record.Accept || eps < ceiling-c.UpperBound {
			continue
		}
		text := fmt.Sprintf("%s is accepted with an upper bound of %s against the ceiling %s, but on the doubled items a single labeler "+
			"was wrong on at least %s of items: label error of that size consumes the margin of %s between the bound and the ceiling",
			c.Name, pctUp(c.UpperBound), pctExact(ceiling), pctDown(eps), pctDown(math.Max(0, ceiling-c.UpperBound)))
		if eps >= ceiling-c.Estimate {
			text += fmt.Sprintf(", and even the distance of %s from its estimate %s to the ceiling, so label error alone could put its true error at the ceiling.",
				pctDown(math.Max(0, ceiling-c.Estimate)), pct(c.Estimate))
		} else {
			text += ". The stated false-accept risk holds only if the reference labels are better than the doubled items show."
		}
		out = append(out, record.Caveat{Kind: record.CaveatLabelErrorMargin, Candidate: c.Name, Text: text})
	}
	return out
}

// Percentages with three decimals, as the PDF prints rates: pct rounds,
// pctUp rounds up (a bound), pctDown rounds down (an "at least");
// pctExact shows a plan value with the digits it needs.
func pct(x float64) string     { return percent(math.Round(x * 1e5)) }
func pctUp(x float64) string   { return percent(math.Ceil(x*1e5 - 1e-6)) }
func pctDown(x float64) string { return percent(math.Floor(x*1e5 + 1e-6)) }
func percent(units float64) string {
	return strconv.FormatFloat(units/1000, 'f', 3, 64) + " %"
}
func pctExact(x float64) string {
	return strconv.FormatFloat(math.Round(x*1e10)/1e8, 'f', -1, 64) + " %"
}

package assemble

import (
	"fmt"
	"math"

	"probity/plan/numfmt"
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
	if len(rec.Measures) > 0 {
		return measureCaveats(rec, eps)
	}
	var out []record.Caveat
	for _, c := range rec.Candidates {
		if c.Verdict != record.Accept || eps < ceiling-c.UpperBound {
			continue
		}
		text := fmt.Sprintf("%s is accepted with an upper bound of %s against the ceiling %s, but on the doubled items a single labeler "+
			"was wrong on at least %s of items: label error of that size consumes the margin of %s between the bound and the ceiling",
			c.Name, numfmt.RateUp(c.UpperBound), numfmt.Setting(ceiling), numfmt.RateDown(eps), numfmt.RateDown(math.Max(0, ceiling-c.UpperBound)))
		if eps >= ceiling-c.Estimate {
			text += fmt.Sprintf(", and even the distance of %s from its estimate %s to the ceiling, so label error alone could put its true error at the ceiling.",
				numfmt.RateDown(math.Max(0, ceiling-c.Estimate)), numfmt.Rate(c.Estimate))
		} else {
			text += ". The stated false-accept risk holds only if the reference labels are better than the doubled items show."
		}
		out = append(out, record.Caveat{Kind: record.CaveatLabelErrorMargin, Candidate: c.Name, Text: text})
	}
	return out
}

// measureCaveats are the label-error caveats of a record of measures. A
// rate measured within a group — the positives (fnr), the negatives (fpr),
// the cleared (for), the flagged (fdr) — is moved by wrong reference
// labels far more than the overall error is when they fall in that group:
// a share ε of wrong labels among all decisions, all in a group holding a
// share s of them, moves the group's rate by about ε/s (k = εN wrong
// labels among sN decisions). For each accepted claim whose margin
// (ceiling − upper bound) is at most ε/s, with s the group's estimated
// share (the candidate's estimated confusion), page 1 says so.
func measureCaveats(rec *record.Record, eps float64) []record.Caveat {
	var out []record.Caveat
	for _, m := range rec.Measures {
		if m.Verdict != record.Accept {
			continue
		}
		share, group := measureGroupShare(rec, m)
		if share <= 0 {
			continue
		}
		shift := math.Min(1, eps/share)
		if shift < m.Ceiling-m.UpperBound {
			continue
		}
		text := fmt.Sprintf("%s of %s is accepted with an upper bound of %s against the ceiling %s, but on the doubled items a single labeler "+
			"was wrong on at least %s of items", m.Measure, m.Candidate, numfmt.RateUp(m.UpperBound), numfmt.Setting(m.Ceiling), numfmt.RateDown(eps))
		if share < 1 {
			text += fmt.Sprintf("; %s are an estimated %s of the decisions, so wrong labels of that share, falling among them, could move %s by about %s",
				group, numfmt.Rate(share), m.Measure, numfmt.RateDown(shift))
		} else {
			text += fmt.Sprintf(", and wrong labels of that share can move %s by as much", m.Measure)
		}
		text += fmt.Sprintf(", more than the margin of %s. The stated false-accept risk holds only if the reference labels are better than the doubled items show.",
			numfmt.RateDown(math.Max(0, m.Ceiling-m.UpperBound)))
		out = append(out, record.Caveat{Kind: record.CaveatLabelErrorMargin, Candidate: m.Candidate, Text: text})
	}
	return out
}

// measureGroupShare is the estimated share of all decisions in the group a
// claim's rate is measured in, from the candidate's estimated confusion,
// and the group's name; 0 when it is not known.
func measureGroupShare(rec *record.Record, m record.MeasureVerdict) (float64, string) {
	for _, c := range rec.EstimatedConfusion {
		if c.Candidate != m.Candidate {
			continue
		}
		n := c.TP + c.FP + c.FN + c.TN
		if n <= 0 {
			return 0, ""
		}
		switch m.Measure {
		case "fnr":
			return (c.TP + c.FN) / n, "the true positives"
		case "fpr":
			return (c.FP + c.TN) / n, "the true negatives"
		case "for":
			return (c.FN + c.TN) / n, "the decisions the candidate cleared"
		case "fdr":
			return (c.TP + c.FP) / n, "the decisions the candidate flagged"
		case "error":
			return 1, "all decisions"
		}
	}
	return 0, ""
}

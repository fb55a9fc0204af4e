package pdfreport

import (
	"probity/plan/numfmt"
	"strings"

	"probity/plan/record"
)

// ruleTitles name the rules of record.AppliedRule in print.
var ruleTitles = map[string]string{
	record.RulePlan:            "the plan's rule",
	record.RuleStratifiedCount: "the stratified count rule",
	record.RuleSequential:      "the plan's sequential boundaries",
}

// ruleApplied prints which rule the verdicts rest on, why, its sources
// and, under the stratified count rule, the counted items per stratum and
// the descriptive Korn–Graubard bounds. Records made before the rule was
// recorded print nothing here.
func (d *doc) ruleApplied(c *content) {
	r := c.rec.Method.Rule
	if r == nil {
		return
	}
	d.subheading("Rule applied", 2*lineH)
	title := ruleTitles[r.Name]
	if title == "" {
		title = r.Name
	}
	d.body("The verdicts rest on " + title + ": " + strings.TrimSpace(r.Reason) + ".")
	for _, s := range r.Sources {
		d.bullet(s + ".")
	}
	if r.Name != record.RuleStratifiedCount {
		return
	}
	notes := false
	for _, s := range r.Strata {
		notes = notes || s.Unknown || s.Counted < s.Judged
	}
	rows := [][]cell{}
	for _, s := range r.Strata {
		last := "–"
		if s.LastItem > 0 {
			last = "item " + itoa(s.LastItem)
		}
		note := ""
		switch {
		case s.Unknown:
			note = "no item: counted as unknown"
		case s.Counted < s.Judged:
			note = "thinned"
		}
		row := []cell{{text: s.Label}, {text: itoa(s.Judged)}, {text: itoa(s.Counted)}, {text: last}}
		if notes {
			row = append(row, cell{text: note})
		}
		rows = append(rows, row)
	}
	cols := []column{{head: "Stratum", w: 1}, {head: "Judged", fit: true, align: "R"}, {head: "Counted", fit: true, align: "R"},
		{head: "Last counted", fit: true, align: "R"}}
	if notes {
		cols = append(cols, column{head: "Note", fit: true})
	}
	d.drawTable(&table{title: "Counted items", header: true, rows: rows, cols: cols})
	d.note("In each stratum the counted items are its first judged items in worksheet order (the sample's items in key order, then the spares that replaced some of them), up to the last counted item.")
	var kg []string
	for _, cand := range c.rec.Candidates {
		if cand.KornGraubardUpper != nil {
			kg = append(kg, cand.Name+" "+numfmt.RateUp(*cand.KornGraubardUpper))
		}
	}
	if len(kg) > 0 {
		d.body("Korn–Graubard bound on the weighted estimate, at the same confidence (descriptive only; approximate, and the verdict does not rest on it): " + strings.Join(kg, ", ") + ".")
	}
}

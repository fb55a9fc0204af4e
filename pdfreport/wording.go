package pdfreport

import (
	"strings"

	"probity/plan/numfmt"
	"probity/templates"
)

// amber marks the cautions.
var amber = rgb{214, 140, 0}

// blocksOf splits wording into paragraphs and bullets.
func blocksOf(text string) []templates.Block { return templates.Blocks(text) }

// text fills in a wording template, recording a failure on the document.
func (d *doc) text(c *content, name string) string {
	s, err := c.tpl.Text(name, c.fields)
	if err != nil {
		d.pdf.SetError(err)
		return ""
	}
	return s
}

// conformity prints the statement of conformity and each candidate's
// finding under it.
func (d *doc) conformity(c *content) {
	d.heading("Statement of conformity and decision rule")
	d.wordingBlocks(d.text(c, templates.DecisionRule))
	if len(c.rec.Candidates) == 0 {
		return
	}
	if hasMeasures(c.rec) {
		d.measuresFindings(c)
		return
	}
	d.subheading("Findings", 2*lineH)
	for _, cand := range c.rec.Candidates {
		finding := "does not conform"
		switch cand.Verdict {
		case "ACCEPT":
			finding = "conforms"
		case "":
			finding = "has no verdict"
		}
		d.bullet(cand.Name + " " + finding + " (" + cand.Verdict + "): upper bound " +
			numfmt.RateUp(cand.UpperBound) + " against the ceiling " + c.fields.Ceiling + "; " +
			plural(cand.Errors, "error", "errors") + " among " + itoa(cand.Labeled) + " labeled decisions.")
	}
	d.space(1)
}

// cautions prints the cautions for the declared use, marked with a bar.
func (d *doc) cautions(c *content) {
	title := "Cautions for " + c.use + " use"
	if templates.SafetyRelevant(c.use) {
		title = "Cautions for " + c.use + " use (safety-relevant)"
	}
	d.heading(title)
	text, err := c.tpl.Caution(c.use)
	if err != nil {
		d.pdf.SetError(err)
		return
	}
	for _, b := range blocksOf(text) {
		lines := d.barredLines(b.Text, b.Bullet)
		d.need(float64(min(len(lines), 2)) * lineH)
		for i, l := range lines {
			d.need(lineH)
			y := d.pdf.GetY()
			d.fillColour(amber)
			d.pdf.Rect(marginX, y, 1.3, lineH, "F")
			indent := 5.0
			if b.Bullet {
				indent = 10
				if i == 0 {
					d.pdf.SetXY(marginX+5.5, y)
					d.pdf.CellFormat(4, lineH, "•", "", 0, "L", false, 0, "")
				}
			}
			d.font(cautionStyle(b.Bullet), bodySize)
			d.pdf.SetXY(marginX+indent, y)
			d.pdf.CellFormat(d.contentW()-indent, lineH, l, "", 1, "L", false, 0, "")
		}
		// Close the gap between blocks with the bar as well.
		y := d.pdf.GetY()
		if y+1.6 <= d.bottomY() {
			d.pdf.Rect(marginX, y, 1.3, 1.6, "F")
			d.pdf.SetY(y + 1.6)
		}
	}
	d.space(1.5)
}

// cautionStyle is bold for paragraphs (the opening statement of each
// caution) and regular for bullet items.
func cautionStyle(bullet bool) string {
	if bullet {
		return ""
	}
	return "B"
}

// barredLines wraps a caution block to the width left beside the bar.
func (d *doc) barredLines(text string, bullet bool) []string {
	d.font(cautionStyle(bullet), bodySize)
	indent := 5.0
	if bullet {
		indent = 10
	}
	return d.wrap(text, d.contentW()-indent)
}

// methodSection prints the method statement and the assumptions.
func (d *doc) methodSection(c *content) {
	d.heading("Method and assumptions")
	d.wordingBlocks(d.text(c, templates.Method))
	m := c.rec.Method
	// With measures the verdicts rest on the claims (the wording above),
	// not on the overall error's rule the record also states.
	if s := strings.TrimSpace(m.Statement); s != "" && !hasMeasures(c.rec) {
		d.subheading("Method as recorded", 2*lineH)
		d.body(s)
	}
	if !hasMeasures(c.rec) {
		d.ruleApplied(c)
	}
	d.subheading("Assumptions", 2*lineH)
	d.wordingBlocks(d.text(c, templates.Assumptions))
	for _, a := range m.Assumptions {
		if strings.TrimSpace(a) != "" {
			d.bullet(a)
		}
	}
}

// deviationsSection lists the departures from the plan, or says there
// were none.
func (d *doc) deviationsSection(c *content) {
	d.heading("Deviations from the plan")
	dev := c.rec.Deviations
	if len(dev.SparesUsed) == 0 && len(dev.Unlabeled) == 0 && len(dev.Unsure) == 0 && len(dev.SparesUnused) == 0 &&
		!dev.AllowIncomplete && len(dev.Notes) == 0 && dev.DoubleNotLabeled == 0 && dev.NoMissMeasure == "" {
		d.wordingBlocks(d.text(c, templates.DeviationsNone))
		return
	}
	if dev.AllowIncomplete {
		d.wordingBlocks(d.text(c, templates.DeviationsIncomplete))
	}
	list := func(title string, ids []string) {
		if len(ids) == 0 {
			d.bullet(title + ": none.")
			return
		}
		d.bullet(title + " (" + itoa(len(ids)) + "): " + strings.Join(ids, ", ") + ".")
	}
	list("Spare items used", dev.SparesUsed)
	list("Items left unlabeled", dev.Unlabeled)
	list("Labels marked unsure", dev.Unsure)
	if len(dev.Replacements) > 0 {
		pairs := make([]string, len(dev.Replacements))
		for i, r := range dev.Replacements {
			pairs[i] = r.Item + " by spare " + r.Spare + " (" + r.Reason + ")"
		}
		d.bullet("Items replaced by the draw's fixed rule (within a stratum, the items marked unsure, in worksheet order, take the spares in the order they were drawn): " +
			strings.Join(pairs, "; ") + ".")
	}
	if len(dev.SparesUnused) > 0 {
		d.bullet("Labeled spares that replaced nothing, unused (" + itoa(len(dev.SparesUnused)) + "): " + strings.Join(dev.SparesUnused, ", ") + ".")
	}
	if s := dev.DoubleNotLabeledText(); s != "" {
		d.bullet(s)
	}
	if r := strings.TrimSpace(dev.NoMissMeasure); r != "" {
		d.bullet("No claim on the misses of the positive class " + positiveClass(c.rec) + " (false-negative or false omission rate), which a " + c.use +
			" use needs; the plan states why: \u201c" + r + "\u201d (shown on page 1).")
	}
	for _, n := range dev.Notes {
		if strings.TrimSpace(n) != "" {
			d.bullet(n)
		}
	}
	d.space(1)
}

// scopeSection prints the scope statement.
func (d *doc) scopeSection(c *content) {
	d.heading("Scope")
	d.wordingBlocks(d.text(c, templates.Scope))
}

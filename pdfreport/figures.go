package pdfreport

import (
	"github.com/jung-kurt/gofpdf"

	"probity/plan"
	"probity/plan/record"
)

// ocSection embeds the OC figure with its caption, kept on one page.
func (d *doc) ocSection(c *content) {
	if c.oc == nil {
		d.heading("Operating characteristic of the rule")
		d.body("The record holds no operating-characteristic curve.")
		return
	}
	p := c.rec.Plan
	rule := "n = " + itoa(p.SampleSize) + ", c = " + itoa(p.AcceptanceNumber)
	if p.Design == plan.DesignSequential {
		rule = "sequential, at most " + itoa(p.SampleSize) + " labels"
	}
	caption := "The curve gives, for each true error rate, the probability that a candidate is accepted by the " +
		"per-candidate rule (" + rule + "). " +
		"At the ceiling (red dashed line) its height is the consumer's risk, the chance of accepting a candidate " +
		"that is exactly at the ceiling."
	if r := c.rec.Method.Rule; r != nil && r.Name == record.RuleStratifiedCount {
		caption = "The curve gives, for each true error rate, the probability that a candidate is accepted by the " +
			"stratified count rule applied to this draw (at most " + itoa(r.AcceptanceNumber) + " errors among the " +
			itoa(r.CountedSize) + " counted items) when every stratum has that error rate. Errors spread otherwise " +
			"change the curve; at the ceiling the red dot bounds the chance of acceptance for every spread (the consumer's risk)."
	}
	if p.Anticipated != nil {
		caption += " The green dotted line marks the anticipated error; one minus the curve's height there (green dot) is the producer's risk."
	}
	if len(c.rec.Candidates) > 0 {
		caption += " Triangles on the axis mark each candidate's observed estimate."
	}
	w := d.contentW()
	h := w * ocHeightMM / ocWidthMM
	d.font("I", smallSize)
	capLines := d.wrap(caption, w)
	d.headingKeep("Operating characteristic of the rule", h+float64(len(capLines))*smallLineH+3)
	y := d.pdf.GetY()
	d.pdf.ImageOptions("oc-curve", marginX, y, w, h, false, gofpdf.ImageOptions{ImageType: "PNG"}, 0, "")
	d.pdf.SetY(y + h + 1.5)
	d.note(caption)
}

package pdfreport

import (
	"strings"

	"github.com/jung-kurt/gofpdf"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// verdictWord is a verdict for running text ("no verdict" when empty).
func verdictWord(v string) string {
	if v == "" {
		return "no verdict"
	}
	return v
}

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
	if marks := estimateMarks(c.rec); len(marks) > 0 {
		var keys []string
		for _, m := range marks {
			cand := c.rec.Candidates[m.number-1]
			keys = append(keys, itoa(m.number)+" = "+cand.Name+" ("+numfmt.Rate(cand.Estimate)+", "+verdictWord(cand.Verdict)+")")
		}
		caption += " The numbered triangles in the strip under the axis are the candidates' observed estimates (errors / " +
			"labeled), observations on the same scale, not true error rates: " + strings.Join(keys, "; ") + "."
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

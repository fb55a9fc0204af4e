package pdfreport

import (
	"math"
	"strings"

	"probity/plan/numfmt"
	"probity/plan/record"
)

// agreementText prints a coefficient with its interval and chance
// agreement, or why it is undefined.
func agreementText(a record.Agreement) string {
	if !a.Defined {
		if a.Note != "" {
			return a.Note
		}
		return "undefined"
	}
	s := numfmt.Coefficient(a.Value) + "   (" + numfmt.Confidence(a.Confidence) + " interval " + numfmt.CoefficientDown(a.Lower) + " to " + numfmt.CoefficientUp(a.Upper) +
		"; standard error " + numfmt.Coefficient(a.StdErr) + "; chance agreement " + numfmt.Coefficient(a.ChanceAgreement) + ")"
	if a.Note != "" {
		s += "; " + a.Note
	}
	return s
}

// labelerName shows a blank labeler name.
func labelerName(s string) string {
	if strings.TrimSpace(s) == "" {
		return "(not named)"
	}
	return s
}

// labelText shows a worksheet label, naming blanks.
func labelText(s string) string {
	if s == "" {
		return "(blank)"
	}
	return s
}

// labelQualitySection prints the double-labeling evidence: the agreement
// figures, the agreement table, the labelers, every disagreement with its
// resolution, the unsure items and what label error does to the bound. A
// record without double labeling (LabelQuality nil) has no such section.
func (d *doc) labelQualitySection(c *content) {
	q := c.rec.LabelQuality
	if q == nil {
		return
	}
	d.heading("Label quality")
	d.body(plural(q.Doubled, "item was", "items were") + " drawn at random for a second, independent label; " +
		plural(q.Compared, "of them was", "of them were") + " put in a class by both labelers and " +
		"enter the agreement figures below (items left blank or unsure by a labeler do not).")
	rows := [][]cell{
		kv("Observed agreement", pctOrDash(q.Compared, q.ObservedAgreement)+" of "+itoa(q.Compared)+" compared items"),
		kv("Cohen's kappa", agreementText(q.Kappa)),
		kv("Gwet's AC1", agreementText(q.AC1)),
		kv("Disagreements", disagreementText(q)),
		kv("Resolution", resolutionText(q)),
		kv("Unsure items", itoa(q.Unsure)+"; "+q.UnsureTreatment),
	}
	d.drawTable(&table{title: "Label quality", cols: []column{{w: 26}, {w: 74}}, rows: rows, keyFill: true, size: bodySize - 0.5})
	d.note("Kappa: " + q.Kappa.Method + ". AC1: " + q.AC1.Method + ". AC1 stays meaningful when one class dominates, " +
		"as it does when errors are rare; kappa then falls even when the labelers almost always agree.")

	if len(q.Classes) > 0 && len(q.Table) == len(q.Classes) {
		d.agreementTable(q)
	}
	if len(q.Labelers) > 0 {
		rows := make([][]cell, 0, len(q.Labelers))
		for _, l := range q.Labelers {
			rows = append(rows, []cell{{text: labelerName(l.Name)}, {text: itoa(l.First), align: "R"}, {text: itoa(l.Second), align: "R"}})
		}
		t := &table{title: "Labelers", header: true, width: math.Min(110, d.contentW()),
			cols: []column{{head: "Labeler", w: 2.2, align: "L"}, {head: "Labels, first worksheet", w: 1.4, align: "R"}, {head: "Labels, second worksheet", w: 1.4, align: "R"}},
			rows: rows}
		d.subheading("Labelers", d.tableHeight(t))
		d.drawTable(t)
	}
	d.disagreementTable(q)
	if len(q.Warnings) > 0 {
		d.subheading("Warnings", 2*lineH)
		for _, w := range q.Warnings {
			d.bullet(w)
		}
	}
	d.subheading("What label error does to the bound", 3*lineH)
	d.body(q.Note)
}

// pctOrDash prints a share, or a dash when nothing was compared.
func pctOrDash(n int, x float64) string {
	if n == 0 {
		return "–"
	}
	return numfmt.Rate(x)
}

func disagreementText(q *record.LabelQuality) string {
	s := itoa(len(q.Disagreements)) + " listed below"
	if q.Compared > 0 {
		s += "; two different classes on " + itoa(q.Disagreed) + " of " + itoa(q.Compared) + " compared items (" +
			numfmt.Rate(q.DisagreementRate) + "; one-sided " + numfmt.Confidence(q.Kappa.Confidence) + " upper bound " + numfmt.RateUp(q.DisagreementUpper) + ")"
	}
	return s
}

func resolutionText(q *record.LabelQuality) string {
	s := plural(q.Adjudicated, "item", "items") + " adjudicated"
	if q.Unadjudicated > 0 {
		s += "; " + plural(q.Unadjudicated, "disagreement", "disagreements") + " not adjudicated, each counted as an error for every candidate (unadjudicated disagreements allowed)"
	} else {
		s += "; no disagreement left open"
	}
	if q.Strict {
		s += "; labeler independence enforced"
	}
	return s
}

// agreementTable prints the classes × classes table of the compared items.
func (d *doc) agreementTable(q *record.LabelQuality) {
	k := len(q.Classes)
	cols := []column{{head: "First \\ second", w: 1.6, align: "L"}}
	for _, cl := range q.Classes {
		cols = append(cols, column{head: cl, w: 1, align: "R"})
	}
	cols = append(cols, column{head: "Total", w: 1, align: "R"})
	colTotals := make([]int, k)
	grand := 0
	var rows [][]cell
	for i, row := range q.Table {
		r := []cell{{text: q.Classes[i], bold: true}}
		total := 0
		for j := 0; j < k; j++ {
			n := 0
			if j < len(row) {
				n = row[j]
			}
			cl := cell{text: itoa(n)}
			if i == j {
				cl.fill = &diagFill
			} else if n > 0 {
				cl.fill, cl.bold = &errFill, true
			}
			r = append(r, cl)
			total += n
			colTotals[j] += n
		}
		grand += total
		rows = append(rows, append(r, cell{text: itoa(total)}))
	}
	last := []cell{{text: "Total", bold: true}}
	for _, n := range colTotals {
		last = append(last, cell{text: itoa(n)})
	}
	rows = append(rows, append(last, cell{text: itoa(grand), bold: true}))
	width := math.Min(34+20*float64(k+1), d.contentW())
	t := &table{title: "Agreement table", cols: cols, rows: rows, header: true, width: width}
	d.subheading("Agreement table (rows: first label, columns: second label)", d.tableHeight(t))
	d.drawTable(t)
}

// disagreementTable lists every disagreement and its resolution.
func (d *doc) disagreementTable(q *record.LabelQuality) {
	if len(q.Disagreements) == 0 {
		d.subheading("Disagreements", lineH)
		d.body("None: the labelers agreed on every doubled item they both put in a class.")
		return
	}
	rows := make([][]cell, 0, len(q.Disagreements))
	for _, x := range q.Disagreements {
		res := cell{text: "adjudicated: " + x.Final, bold: true}
		if x.Resolution == record.ResolvedCountedAsError {
			res = cell{text: "not adjudicated: counted as an error", bold: true, ink: &rejectColour}
		}
		rows = append(rows, []cell{
			{text: itoa(x.Item), align: "R"},
			{text: x.RecordID, mono: true},
			{text: labelText(x.First) + " (" + labelerName(x.FirstLabeler) + ")"},
			{text: labelText(x.Second) + " (" + labelerName(x.SecondLabeler) + ")"},
			res,
			{text: strings.TrimSpace(strings.Join(nonEmpty(x.DecidedBy, x.Note), ": "))},
		})
	}
	t := &table{title: "Disagreements", header: true, rows: rows, cols: []column{
		{head: "Item", w: 0.6, align: "R"}, {head: "Record id", w: 1.6, align: "L"},
		{head: "First label", w: 1.5, align: "L"}, {head: "Second label", w: 1.5, align: "L"},
		{head: "Resolution", w: 1.6, align: "L"}, {head: "Decided by: note", w: 2.4, align: "L"},
	}}
	d.subheading("Disagreements and their resolution", math.Min(d.tableHeight(t), 30))
	d.drawTable(t)
}

// nonEmpty keeps the non-blank strings.
func nonEmpty(ss ...string) []string {
	var out []string
	for _, s := range ss {
		if strings.TrimSpace(s) != "" {
			out = append(out, strings.TrimSpace(s))
		}
	}
	return out
}

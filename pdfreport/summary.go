package pdfreport

import (
	"strings"

	"probity/plan/chrono"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// titleBlock prints the record's title and key facts at the top of page 1.
func (d *doc) titleBlock(c *content) {
	rec := c.rec
	d.font("B", 9)
	d.textColour(mutedColour)
	d.pdf.SetXY(marginX, marginTop)
	d.pdf.CellFormat(d.contentW(), 5, "ACCEPTANCE RECORD · CLASSIFIER ERROR RATE", "", 1, "L", false, 0, "")
	d.font("B", 19)
	d.textColour(headingColour)
	for _, l := range d.wrap(systemName(rec), d.contentW()) {
		d.pdf.SetX(marginX)
		d.pdf.CellFormat(d.contentW(), 9, l, "", 1, "L", false, 0, "")
	}
	d.space(1)
	n := len(rec.Candidates)
	what := itoa(n) + " candidates"
	if n == 1 {
		what = "one candidate"
	}
	intro := "Statistical acceptance of " + what + " against an error ceiling of " + c.fields.Ceiling +
		" at " + c.fields.Confidence + " confidence."
	if hasMeasures(rec) {
		intro = "Statistical acceptance of " + what + " on error measures for the positive class " + positiveClass(rec) +
			" (" + c.fields.Ceiling + "), at " + c.fields.Confidence + " confidence for all claims together."
	}
	d.paragraph(intro, "", bodySize+1, lineH+0.4, 0, inkColour)
	d.space(2.5)
	period := rec.Period
	if period == "" {
		period = "not stated"
	}
	tool := "probity " + rec.ToolVersion
	issue := "1 (first issue)"
	if rec.Supersedes != "" {
		issue = itoa(revision(rec)) + ", supersedes record " + rec.Supersedes
	}
	wording := cell{text: "built-in"}
	if n := len(rec.Wording.Replaced); n > 0 {
		wording = cell{text: "CUSTOM: " + strings.Join(rec.Wording.Replaced, ", ") + " replaced by the issuer", bold: true, ink: &amber}
	}
	d.drawTable(&table{
		cols: []column{{w: 17}, {w: 36}, {w: 15}, {w: 32}},
		rows: [][]cell{
			{{text: "Record id", bold: true, fill: &headFill}, {text: rec.RecordID, mono: true},
				{text: "Issued", bold: true, fill: &headFill}, {text: issuedText(rec)}},
			{{text: "Revision", bold: true, fill: &headFill}, {text: issue},
				{text: "Wording", bold: true, fill: &headFill}, wording},
			{{text: "Period", bold: true, fill: &headFill}, {text: period},
				{text: "Declared use", bold: true, fill: &headFill}, {text: c.use}},
			{{text: "System", bold: true, fill: &headFill}, {text: systemName(rec)},
				{text: "Tool", bold: true, fill: &headFill}, {text: tool}},
		},
		size: bodySize - 0.5,
	})
	if rec.Demonstration {
		d.space(1.5)
		d.paragraph(demonstrationLine, "B", bodySize, lineH, 0, rejectColour)
	}
}

// caveatsBox prints, under the verdict, the caveats that change what it
// means, each beside an amber bar.
func (d *doc) caveatsBox(c *content) {
	if len(c.rec.Caveats) == 0 {
		return
	}
	title := "The verdict is qualified"
	if c.rec.OverallVerdict != record.Accept {
		title = "Caveats"
	}
	d.subheading(title, 2*lineH)
	for _, cv := range c.rec.Caveats {
		d.font("", bodySize)
		lines := d.wrap(cv.Text, d.contentW()-5)
		d.need(float64(min(len(lines), 2)) * lineH)
		d.amberLines(lines)
		d.space(1.2)
	}
	d.space(1)
}

// summary prints the overall verdict banner and one row per candidate.
func (d *doc) summary(c *content) {
	rec := c.rec
	d.heading("Decision summary")
	d.verdictBanner(c)
	d.caveatsBox(c)
	if len(rec.Candidates) == 0 {
		d.body("The record lists no candidates.")
		return
	}
	holm, stopped, mixed := false, false, false
	for _, cand := range rec.Candidates {
		if cand.BoundConfidence != rec.Candidates[0].BoundConfidence {
			mixed = true
		}
		if cand.AdjustedPValue != nil {
			holm = true
		}
		if cand.StoppedAt > 0 {
			stopped = true
		}
	}
	// Each candidate's name has a row of its own across the table, so an
	// identifier never breaks and the Reason column keeps its width.
	cols := []column{
		{head: "Errors / labeled", fit: true, align: "R"},
	}
	if stopped {
		cols = append(cols, column{head: "Stopped after", fit: true, align: "R"})
	}
	// One confidence in the header, or each bound's own when they differ.
	boundHead := "Upper bound at " + c.fields.BoundConfidence
	if mixed {
		boundHead = "Upper bound (confidence)"
	}
	cols = append(cols, []column{
		{head: "Estimate", fit: true, align: "R"},
		{head: boundHead, fit: true, align: "R"},
		{head: "Ceiling", fit: true, align: "R"},
		{head: "p-value", fit: true, align: "R"},
	}...)
	if holm {
		cols = append(cols, column{head: "Adjusted p", fit: true, align: "R"})
	}
	cols = append(cols, column{head: "Verdict", fit: true, align: "C"}, column{head: "Reason", w: 1})
	var rows [][]cell
	var keep []bool
	for i, cand := range rec.Candidates {
		rows = append(rows, spanRow(cell{text: "Candidate " + itoa(i+1) + ": " + cand.Name, bold: true}))
		keep = append(keep, true, false)
		row := []cell{
			{text: itoa(cand.Errors) + " / " + itoa(cand.Labeled)},
		}
		if stopped {
			after := "–"
			if cand.StoppedAt > 0 {
				after = plural(cand.StoppedAt, "label", "labels")
			}
			row = append(row, cell{text: after})
		}
		row = append(row, []cell{
			{text: numfmt.Rate(cand.Estimate)},
			{text: boundText(cand, mixed), bold: true},
			{text: c.fields.Ceiling},
			{text: numfmt.PValue(cand.PValue)},
		}...)
		if holm {
			adj := "–"
			if cand.AdjustedPValue != nil {
				adj = numfmt.PValue(*cand.AdjustedPValue)
			}
			row = append(row, cell{text: adj})
		}
		row = append(row, verdictCell(cand.Verdict), cell{text: cand.Reason})
		rows = append(rows, row)
	}
	d.drawTable(&table{title: "Decision summary", cols: cols, rows: rows, header: true, keep: keep})
	d.note(precisionNote)
	d.note(pValueNote(holm))
}

// verdictCell is a table cell that shows a verdict as a word on a colour.
func verdictCell(v string) cell {
	switch v {
	case record.Accept:
		return cell{text: v, bold: true, fill: &acceptColour, ink: &white}
	case record.Reject:
		return cell{text: v, bold: true, fill: &rejectColour, ink: &white}
	}
	if v == "" {
		v = "none"
	}
	return cell{text: v, bold: true}
}

// verdictBanner prints the overall verdict in a coloured box.
func (d *doc) verdictBanner(c *content) {
	rec := c.rec
	accepted := 0
	for _, cand := range rec.Candidates {
		if cand.Verdict == record.Accept {
			accepted++
		}
	}
	fill := mutedColour
	word := rec.OverallVerdict
	switch word {
	case record.Accept:
		fill = acceptColour
	case record.Reject:
		fill = rejectColour
	case "":
		word = "NO VERDICT"
	}
	detail := itoa(accepted) + " of " + itoa(len(rec.Candidates)) + " candidates accepted; " + rec.Plan.Require.Title() + "."
	label := "OVERALL VERDICT"
	if s := rec.ReleaseStatement(); s != "" {
		// the decision signed is the release
		label = "RELEASE DECISION"
		detail = strings.ToUpper(s[:1]) + s[1:] + ". " + acceptedText(accepted, len(rec.Candidates)) + "."
	} else if hasMeasures(rec) {
		detail = acceptedText(accepted, len(rec.Candidates)) + "; " + rec.Plan.Require.Title() + "."
	}
	if len(rec.Caveats) > 0 && word == record.Accept {
		detail += " Qualified: see below."
		word = "ACCEPT, QUALIFIED"
	}
	const h = 15.0
	d.need(h + 2)
	y := d.pdf.GetY()
	d.fillColour(fill)
	d.pdf.Rect(marginX, y, d.contentW(), h, "F")
	d.textColour(white)
	d.font("", smallSize)
	d.pdf.SetXY(marginX+4, y+2)
	d.pdf.CellFormat(50, 3.5, label, "", 0, "L", false, 0, "")
	// The word in 17 pt, or smaller when it is long ("ACCEPT, QUALIFIED").
	size := 17.0
	for d.font("B", size); size > 10 && d.pdf.GetStringWidth(word) > 62; d.font("B", size) {
		size--
	}
	d.pdf.SetXY(marginX+4, y+5.5)
	d.pdf.CellFormat(62, 8, d.ellipsis(word, 62), "", 0, "L", false, 0, "")
	d.font("", bodySize+0.5)
	lines := d.wrap(detail, d.contentW()-74)
	ly := y + (h-float64(len(lines))*lineH)/2
	for _, l := range lines {
		d.pdf.SetXY(marginX+70, ly)
		d.pdf.CellFormat(d.contentW()-74, lineH, l, "", 0, "L", false, 0, "")
		ly += lineH
	}
	d.textColour(inkColour)
	d.pdf.SetXY(marginX, y+h+3)
}

// wordingBlocks prints wording text as paragraphs and bullets.
func (d *doc) wordingBlocks(text string) {
	for _, b := range blocksOf(text) {
		if b.Bullet {
			d.bullet(b.Text)
		} else {
			d.body(b.Text)
		}
	}
}

// joinNonEmpty joins the non-empty parts with sep.
func joinNonEmpty(sep string, parts ...string) string {
	var kept []string
	for _, p := range parts {
		if strings.TrimSpace(p) != "" {
			kept = append(kept, p)
		}
	}
	return strings.Join(kept, sep)
}

// boundText is a candidate's upper bound, with its confidence when the
// candidates' confidences differ.
func boundText(cand record.Candidate, withConfidence bool) string {
	if withConfidence {
		return numfmt.RateUp(cand.UpperBound) + " (" + numfmt.Confidence(cand.BoundConfidence) + ")"
	}
	return numfmt.RateUp(cand.UpperBound)
}

// issuedText is when the record was issued, for the title block: "2026-12-01
// 09:30:00 UTC", followed by "(operator)" when the operator supplied the
// time rather than the clock (the chronology on the last page says it in
// full); a record made before records were timed shows its date.
func issuedText(rec *record.Record) string {
	c := rec.Chronology
	if c == nil || c.Issued.IsZero() {
		return rec.Date
	}
	t := c.Issued.Time.UTC().Format("2006-01-02 15:04:05") + " UTC"
	if c.Issued.Source != chrono.SourceClock {
		t += " (" + shortSource(c.Issued.Source) + ")"
	}
	return t
}

// shortSource names a time's source in two words at most.
func shortSource(s chrono.Source) string {
	if s == chrono.SourceOperator {
		return "operator"
	}
	return "source not stated"
}

// stampText writes a time of the chronology for the page: "2026-12-01
// 09:30:00 UTC (system clock)", "… (supplied by the operator)".
func stampText(s chrono.Stamp) string {
	if s.IsZero() {
		return "not stated"
	}
	return s.Time.UTC().Format("2006-01-02 15:04:05") + " UTC (" + s.Source.Describe() + ")"
}

// acceptedText says how many candidates a record of measures accepts:
// "1 of 3 candidates accepted on every measure claimed for them", or for
// one candidate whether it is.
func acceptedText(accepted, n int) string {
	if n == 1 {
		if accepted == 1 {
			return "The candidate is accepted on every measure claimed for it"
		}
		return "The candidate is not accepted on every measure claimed for it"
	}
	return itoa(accepted) + " of " + itoa(n) + " candidates accepted on every measure claimed for them"
}

// amberLines prints wrapped lines (wrapped to the content width less 5 mm)
// behind an amber bar, the mark of what qualifies a verdict; each line may
// start a new page.
func (d *doc) amberLines(lines []string) {
	for _, l := range lines {
		d.need(lineH)
		y := d.pdf.GetY()
		d.fillColour(amber)
		d.pdf.Rect(marginX, y, 1.3, lineH, "F")
		d.pdf.SetXY(marginX+5, y)
		d.pdf.CellFormat(d.contentW()-5, lineH, l, "", 1, "L", false, 0, "")
	}
}

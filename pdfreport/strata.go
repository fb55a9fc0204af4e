package pdfreport

import "probity/plan/numfmt"

// smallStratum is the number of labeled items below which a stratum's
// descriptive rate is marked small (a common rule of thumb, no source).
const smallStratum = 30

// strataSection prints the strata of the draw and each candidate's errors
// per stratum.
func (d *doc) strataSection(c *content) {
	rec := c.rec
	d.heading("Results per stratum")
	if len(rec.Strata) == 0 {
		d.body("The draw was not stratified: the sample is a simple random sample of the population.")
	} else {
		var rows [][]cell
		var popTotal int64
		sampleTotal := 0
		for _, s := range rec.Strata {
			rows = append(rows, []cell{
				{text: s.Label}, {text: numfmt.Count(s.Population)}, {text: itoa(s.Sample)}, {text: numfmt.Weight(s.Weight)},
			})
			popTotal += s.Population
			sampleTotal += s.Sample
		}
		rows = append(rows, []cell{
			{text: "All strata", bold: true}, {text: numfmt.Count(popTotal), bold: true},
			{text: itoa(sampleTotal), bold: true}, {text: ""},
		})
		t := &table{
			title: "Strata of the draw",
			cols: []column{{head: "Stratum", w: 40}, {head: "Population N_h", w: 20, align: "R"},
				{head: "Sample n_h", w: 20, align: "R"}, {head: "Inclusion weight N_h/n_h", w: 20, align: "R"}},
			rows: rows, header: true, compact: len(rows) > 10,
		}
		d.subheading("Strata of the draw", d.leadHeight(t))
		d.drawTable(t)
	}
	any := false
	for _, cand := range rec.Candidates {
		if len(cand.Strata) > 0 {
			any = true
		}
	}
	if !any {
		return
	}
	note := "Descriptive only: rates per stratum are unweighted (errors / labeled in the stratum), each with a two-sided " +
		"exact (Clopper–Pearson) 95 % interval. That is not the verdict's level (a one-sided " + c.fields.BoundConfidence +
		" upper bound on the whole sample), and the intervals are not adjusted for the number of strata: they show " +
		"where the errors fell and decide nothing. The lower limit is rounded down and the upper limit up. A stratum " +
		"with fewer than " + itoa(smallStratum) + " labeled items is marked small: its interval is wide and its rate " +
		"moves with each error (" + itoa(smallStratum) + " is a common rule of thumb, no source)."
	first := true
	for _, cand := range rec.Candidates {
		if len(cand.Strata) == 0 {
			continue
		}
		var rows [][]cell
		for _, s := range cand.Strata {
			label := cell{text: s.Label}
			if s.Labeled < smallStratum {
				label = cell{text: s.Label + " (small)", bold: true}
			}
			rows = append(rows, []cell{
				label, {text: itoa(s.Labeled)}, {text: itoa(s.Errors)}, {text: numfmt.Rate(s.Rate)},
				{text: numfmt.RateDown(s.Lower)}, {text: numfmt.RateUp(s.Upper)},
			})
		}
		title := "Errors per stratum (descriptive): " + cand.Name
		t := &table{
			title: title,
			cols: []column{{head: "Stratum", w: 36}, {head: "Labeled", w: 13, align: "R"},
				{head: "Errors", w: 13, align: "R"}, {head: "Rate", w: 14, align: "R"},
				{head: "95 % lower limit", w: 15, align: "R"}, {head: "95 % upper limit", w: 15, align: "R"}},
			rows: rows, header: true, compact: len(rows) > 10,
		}
		if first {
			// The note stays with the first table under it.
			d.font("I", smallSize)
			noteH := float64(len(d.wrap(note, d.contentW())))*smallLineH + 1.2
			d.need(noteH + lineH + 3 + d.leadHeight(t))
			d.note(note)
			first = false
		}
		d.subheading(title, d.leadHeight(t))
		d.drawTable(t)
	}
}

package pdfreport

import "probity/plan/numfmt"

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
		d.subheading("Strata of the draw", 12)
		d.drawTable(&table{
			title: "Strata of the draw",
			cols: []column{{head: "Stratum", w: 40}, {head: "Population N_h", w: 20, align: "R"},
				{head: "Sample n_h", w: 20, align: "R"}, {head: "Inclusion weight N_h/n_h", w: 20, align: "R"}},
			rows: rows, header: true, compact: len(rows) > 10,
		})
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
	d.note("Rates per stratum are unweighted (errors / labeled in the stratum), each with a two-sided exact " +
		"(Clopper–Pearson) 95 % interval; the lower limit is rounded down and the upper limit up.")
	for _, cand := range rec.Candidates {
		if len(cand.Strata) == 0 {
			continue
		}
		var rows [][]cell
		for _, s := range cand.Strata {
			rows = append(rows, []cell{
				{text: s.Label}, {text: itoa(s.Labeled)}, {text: itoa(s.Errors)}, {text: numfmt.Rate(s.Rate)},
				{text: numfmt.RateDown(s.Lower)}, {text: numfmt.RateUp(s.Upper)},
			})
		}
		title := "Errors per stratum: " + cand.Name
		d.subheading(title, 14)
		d.drawTable(&table{
			title: title,
			cols: []column{{head: "Stratum", w: 36}, {head: "Labeled", w: 13, align: "R"},
				{head: "Errors", w: 13, align: "R"}, {head: "Rate", w: 14, align: "R"},
				{head: "95 % lower limit", w: 15, align: "R"}, {head: "95 % upper limit", w: 15, align: "R"}},
			rows: rows, header: true, compact: len(rows) > 10,
		})
	}
}

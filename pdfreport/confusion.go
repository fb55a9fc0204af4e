package pdfreport

var (
	diagFill = rgb{226, 242, 232}
	errFill  = rgb{250, 226, 226}
)

// confusionSection prints one confusion matrix per candidate, each kept on
// one page: rows are the labels, columns the candidate's predictions.
func (d *doc) confusionSection(c *content) {
	d.heading("Confusion matrices")
	if len(c.rec.Candidates) == 0 {
		d.body("The record lists no candidates.")
		return
	}
	d.note("Rows are the labels given by the labelers, columns the candidate's predictions. The diagonal (green) " +
		"counts correct decisions; shaded red cells off the diagonal count errors.")
	for _, cand := range c.rec.Candidates {
		cm := cand.Confusion
		title := "Confusion matrix: " + cand.Name
		if len(cm.Classes) == 0 {
			d.subheading(title, lineH)
			d.body("Not recorded.")
			continue
		}
		k := len(cm.Classes)
		cols := []column{{head: "Label \\ predicted", w: 1.6, align: "L"}}
		for _, cl := range cm.Classes {
			cols = append(cols, column{head: cl, w: 1, align: "R"})
		}
		cols = append(cols, column{head: "Total", w: 1, align: "R"})
		var rows [][]cell
		colTotals := make([]int, k)
		grand := 0
		for i, row := range cm.Counts {
			r := []cell{{text: cm.Classes[i], bold: true}}
			total := 0
			for j, n := range row {
				cl := cell{text: itoa(n)}
				if i == j {
					cl.fill = &diagFill
				} else if n > 0 {
					cl.fill = &errFill
					cl.bold = true
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
		width := 34 + 20*float64(k+1)
		if width > d.contentW() {
			width = d.contentW()
		}
		t := &table{title: title, cols: cols, rows: rows, header: true, width: width}
		h := d.tableHeight(t)
		if h < d.bottomY()-marginTop-20 {
			d.subheading(title, h)
		} else {
			d.subheading(title, 14)
		}
		d.drawTable(t)
	}
}

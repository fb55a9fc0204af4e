package pdfreport

import "probity/plan/record"

var (
	diagFill = rgb{226, 242, 232}
	errFill  = rgb{250, 226, 226}
)

// matrixGap is the space between two matrices side by side (mm).
const matrixGap = 8.0

// confusionSection prints one confusion matrix per candidate: rows are the
// labels, columns the candidate's predictions. Matrices narrow enough are
// set two to a row; each matrix stays on one page.
func (d *doc) confusionSection(c *content) {
	d.heading("Confusion matrices")
	if len(c.rec.Candidates) == 0 {
		d.body("The record lists no candidates.")
		return
	}
	d.note("Rows are the labels given by the labelers, columns the candidate's predictions. The diagonal (green) " +
		"counts correct decisions; shaded red cells off the diagonal count errors.")
	if hasMeasures(c.rec) {
		d.note("These are the labeled items as drawn: the strata were sampled at different rates, so the counts are not " +
			"the population's shares; the estimated confusion in the population follows.")
	}
	half := (d.contentW() - matrixGap) / 2
	var pending *matrix // a narrow matrix waiting for a partner
	for _, cand := range c.rec.Candidates {
		m := d.matrixOf(cand)
		if m.t == nil || m.t.width > half {
			if pending != nil {
				d.matrixRow(pending, nil)
				pending = nil
			}
			d.matrixRow(m, nil)
			continue
		}
		if pending == nil {
			pending = m
			continue
		}
		d.matrixRow(pending, m)
		pending = nil
	}
	if pending != nil {
		d.matrixRow(pending, nil)
	}
	d.estimatedConfusion(c)
}

// matrix is one candidate's confusion matrix, laid out as a table (nil
// when the record has none).
type matrix struct {
	title string
	t     *table
}

func (d *doc) matrixOf(cand record.Candidate) *matrix {
	cm := cand.Confusion
	m := &matrix{title: "Confusion matrix: " + cand.Name}
	if len(cm.Classes) == 0 {
		return m
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
	width := 30 + 17*float64(k+1)
	if width > d.contentW() {
		width = d.contentW()
	}
	m.t = &table{title: m.title, cols: cols, rows: rows, header: true, width: width}
	return m
}

// matrixRow prints one matrix, or two side by side, with their titles.
func (d *doc) matrixRow(left, right *matrix) {
	titleH := lineH + 1.2
	height := func(m *matrix) float64 {
		if m == nil {
			return 0
		}
		if m.t == nil {
			return lineH
		}
		return d.tableHeight(m.t)
	}
	h := max(height(left), height(right))
	if titleH+h < d.bottomY()-marginTop-20 {
		d.space(1.5)
		d.need(titleH + h + 1)
	}
	if right == nil {
		if left.t == nil {
			d.subheading(left.title, lineH)
			d.body("Not recorded.")
			return
		}
		d.subheading(left.title, min(h, 14))
		d.drawTable(left.t)
		return
	}
	y := d.pdf.GetY()
	offset := left.t.width + matrixGap
	right.t.x = offset
	d.font("B", bodySize+0.5)
	d.textColour(headingColour)
	for i, m := range []*matrix{left, right} {
		x := marginX
		if i == 1 {
			x += offset
		}
		d.pdf.SetXY(x, y)
		d.pdf.CellFormat(m.t.width, titleH, d.ellipsis(m.title, m.t.width), "", 0, "L", false, 0, "")
	}
	d.textColour(inkColour)
	d.pdf.SetY(y + titleH)
	d.drawTable(left.t)
	endLeft := d.pdf.GetY()
	d.pdf.SetY(y + titleH)
	d.drawTable(right.t)
	d.pdf.SetY(max(endLeft, d.pdf.GetY()))
}

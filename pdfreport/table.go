package pdfreport

import (
	"math"
	"strings"
)

// column is one column of a table.
type column struct {
	head string
	// w is the column's share of the table width (relative units).
	w     float64
	align string // "L", "C" or "R"
	// fit sizes the column to its content instead of w.
	fit bool
}

// cell is one table cell.
type cell struct {
	text  string
	bold  bool
	mono  bool
	fill  *rgb // background; nil for the row's default
	ink   *rgb // text colour; nil for the default
	align string
	// span stretches the row's only cell across every column.
	span bool
}

// table is a table that breaks across pages with its header repeated.
type table struct {
	// title names the table in the "(continued)" line on later pages.
	title  string
	cols   []column
	rows   [][]cell
	size   float64 // font size; 0 for smallSize+0.5
	header bool    // print the header row
	// keyFill shades the first column like a header (for key/value
	// tables).
	keyFill bool
	// width is the table width in mm; 0 for the content width.
	width float64
	// compact tightens the rows of a long table.
	compact bool
	// x is the table's offset from the left margin in mm.
	x float64
	// keep[i] keeps row i on the same page as row i+1 (a candidate's
	// name row and its figures); rows kept together form one block, and
	// blocks are what the page breaks fall between.
	keep []bool
}

// spanRow is a row of one cell across the whole table.
func spanRow(c cell) []cell {
	c.span = true
	return []cell{c}
}

const cellPadX = 1.6

// minFlexW is the least width (mm) a wrapping column gets beside fitted
// ones before the whole table is scaled.
const minFlexW = 22.0

// padY is the space above and below a cell's text.
func (t *table) padY() float64 {
	if t.compact {
		return 0.55
	}
	return 1.1
}

func (t *table) fontSize() float64 {
	if t.size > 0 {
		return t.size
	}
	return smallSize + 0.5
}

// widths returns the columns' widths in mm. A column with fit set is as
// wide as its widest cell and at least half its header (and the header's
// longest word), so numbers never
// wrap; the other columns share what is left in proportion to w. When the
// fitted columns leave the others less than minFlexW each, all widths are
// scaled down together.
func (d *doc) widths(t *table) []float64 {
	tw := t.width
	if tw == 0 {
		tw = d.contentW()
	}
	total := 0.0
	for _, c := range t.cols {
		total += c.w
	}
	ws := make([]float64, len(t.cols))
	for i, c := range t.cols {
		ws[i] = c.w / total * tw
	}
	fitted, flexW, flexShare := 0.0, 0.0, 0.0
	fit := make([]float64, len(t.cols))
	for i, c := range t.cols {
		if !c.fit {
			flexShare += c.w
			continue
		}
		w := 0.0
		d.font("B", t.fontSize())
		// The header may take two lines, never more than its longest word.
		w = d.pdf.GetStringWidth(c.head) / 2
		for _, word := range glueUnits(strings.Fields(c.head)) {
			w = math.Max(w, d.pdf.GetStringWidth(word))
		}
		for _, row := range t.rows {
			if i < len(row) && !row[i].span {
				d.cellFont(t, row[i], false)
				w = math.Max(w, d.pdf.GetStringWidth(row[i].text))
			}
		}
		fit[i] = w + 2*cellPadX + 1.2
		fitted += fit[i]
	}
	if flexShare == 0 || fitted == 0 {
		return ws
	}
	flexW = tw - fitted
	nflex := 0.0
	for _, c := range t.cols {
		if !c.fit {
			nflex++
		}
	}
	if flexW < minFlexW*nflex {
		// Too little room: fitted widths and the minimum for the others,
		// all scaled down together to the table width.
		sum := 0.0
		for i, c := range t.cols {
			ws[i] = minFlexW
			if c.fit {
				ws[i] = fit[i]
			}
			sum += ws[i]
		}
		for i := range ws {
			ws[i] *= tw / sum
		}
		return ws
	}
	for i, c := range t.cols {
		if c.fit {
			ws[i] = fit[i]
		} else {
			ws[i] = c.w / flexShare * flexW
		}
	}
	return ws
}

// layoutRow wraps every cell of a row and returns the lines and the row
// height.
func (d *doc) layoutRow(t *table, ws []float64, texts []cell, boldAll bool) ([][]string, float64) {
	lh := t.fontSize() * 0.46
	lines := make([][]string, len(texts))
	maxLines := 1
	ws = rowWidths(ws, texts)
	for i, c := range texts {
		d.cellFont(t, c, boldAll)
		lines[i] = d.wrap(c.text, ws[i]-2*cellPadX)
		if len(lines[i]) > maxLines {
			maxLines = len(lines[i])
		}
	}
	return lines, float64(maxLines)*lh + 2*t.padY()
}

func (d *doc) cellFont(t *table, c cell, boldAll bool) {
	switch {
	case c.mono:
		d.mono(t.fontSize() - 1)
	case c.bold || boldAll:
		d.font("B", t.fontSize())
	default:
		d.font("", t.fontSize())
	}
}

func (t *table) headerCells() []cell {
	hs := make([]cell, len(t.cols))
	for i, c := range t.cols {
		hs[i] = cell{text: c.head, align: c.align}
	}
	return hs
}

// drawRow draws one row at the cursor.
func (d *doc) drawRow(t *table, ws []float64, cells []cell, lines [][]string, h float64, fill rgb, head bool) {
	lh := t.fontSize() * 0.46
	x0 := marginX + t.x
	y := d.pdf.GetY()
	ws = rowWidths(ws, cells)
	x := x0
	for i, c := range cells {
		f := fill
		if c.fill != nil {
			f = *c.fill
		} else if t.keyFill && i == 0 && !head {
			f = headFill
		}
		d.fillColour(f)
		d.drawColour(ruleColour)
		d.pdf.Rect(x, y, ws[i], h, "FD")
		d.cellFont(t, c, head || (t.keyFill && i == 0))
		ink := inkColour
		if c.ink != nil {
			ink = *c.ink
		}
		d.textColour(ink)
		align := c.align
		if align == "" && !c.span {
			align = t.cols[i].align
		}
		if align == "" {
			align = "L"
		}
		// Centre the cell's lines vertically in the row.
		ty := y + (h-float64(len(lines[i]))*lh)/2
		for _, l := range lines[i] {
			d.pdf.SetXY(x+cellPadX, ty)
			d.pdf.CellFormat(ws[i]-2*cellPadX, lh, l, "", 0, align, false, 0, "")
			ty += lh
		}
		x += ws[i]
	}
	d.textColour(inkColour)
	d.pdf.SetXY(x0, y+h)
}

// rowWidths is the column widths for one row: the whole table's width
// for a spanning row, else ws.
func rowWidths(ws []float64, cells []cell) []float64 {
	if len(cells) == 1 && cells[0].span {
		sum := 0.0
		for _, w := range ws {
			sum += w
		}
		return []float64{sum}
	}
	return ws
}

// blocks groups the table's rows into what a page break may not split:
// each block is a run of rows joined by keep. It returns the first row
// of each block and, last, len(t.rows).
func (t *table) blocks() []int {
	starts := []int{}
	for i := range t.rows {
		if i == 0 || i-1 >= len(t.keep) || !t.keep[i-1] {
			starts = append(starts, i)
		}
	}
	return append(starts, len(t.rows))
}

// leadHeight is the height the table needs on the page it starts on: its
// header and its first two blocks, or the whole table when it has three
// blocks or fewer, so that no block is left alone on either side of a
// page break. A title kept with the table asks for this much below it.
func (d *doc) leadHeight(t *table) float64 {
	ws := d.widths(t)
	h := 0.0
	if t.header {
		_, h = d.layoutRow(t, ws, t.headerCells(), true)
	}
	b := t.blocks()
	nb := len(b) - 1
	upto := len(t.rows)
	if nb > 3 {
		upto = b[2]
	}
	for _, row := range t.rows[:upto] {
		_, rh := d.layoutRow(t, ws, row, false)
		h += rh
	}
	return h
}

// placement is where one row of a table was drawn: the layout's own
// record, read by the tests.
type placement struct {
	table string
	seq   int // the table's number in the document, from 1
	row   int
	page  int
}

// drawTable lays the table out, starting a new page (with the header and
// a "continued" line) whenever the next block of rows does not fit. No
// block is left alone on a page: the table starts with two blocks (all of
// them when it has three or fewer) and the last two blocks go together.
func (d *doc) drawTable(t *table) {
	ws := d.widths(t)
	var headLines [][]string
	var headH float64
	if t.header {
		headLines, headH = d.layoutRow(t, ws, t.headerCells(), true)
	}
	drawHead := func() {
		if t.header {
			d.drawRow(t, ws, t.headerCells(), headLines, headH, headFill, true)
		}
	}
	lines := make([][][]string, len(t.rows))
	hs := make([]float64, len(t.rows))
	for i, row := range t.rows {
		lines[i], hs[i] = d.layoutRow(t, ws, row, false)
	}
	b := t.blocks()
	nb := len(b) - 1
	d.tables++
	blockH := func(k int) float64 {
		h := 0.0
		for i := b[k]; i < b[k+1]; i++ {
			h += hs[i]
		}
		return h
	}
	for k := 0; k < nb; k++ {
		switch {
		case k == 0:
			d.need(d.leadHeight(t))
			drawHead()
		case k == nb-2 && d.need(blockH(k)+blockH(k+1)),
			k != nb-2 && d.need(blockH(k)):
			if t.title != "" {
				d.paragraph(t.title+" (continued)", "I", smallSize, smallLineH, 0, mutedColour)
				d.space(0.8)
			}
			drawHead()
		}
		fill := white
		if k%2 == 1 {
			fill = zebraFill
		}
		for i := b[k]; i < b[k+1]; i++ {
			d.placed = append(d.placed, placement{table: t.title, seq: d.tables, row: i, page: d.pdf.PageNo()})
			d.drawRow(t, ws, t.rows[i], lines[i], hs[i], fill, false)
		}
	}
	d.space(3)
}

// height returns the table's total height if drawn on one page.
func (d *doc) tableHeight(t *table) float64 {
	ws := d.widths(t)
	h := 0.0
	if t.header {
		_, hh := d.layoutRow(t, ws, t.headerCells(), true)
		h += hh
	}
	for _, row := range t.rows {
		_, rh := d.layoutRow(t, ws, row, false)
		h += rh
	}
	return h
}

package pdfreport

import (
	"math"
	"strings"
	"unicode/utf8"

	"probity/plan/numfmt"

	"github.com/jung-kurt/gofpdf"
)

// Units are millimetres; font sizes are points.
const (
	marginX      = 18.0
	marginTop    = 18.0
	marginBottom = 20.0
	bodySize     = 9.5
	smallSize    = 8.0
	lineH        = 4.6 // body line height
	smallLineH   = 3.9
	headingSize  = 12.5
	// keepWithHeading is the space a heading needs below it on the same
	// page, so that no heading is left alone at the foot of a page.
	keepWithHeading = 24.0
)

// rgb is a colour (the short name used throughout the layout code).
type rgb = Colour

var (
	inkColour     = Ink
	mutedColour   = Muted
	headingColour = Heading
	ruleColour    = Rule
	headFill      = HeadFill
	zebraFill     = ZebraFill
	acceptColour  = AcceptGreen
	rejectColour  = RejectRed
	white         = rgb{255, 255, 255}
)

// doc is the document being laid out.
type doc struct {
	pdf *gofpdf.Fpdf
	// pageW and pageH are the paper size.
	pageW, pageH float64
	// totalPages is the page count from the first pass (0 on the first
	// pass itself).
	totalPages int
	section    int
	// placed records where each table row was drawn (for the tests).
	placed []placement
	tables int
}

// contentW is the width between the margins.
func (d *doc) contentW() float64 { return d.pageW - 2*marginX }

// bottomY is the lowest y content may reach.
func (d *doc) bottomY() float64 { return d.pageH - marginBottom }

func (d *doc) font(style string, size float64) {
	d.pdf.SetFont("sans", style, size)
}

func (d *doc) mono(size float64) {
	d.pdf.SetFont("mono", "", size)
}

func (d *doc) textColour(c rgb) { d.pdf.SetTextColor(c.R, c.G, c.B) }
func (d *doc) fillColour(c rgb) { d.pdf.SetFillColor(c.R, c.G, c.B) }
func (d *doc) drawColour(c rgb) { d.pdf.SetDrawColor(c.R, c.G, c.B) }

// need starts a new page unless h millimetres fit below the cursor.
// It reports whether it started one.
func (d *doc) need(h float64) bool {
	if d.pdf.GetY()+h > d.bottomY() {
		d.pdf.AddPage()
		return true
	}
	return false
}

// space moves the cursor down by h, unless that reaches the page foot.
func (d *doc) space(h float64) {
	if d.pdf.GetY()+h <= d.bottomY() {
		d.pdf.SetY(d.pdf.GetY() + h)
	}
}

// wrap splits text into lines no wider than w in the current font. Words
// longer than a line (fingerprints, long names) are broken between
// characters.
func (d *doc) wrap(text string, w float64) []string {
	text = printable(text)
	// A line holds at least one character, however narrow the column.
	w = math.Max(w, 1)
	var lines []string
	for _, para := range strings.Split(text, "\n") {
		words := glueUnits(strings.Fields(para))
		if len(words) == 0 {
			lines = append(lines, "")
			continue
		}
		line := ""
		for _, word := range words {
			cand := word
			if line != "" {
				cand = line + " " + word
			}
			if d.pdf.GetStringWidth(cand) <= w {
				line = cand
				continue
			}
			if line != "" {
				lines = append(lines, line)
				line = ""
			}
			for len(word) > 0 && d.pdf.GetStringWidth(word) > w {
				cut := d.breakAt(word, w)
				lines = append(lines, word[:cut])
				word = word[cut:]
			}
			line = word
		}
		lines = append(lines, line)
	}
	return lines
}

// breakAt returns where to break a word too long for a line: before the
// last relation operator that fits (">=", "≤", "=", …), so an identifier
// such as "defect_score>=0.35" breaks only between its name and its
// condition; else after the last '-', '_' or '/' that fits; else after as
// many characters as fit.
func (d *doc) breakAt(word string, w float64) int {
	cut := d.fit(word, w)
	if i := lastOperator(word[:cut]); i > 0 {
		return i
	}
	if i := strings.LastIndexAny(word[:cut], "-_/"); i > 0 && i+1 < cut {
		return i + 1
	}
	return cut
}

// lastOperator is the byte offset of the last relation operator in s that
// starts an operator run (so ">=" is found at '>', never at '='), or -1.
func lastOperator(s string) int {
	isOp := func(r rune) bool { return strings.ContainsRune("<>=!≤≥≠", r) }
	last, prevOp := -1, false
	for i, r := range s {
		op := isOp(r)
		if op && !prevOp {
			last = i
		}
		prevOp = op
	}
	return last
}

// fit returns the byte length of the longest prefix of s (at least one
// rune) that fits in w.
func (d *doc) fit(s string, w float64) int {
	last := 0
	for i := range s {
		if i > 0 && d.pdf.GetStringWidth(s[:i]) > w {
			break
		}
		last = i
	}
	if last == 0 {
		for i := range s {
			if i > 0 {
				return i
			}
		}
		return len(s)
	}
	if d.pdf.GetStringWidth(s) <= w {
		return len(s)
	}
	return last
}

// heading starts a numbered section, keeping it with the text below it.
func (d *doc) heading(title string) { d.headingKeep(title, keepWithHeading) }

// headingKeep starts a numbered section on a new page unless the heading
// and minBelow millimetres of what follows fit on this one.
func (d *doc) headingKeep(title string, minBelow float64) {
	d.section++
	d.space(3)
	d.need(9.5 + minBelow)
	d.font("B", headingSize)
	d.textColour(headingColour)
	d.pdf.SetX(marginX)
	// Each section is also an entry of the PDF's outline (bookmarks).
	d.pdf.Bookmark(printable(itoa(d.section)+" "+title), 0, -1)
	d.pdf.CellFormat(d.contentW(), 7, itoa(d.section)+"   "+title, "", 1, "L", false, 0, "")
	d.drawColour(headingColour)
	d.pdf.SetLineWidth(0.4)
	y := d.pdf.GetY()
	d.pdf.Line(marginX, y, marginX+d.contentW(), y)
	d.pdf.SetLineWidth(0.2)
	d.pdf.SetY(y + 2.5)
	d.textColour(inkColour)
}

// subheading is a bold line kept with at least minBelow millimetres of
// what follows it.
func (d *doc) subheading(title string, minBelow float64) {
	d.space(1.5)
	d.need(lineH + 1 + minBelow)
	d.font("B", bodySize+0.5)
	d.textColour(headingColour)
	for _, l := range d.wrap(title, d.contentW()) {
		d.pdf.SetX(marginX)
		d.pdf.CellFormat(d.contentW(), lineH+0.6, l, "", 1, "L", false, 0, "")
	}
	d.textColour(inkColour)
	d.space(0.6)
}

// paragraph prints wrapped text at the left margin plus indent.
func (d *doc) paragraph(text string, style string, size, lh, indent float64, c rgb) {
	d.font(style, size)
	d.textColour(c)
	w := d.contentW() - indent
	for _, l := range d.wrap(text, w) {
		d.need(lh)
		d.pdf.SetX(marginX + indent)
		d.pdf.CellFormat(w, lh, l, "", 1, "L", false, 0, "")
	}
	d.textColour(inkColour)
}

// body prints a body paragraph followed by a small gap.
func (d *doc) body(text string) {
	d.paragraph(text, "", bodySize, lineH, 0, inkColour)
	d.space(1.6)
}

// note prints a small grey paragraph.
func (d *doc) note(text string) {
	d.paragraph(text, "I", smallSize, smallLineH, 0, mutedColour)
	d.space(1.2)
}

// bullet prints one bullet item with a hanging indent.
func (d *doc) bullet(text string) {
	d.font("", bodySize)
	const indent = 5.0
	lines := d.wrap(text, d.contentW()-indent)
	for i, l := range lines {
		// Keep the first two lines of an item together.
		if i == 0 && len(lines) > 1 {
			d.need(2 * lineH)
		} else {
			d.need(lineH)
		}
		if i == 0 {
			d.pdf.SetX(marginX + 1)
			d.pdf.CellFormat(indent-1, lineH, "•", "", 0, "L", false, 0, "")
		}
		d.pdf.SetX(marginX + indent)
		d.pdf.CellFormat(d.contentW()-indent, lineH, l, "", 1, "L", false, 0, "")
	}
	d.space(0.8)
}

func itoa(n int) string { return numfmt.Count(int64(n)) }

// glueUnits keeps short formulas on one line: a lone "%" (or "%)", "%,"
// …) stays with the number before it ("2.000 %"), and a relation sign
// ("=", "≤", "≥", "<", ">") with the words on both sides ("c = 3").
func glueUnits(words []string) []string {
	var out []string
	glueNext := false
	for _, w := range words {
		if len(out) > 0 && (glueNext || strings.HasPrefix(w, "%") || isRelation(w)) {
			out[len(out)-1] += " " + w
		} else {
			out = append(out, w)
		}
		glueNext = isRelation(w)
	}
	return out
}

// isRelation reports a lone relation sign.
func isRelation(w string) bool {
	switch w {
	case "=", "≤", "≥", "<", ">":
		return true
	}
	return false
}

// plural is "1 error" or "n errors".
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return itoa(n) + " " + many
}

// ellipsis shortens text to fit w in the current font, ending it with
// "…" when it had to be cut.
func (d *doc) ellipsis(text string, w float64) string {
	text = printable(text)
	if d.pdf.GetStringWidth(text) <= w {
		return text
	}
	cut := d.fit(text, w-d.pdf.GetStringWidth("…"))
	return strings.TrimSpace(text[:cut]) + "…"
}

// printable makes text safe for the PDF's fonts: a character outside the
// Basic Multilingual Plane (emoji, rare CJK ideographs), which the font
// subsetter cannot take, and invalid UTF-8 become U+FFFD; control
// characters other than newline become spaces. Characters the font has no
// glyph for still print as an empty box but stay in the extractable text.
func printable(text string) string {
	clean := true
	for _, r := range text {
		if r > 0xFFFF || r == utf8.RuneError || (r < 0x20 && r != '\n') || r == 0x7f {
			clean = false
			break
		}
	}
	if clean {
		return text
	}
	var b strings.Builder
	for _, r := range text {
		switch {
		case r > 0xFFFF || r == utf8.RuneError:
			b.WriteRune('\uFFFD')
		case (r < 0x20 && r != '\n') || r == 0x7f:
			b.WriteByte(' ')
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

package pdfreport

import (
	"strings"

	"probity/plan/record"
	"probity/templates"
)

// roleTitles are the printed titles of the sign-off roles.
var roleTitles = map[string]string{
	templates.Prepared: "Prepared by",
	templates.Reviewed: "Reviewed by",
	templates.Approved: "Approved by",
}

// signBox is one signer's box.
type signBox struct {
	title   string
	s       record.Signoff
	meaning string
}

// signBoxes returns the boxes in print order: prepared, reviewed, approved
// (blank when not given), then any other roles the record lists.
func (d *doc) signBoxes(c *content) []signBox {
	byRole := map[string]record.Signoff{}
	var extra []record.Signoff
	for _, s := range c.rec.Signoff {
		role := strings.ToLower(strings.TrimSpace(s.Role))
		if _, known := roleTitles[role]; known {
			if _, dup := byRole[role]; !dup {
				byRole[role] = s
				continue
			}
		}
		extra = append(extra, s)
	}
	var boxes []signBox
	for _, role := range templates.Roles() {
		s := byRole[role]
		meaning := strings.TrimSpace(s.Meaning)
		if meaning == "" {
			m, err := c.tpl.SignatureMeaning(role, c.fields)
			if err != nil {
				d.pdf.SetError(err)
			}
			meaning = strings.TrimSpace(m)
		}
		boxes = append(boxes, signBox{roleTitles[role], s, meaning})
	}
	for _, s := range extra {
		title := strings.TrimSpace(s.Role)
		if title == "" {
			title = "Signed by"
		}
		boxes = append(boxes, signBox{title, s, strings.TrimSpace(s.Meaning)})
	}
	return boxes
}

// signoffSection prints the sign-off block: one box per role with printed
// name, role, date, a signature line and the signature's meaning, then the
// electronic signing key. The block stays on one page when it fits on one.
func (d *doc) signoffSection(c *content) {
	boxes := d.signBoxes(c)
	intro := d.text(c, templates.SignoffIntro)
	d.font("", bodySize)
	h := 3 + 9.5 + float64(len(d.wrap(intro, d.contentW())))*lineH + 2 + 2 + 2*lineH + 3*lineH
	for _, b := range boxes {
		h += d.boxHeight(b.meaning) + 3
	}
	if h < d.bottomY()-marginTop {
		d.need(h)
	}
	d.heading("Sign-off")
	d.wordingBlocks(intro)
	for _, b := range boxes {
		d.signatureBox(b)
	}
	d.space(2)
	d.subheading("Electronic signature", 2*lineH)
	if c.rec.SigningKey == "" {
		d.body("This record was not signed electronically.")
		return
	}
	d.body("record.sig holds detached Ed25519 signatures over record.json and this PDF. Public key fingerprint:")
	d.mono(bodySize - 0.5)
	for _, l := range d.wrap(c.rec.SigningKey, d.contentW()) {
		d.need(lineH)
		d.pdf.SetX(marginX)
		d.pdf.CellFormat(d.contentW(), lineH, l, "", 1, "L", false, 0, "")
	}
}

// meaningText is the printed meaning line of a box.
func meaningText(meaning string) string {
	if meaning == "" {
		return "Meaning of this signature: not stated."
	}
	return "Meaning of this signature: " + meaning
}

// boxHeight is the height of a signature box.
func (d *doc) boxHeight(meaning string) float64 {
	d.font("I", smallSize)
	return 30 + float64(len(d.wrap(meaningText(meaning), d.contentW()-8)))*smallLineH + 3
}

// signatureBox draws one signer's box, kept on one page.
func (d *doc) signatureBox(b signBox) {
	w := d.contentW()
	h := d.boxHeight(b.meaning)
	d.need(h + 3)
	x, y := marginX, d.pdf.GetY()
	d.drawColour(ruleColour)
	d.pdf.Rect(x, y, w, h, "D")
	d.fillColour(headFill)
	d.pdf.Rect(x, y, w, 7, "FD")
	d.font("B", bodySize+0.5)
	d.textColour(headingColour)
	d.pdf.SetXY(x+3, y+1.2)
	d.pdf.CellFormat(w-6, 4.6, d.ellipsis(b.title, w-6), "", 0, "L", false, 0, "")
	d.textColour(inkColour)

	// Printed name, role and date: the value above a labelled line.
	fieldsY := y + 8
	colW := []float64{w * 0.42, w * 0.36, w * 0.22}
	labels := []string{"Printed name", "Role", "Date"}
	values := []string{b.s.Name, b.s.Title, b.s.Date}
	fx := x + 3
	for i := range labels {
		fw := colW[i] - 6
		d.font("", bodySize)
		if v := strings.TrimSpace(values[i]); v != "" {
			d.pdf.SetXY(fx, fieldsY)
			d.pdf.CellFormat(fw, 5, d.wrap(v, fw)[0], "", 0, "L", false, 0, "")
		}
		d.drawColour(mutedColour)
		d.pdf.Line(fx, fieldsY+5.5, fx+fw, fieldsY+5.5)
		d.font("", smallSize-0.5)
		d.textColour(mutedColour)
		d.pdf.SetXY(fx, fieldsY+5.8)
		d.pdf.CellFormat(fw, 3, labels[i], "", 0, "L", false, 0, "")
		d.textColour(inkColour)
		fx += colW[i]
	}
	// The signature line is always blank: the signature is given in ink.
	sigY := fieldsY + 17
	d.pdf.Line(x+3, sigY, x+w*0.6, sigY)
	d.font("", smallSize-0.5)
	d.textColour(mutedColour)
	d.pdf.SetXY(x+3, sigY+0.3)
	d.pdf.CellFormat(w*0.6, 3, "Signature", "", 0, "L", false, 0, "")
	d.font("I", smallSize)
	ty := sigY + 4.5
	for _, l := range d.wrap(meaningText(b.meaning), w-8) {
		d.pdf.SetXY(x+3, ty)
		d.pdf.CellFormat(w-8, smallLineH, l, "", 0, "L", false, 0, "")
		ty += smallLineH
	}
	d.textColour(inkColour)
	d.pdf.SetXY(marginX, y+h+3)
}

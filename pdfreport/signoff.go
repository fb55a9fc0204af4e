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

// signBox is one role's box: who the sign-off file names for it (the
// intended signer, not a signature) and, once given, the electronic
// signature.
type signBox struct {
	title   string
	s       record.Signoff
	meaning string
	// signed is the role's electronic signature (nil: not signed).
	signed *record.ElectronicSignature
}

// signBoxes returns the boxes in print order: prepared, reviewed, approved,
// then any other roles the record lists.
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
	signed := map[string]*record.ElectronicSignature{}
	for i := range c.signatures {
		if _, dup := signed[c.signatures[i].Role]; !dup {
			signed[c.signatures[i].Role] = &c.signatures[i]
		}
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
		boxes = append(boxes, signBox{roleTitles[role], s, meaning, signed[role]})
	}
	for _, s := range extra {
		title := strings.TrimSpace(s.Role)
		if title == "" {
			title = "Signed by"
		}
		boxes = append(boxes, signBox{title, s, strings.TrimSpace(s.Meaning), nil})
	}
	return boxes
}

// signoffSection prints the sign-off block: one box per role with the
// signer the sign-off file intends and the electronic signature given (or
// "not signed"), then the operator's seal. The block stays on one page
// when it fits on one.
func (d *doc) signoffSection(c *content) {
	boxes := d.signBoxes(c)
	intro := d.text(c, templates.SignoffIntro)
	d.font("", bodySize)
	h := 3 + 9.5 + float64(len(d.wrap(intro, d.contentW())))*lineH + 2 + 2 + 2*lineH + 3*lineH
	for _, b := range boxes {
		h += d.boxHeight(b) + 3
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
	d.subheading("Operator's seal", 2*lineH)
	if c.rec.SigningKey == "" {
		d.body("This record was not sealed.")
		return
	}
	d.body("record.sig holds the Ed25519 seal of the operator who issued this record with probity, over record.json and " +
		"this record as issued. The seal shows that the record was not changed after it was issued, and with which key; it " +
		"is not the signature of a person named above, and it does not mean that anyone prepared, reviewed or approved " +
		"the record. Seal key fingerprint:")
	d.mono(bodySize - 0.5)
	for _, l := range d.wrap(c.rec.SigningKey, d.contentW()) {
		d.need(lineH)
		d.pdf.SetX(marginX)
		d.pdf.CellFormat(d.contentW(), lineH, l, "", 1, "L", false, 0, "")
	}
}

// Layout of a box: the title bar, the intended signer, the signature.
const (
	boxTitleH  = 7.0
	boxPad     = 3.0
	boxLabelH  = 3.2
	boxInnerW  = 8.0 // total horizontal padding
	boxValueLH = 4.4
)

// intendedText is the box's line about the intended signer.
func intendedText(s record.Signoff) string {
	name, title := strings.TrimSpace(s.Name), strings.TrimSpace(s.Title)
	if name == "" {
		if title != "" {
			return "none named (the role: " + title + ")"
		}
		return "none named"
	}
	t := name
	if title != "" {
		t += ", " + title
	}
	if s.Date != "" {
		t += " (planned date " + s.Date + ")"
	}
	return t
}

// signedLines are the wrapped lines of a box's signature part, with the
// font each is printed in: bold for the signature itself.
func (d *doc) signedLines(b signBox, w float64) (lines []string, bold []bool) {
	add := func(style, text string) {
		d.font(style, bodySize)
		for _, l := range d.wrap(text, w) {
			lines = append(lines, l)
			bold = append(bold, style == "B")
		}
	}
	if b.signed == nil {
		add("B", "NOT SIGNED")
		add("", "Meaning of this signature once given: "+orNotStated(b.meaning))
		return lines, bold
	}
	s := b.signed
	add("B", "Signed electronically by "+s.Name+" on "+s.SignedAt.UTC().Format("2006-01-02 15:04:05")+" UTC")
	add("", "Role signed: "+s.Role+"; signature "+itoa(s.Sequence)+" in signatures.txt")
	add("", "Meaning of this signature: "+orNotStated(s.Meaning))
	add("", "Signer's key: "+s.KeyFingerprint)
	return lines, bold
}

func orNotStated(s string) string {
	if strings.TrimSpace(s) == "" {
		return "not stated."
	}
	return s
}

// boxParts wraps a box's text: the intended signer and the signature.
func (d *doc) boxParts(b signBox) (intended []string, signed []string, bold []bool) {
	w := d.contentW() - boxInnerW
	d.font("", bodySize)
	intended = d.wrap(intendedText(b.s), w)
	signed, bold = d.signedLines(b, w)
	return intended, signed, bold
}

// boxHeight is the height of a signature box: every line of every name
// is printed in full, wrapped, never cut.
func (d *doc) boxHeight(b signBox) float64 {
	intended, signed, _ := d.boxParts(b)
	return boxTitleH + 1.5 + boxLabelH + float64(len(intended))*boxValueLH + 2 + boxLabelH + float64(len(signed))*boxValueLH + 2
}

// signatureBox draws one role's box, kept on one page.
func (d *doc) signatureBox(b signBox) {
	w := d.contentW()
	h := d.boxHeight(b)
	intended, signed, bold := d.boxParts(b)
	d.need(h + 3)
	x, y := marginX, d.pdf.GetY()
	d.drawColour(ruleColour)
	d.pdf.Rect(x, y, w, h, "D")
	d.fillColour(headFill)
	d.pdf.Rect(x, y, w, boxTitleH, "FD")
	d.font("B", bodySize+0.5)
	d.textColour(headingColour)
	d.pdf.SetXY(x+boxPad, y+1.2)
	d.pdf.CellFormat(w-2*boxPad, 4.6, d.ellipsis(b.title, w-2*boxPad), "", 0, "L", false, 0, "")
	d.textColour(inkColour)

	ty := y + boxTitleH + 1.5
	label := func(text string) {
		d.font("", smallSize-0.5)
		d.textColour(mutedColour)
		d.pdf.SetXY(x+boxPad, ty)
		d.pdf.CellFormat(w-boxInnerW, boxLabelH, text, "", 0, "L", false, 0, "")
		d.textColour(inkColour)
		ty += boxLabelH
	}
	label("Intended signer, from the sign-off file (not a signature)")
	d.font("", bodySize)
	for _, l := range intended {
		d.pdf.SetXY(x+boxPad, ty)
		d.pdf.CellFormat(w-boxInnerW, boxValueLH, l, "", 0, "L", false, 0, "")
		ty += boxValueLH
	}
	ty += 2
	label("Electronic signature")
	for i, l := range signed {
		style := ""
		if bold[i] {
			style = "B"
		}
		d.font(style, bodySize)
		if b.signed == nil && bold[i] {
			d.textColour(rejectColour)
		}
		d.pdf.SetXY(x+boxPad, ty)
		d.pdf.CellFormat(w-boxInnerW, boxValueLH, l, "", 0, "L", false, 0, "")
		d.textColour(inkColour)
		ty += boxValueLH
	}
	d.pdf.SetXY(marginX, y+h+3)
}

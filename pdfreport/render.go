package pdfreport

import (
	"bytes"
	"errors"
	"fmt"
	"strings"
	"time"

	"codeberg.org/go-fonts/liberation/liberationmonoregular"
	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansitalic"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"github.com/jung-kurt/gofpdf"

	"probity/plan/record"
	"probity/templates"
)

// Options control the layout of the PDF.
type Options struct {
	// Paper is "a4" or "letter" (any case); "" means a4.
	Paper string
	// Templates is the wording set; nil means the embedded set. It must be
	// the set the record names (record.Wording.Digest).
	Templates *templates.Set
	// Signatures are the electronic signatures given so far, in chain
	// order; the sign-off block shows each, and every role without one as
	// not signed.
	Signatures []record.ElectronicSignature
}

// ErrWording is wrapped when the wording given is not the wording the
// record was made with.
var ErrWording = errors.New("not the record's wording")

// ErrRecord is wrapped by every error about a Record that cannot be laid
// out (a malformed date, an unknown use, inconsistent tables).
var ErrRecord = errors.New("record cannot be laid out")

// paperSize returns gofpdf's size name and the page size in mm.
func paperSize(paper string) (string, float64, float64, error) {
	switch strings.ToLower(paper) {
	case "", "a4":
		return "A4", 210, 297, nil
	case "letter":
		return "Letter", 215.9, 279.4, nil
	}
	return "", 0, 0, fmt.Errorf("paper %q is not a4 or letter", paper)
}

// Render lays out rec as a PDF acceptance record and returns its bytes.
// The same rec and opts always give the same bytes.
func Render(rec *record.Record, opts Options) ([]byte, error) {
	if rec == nil {
		return nil, fmt.Errorf("%w: no record", ErrRecord)
	}
	size, w, h, err := paperSize(opts.Paper)
	if err != nil {
		return nil, err
	}
	tpl := opts.Templates
	if tpl == nil {
		if tpl, err = templates.Load(""); err != nil {
			return nil, err
		}
	}
	date, err := issueTime(rec)
	if err != nil {
		return nil, err
	}
	if err := check(rec); err != nil {
		return nil, err
	}
	if d := rec.Wording.Digest; d != "" && d != tpl.Fingerprint() {
		return nil, fmt.Errorf("%w: the record was made with wording digest %s, the wording given has %s", ErrWording, d, tpl.Fingerprint())
	}
	c, err := newContent(rec, tpl)
	if err != nil {
		return nil, err
	}
	c.signatures = opts.Signatures
	// Two passes: the first counts the pages, the second prints "Page x
	// of y" with the count. Both lay out exactly the same content.
	first, err := c.layout(size, w, h, date, 0)
	if err != nil {
		return nil, err
	}
	second, err := c.layout(size, w, h, date, first.pages)
	if err != nil {
		return nil, err
	}
	if second.pages != first.pages {
		return nil, fmt.Errorf("internal error: page count changed between passes (%d, %d)", first.pages, second.pages)
	}
	return second.bytes, nil
}

// issueTime is when the record was issued, the PDF's creation date: the
// chronology's issue time, or, for a record made before records were
// timed, the start of its date.
func issueTime(rec *record.Record) (time.Time, error) {
	date, err := time.Parse("2006-01-02", rec.Date)
	if err != nil {
		return time.Time{}, fmt.Errorf("%w: date %q is not YYYY-MM-DD", ErrRecord, rec.Date)
	}
	if c := rec.Chronology; c != nil && !c.Issued.IsZero() {
		return c.Issued.Time.UTC(), nil
	}
	return date, nil
}

// check refuses a Record whose tables cannot be drawn consistently.
func check(rec *record.Record) error {
	if _, err := useOf(rec); err != nil {
		return err
	}
	for i, cand := range rec.Candidates {
		cm := cand.Confusion
		if len(cm.Counts) != len(cm.Classes) {
			return fmt.Errorf("%w: candidates[%d] (%s): confusion matrix has %d rows for %d classes",
				ErrRecord, i, cand.Name, len(cm.Counts), len(cm.Classes))
		}
		for j, row := range cm.Counts {
			if len(row) != len(cm.Classes) {
				return fmt.Errorf("%w: candidates[%d] (%s): confusion matrix row %d has %d columns for %d classes",
					ErrRecord, i, cand.Name, j, len(row), len(cm.Classes))
			}
		}
	}
	return nil
}

// useOf returns the record's declared use ("" reads as general).
func useOf(rec *record.Record) (string, error) {
	use := rec.Use
	if use == "" {
		use = "general"
	}
	for _, u := range templates.Uses() {
		if u == use {
			return use, nil
		}
	}
	return "", fmt.Errorf("%w: use %q is not one of %s", ErrRecord, rec.Use, strings.Join(templates.Uses(), ", "))
}

// content is everything that goes on the pages, prepared once for both
// passes.
type content struct {
	rec    *record.Record
	tpl    *templates.Set
	fields templates.Fields
	use    string
	oc     []byte // the OC figure as PNG; nil when the record has no curve
	// signatures are the electronic signatures shown in the sign-off.
	signatures []record.ElectronicSignature
}

func newContent(rec *record.Record, tpl *templates.Set) (*content, error) {
	use, _ := useOf(rec)
	c := &content{rec: rec, tpl: tpl, fields: fieldsOf(rec, use), use: use}
	if len(rec.OC) > 0 && !hasMeasures(rec) {
		png, err := ocFigure(rec)
		if err != nil {
			return nil, err
		}
		c.oc = png
	}
	return c, nil
}

// output is one pass's result.
type output struct {
	bytes []byte
	pages int
	// placed is where each table row went.
	placed []placement
}

// layout runs one pass.
func (c *content) layout(size string, w, h float64, date time.Time, total int) (output, error) {
	pdf := gofpdf.NewCustom(&gofpdf.InitType{OrientationStr: "P", UnitStr: "mm", SizeStr: size})
	pdf.SetCreationDate(date)
	pdf.SetModificationDate(date)
	pdf.SetCatalogSort(true)
	pdf.SetCompression(true)
	pdf.SetProducer("probity "+c.rec.ToolVersion, true)
	pdf.SetCreator("probity "+c.rec.ToolVersion, true)
	pdf.SetTitle(printable("Acceptance record "+c.rec.RecordID+" – "+systemName(c.rec)), true)
	pdf.SetSubject("Statistical acceptance of a classifier's error rate", true)
	// Each document gets its own copy of the font files: gofpdf pads the
	// font's tables in place while it embeds them, so documents made at
	// the same time would otherwise write to one shared array (a data
	// race under go test -race, though the padding bytes it writes are
	// the zeros already there).
	pdf.AddUTF8FontFromBytes("sans", "", bytes.Clone(liberationsansregular.TTF))
	pdf.AddUTF8FontFromBytes("sans", "B", bytes.Clone(liberationsansbold.TTF))
	pdf.AddUTF8FontFromBytes("sans", "I", bytes.Clone(liberationsansitalic.TTF))
	pdf.AddUTF8FontFromBytes("mono", "", bytes.Clone(liberationmonoregular.TTF))
	pdf.SetMargins(marginX, marginTop, marginX)
	pdf.SetAutoPageBreak(false, marginBottom)
	pdf.SetLineWidth(0.2)
	d := &doc{pdf: pdf, pageW: w, pageH: h, totalPages: total}
	pdf.SetHeaderFunc(func() { d.pageHeader(c) })
	pdf.SetFooterFunc(func() { d.pageFooter(c) })
	if c.oc != nil {
		pdf.RegisterImageOptionsReader("oc-curve", gofpdf.ImageOptions{ImageType: "PNG"}, bytes.NewReader(c.oc))
	}
	pdf.AddPage()
	// With measures the verdicts rest on the claims: their summary, plan
	// and results replace the overall error's table, plan and operating
	// characteristic.
	summary, planInfo, results := d.summary, d.planInfo, d.ocSection
	if hasMeasures(c.rec) {
		summary, planInfo, results = d.measuresSummary, d.measuresPlanInfo, d.measuresSection
	}
	sections := []func(*content){
		d.titleBlock,
		summary,
		d.conformity,
		d.cautions,
		planInfo,
		results,
		d.strataSection,
		d.confusionSection,
		d.labelQualitySection,
		d.labelTrailSection,
		d.methodSection,
		d.deviationsSection,
		d.scopeSection,
		d.provenanceSection,
		d.signoffSection,
	}
	for _, section := range sections {
		section(c)
		if err := pdf.Error(); err != nil {
			return output{}, fmt.Errorf("laying out the PDF: %w", err)
		}
	}
	pages := pdf.PageNo()
	if total == 0 {
		// The counting pass needs the layout only, not the file.
		return output{pages: pages, placed: d.placed}, nil
	}
	var buf bytes.Buffer
	if err := pdf.Output(&buf); err != nil {
		return output{}, fmt.Errorf("writing the PDF: %w", err)
	}
	return output{bytes: buf.Bytes(), pages: pages, placed: d.placed}, nil
}

// pageHeader prints the running head on every page after the first.
func (d *doc) pageHeader(c *content) {
	if d.pdf.PageNo() == 1 {
		return
	}
	d.font("", smallSize)
	d.textColour(mutedColour)
	d.pdf.SetXY(marginX, 9)
	right := printable("Record " + c.rec.RecordID)
	rw := d.pdf.GetStringWidth(right) + 2
	lw := d.contentW() - rw - 4
	d.pdf.CellFormat(lw, 4, d.ellipsis("Acceptance record · "+systemName(c.rec), lw), "", 0, "L", false, 0, "")
	d.pdf.SetX(marginX + d.contentW() - rw)
	d.pdf.CellFormat(rw, 4, right, "", 0, "R", false, 0, "")
	d.drawColour(ruleColour)
	d.pdf.Line(marginX, 14, marginX+d.contentW(), 14)
	d.textColour(inkColour)
	d.pdf.SetXY(marginX, marginTop)
}

// pageFooter prints the record id, date and "Page x of y" on every page.
func (d *doc) pageFooter(c *content) {
	y := d.pageH - 13
	d.drawColour(ruleColour)
	d.pdf.Line(marginX, y, marginX+d.contentW(), y)
	d.font("", smallSize)
	d.textColour(mutedColour)
	d.pdf.SetXY(marginX, y+1.5)
	left := "Record " + c.rec.RecordID + " · revision " + itoa(revision(c.rec)) + " · " + c.rec.Date
	if c.rec.OverallVerdict != "" {
		left += " · overall verdict " + c.rec.OverallVerdict
	}
	d.pdf.CellFormat(d.contentW()*0.8, 4, d.ellipsis(left, d.contentW()*0.8), "", 0, "L", false, 0, "")
	total := "?"
	if d.totalPages > 0 {
		total = itoa(d.totalPages)
	}
	d.pdf.CellFormat(d.contentW()*0.2, 4, "Page "+itoa(d.pdf.PageNo())+" of "+total, "", 0, "R", false, 0, "")
	if c.rec.Demonstration {
		d.font("B", smallSize)
		d.textColour(rejectColour)
		d.pdf.SetXY(marginX, y+5.5)
		d.pdf.CellFormat(d.contentW(), 4, d.ellipsis(demonstrationLine, d.contentW()), "", 0, "L", false, 0, "")
	}
	d.textColour(inkColour)
}

// demonstrationLine is printed on every page of a demonstration record.
const demonstrationLine = "DEMONSTRATION — the scenario, organisation and people are invented; signed with published keys. Not an acceptance record."

// revision is the record's revision (a record without one is the first).
func revision(rec *record.Record) int {
	if rec.Revision < 1 {
		return 1
	}
	return rec.Revision
}

// systemName is "name version", or a placeholder when the record names no
// system.
func systemName(rec *record.Record) string {
	name := strings.TrimSpace(rec.System)
	if name == "" {
		name = "unnamed system"
	}
	if v := strings.TrimSpace(rec.SystemVersion); v != "" {
		name += " " + v
	}
	return name
}

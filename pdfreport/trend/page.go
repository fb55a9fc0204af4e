package trend

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"time"

	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"github.com/jung-kurt/gofpdf"
	"gonum.org/v1/plot/vg"

	"probity/pdfreport"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/trend"
)

// PageInfo is what the one-page PDF needs beyond the Trend.
type PageInfo struct {
	// Date stamps the PDF's creation and modification dates (the latest
	// record's date keeps the bytes a function of the records).
	Date time.Time
	// ToolVersion is the probity version written in the footer.
	ToolVersion string
}

// Page geometry (mm) and fonts (pt).
const (
	pageMargin  = 14.0
	rowH        = 4.3
	tableFont   = 7.5
	minTableFnt = 5.5
	chartDPI    = 200
	maxPeriods  = 36
	minCandW    = 30.0 // mm per candidate in the table
	// Fixed table columns: period, record id, overall verdict.
	colPeriod  = 16.0
	colRecord  = 21.0
	colOverall = 15.0
)

type rgb = pdfreport.Colour

// The record's palette, plus the trend's own flag colour.
var (
	ink       = pdfreport.Ink
	muted     = pdfreport.Muted
	heading   = pdfreport.Heading
	headFill  = pdfreport.HeadFill
	zebraFill = pdfreport.ZebraFill
	accept    = pdfreport.AcceptGreen
	reject    = pdfreport.RejectRed
	flag      = rgb{R: 200, G: 95, B: 0}
	rule      = pdfreport.Rule
)

// PDF lays out t on one A4 portrait page (up to 36 periods and 4
// candidates; the table's type shrinks from 7.5 pt for 4) and returns its
// bytes: a heading with the class, the
// baseline and the test; the chart; a table of every period (record id,
// overall verdict, and per candidate errors/labeled, upper bound and the
// p-value against the baseline, flagged ones marked "↑"); the warnings;
// and a footer. The same t and info give the same bytes.
func PDF(t *trend.Trend, info PageInfo) ([]byte, error) {
	if err := checkTrend(t); err != nil {
		return nil, err
	}
	if len(t.Periods) > maxPeriods {
		return nil, inputerr.Errorf("%w: %d periods do not fit on one page (at most %d); pass fewer records", ErrTrend, len(t.Periods), maxPeriods)
	}
	k := len(t.Candidates)
	orient, ph := "P", 297.0
	cw := 210.0 - 2*pageMargin
	candW := (cw - colPeriod - colRecord - colOverall) / float64(k)
	if candW < minCandW {
		return nil, fmt.Errorf("%w: %d candidates do not fit in one table row of the page (at most %d); the PNG chart shows them all",
			ErrTrend, k, int((cw-colPeriod-colRecord-colOverall)/minCandW))
	}
	fontSize := math.Max(minTableFnt, math.Min(tableFont, candW/42*tableFont))
	rh := rowH * fontSize / tableFont

	pdf := gofpdf.NewCustom(&gofpdf.InitType{OrientationStr: orient, UnitStr: "mm", SizeStr: "A4"})
	pdf.SetCreationDate(info.Date)
	pdf.SetModificationDate(info.Date)
	pdf.SetCatalogSort(true)
	pdf.SetCompression(true)
	pdf.SetProducer("probity "+info.ToolVersion, true)
	pdf.SetCreator("probity "+info.ToolVersion, true)
	pdf.SetTitle("Trend of acceptance records, "+t.Periods[0].Label+" to "+t.Latest.Label, true)
	// Its own copy of the fonts, as in pdfreport: gofpdf pads their tables
	// in place, which would race between pages made at the same time.
	pdf.AddUTF8FontFromBytes("sans", "", bytes.Clone(liberationsansregular.TTF))
	pdf.AddUTF8FontFromBytes("sans", "B", bytes.Clone(liberationsansbold.TTF))
	pdf.SetMargins(pageMargin, pageMargin, pageMargin)
	pdf.SetAutoPageBreak(false, pageMargin)
	pdf.SetLineWidth(0.2)
	pdf.AddPage()
	p := &page{pdf: pdf, x: pageMargin, w: cw}

	p.header(t)
	warnH := p.warningsHeight(t.Warnings)
	tableH := float64(len(t.Periods)+2)*rh + 5
	footerH := 9.0
	avail := ph - pageMargin - pdf.GetY() - 4 - tableH - 4 - warnH - footerH
	nw, nh := ChartSize(t)
	chartW := cw
	// Up to 1.3 × the natural height: a short trend gets taller panels.
	chartH := 1.3 * chartW * nh.Points() / nw.Points()
	if chartH > avail {
		chartH = avail
	}
	if chartH < 20+18*float64(k) {
		return nil, inputerr.Errorf("%w: the chart and a table of %d periods do not fit on one page", ErrTrend, len(t.Periods))
	}
	// Draw at the chart's natural width (so the legend fits) and let the
	// page scale it down; the DPI gives chartDPI pixels per inch on paper.
	scale := nw.Points() / (chartW / 25.4 * 72)
	dpi := int(math.Round(chartDPI / scale))
	img, err := PNG(t, nw, vg.Length(chartH/25.4*72*scale), dpi)
	if err != nil {
		return nil, err
	}
	pdf.RegisterImageOptionsReader("trend-chart", gofpdf.ImageOptions{ImageType: "PNG"}, bytes.NewReader(img))
	y := pdf.GetY() + 2
	pdf.ImageOptions("trend-chart", p.x, y, chartW, chartH, false, gofpdf.ImageOptions{ImageType: "PNG"}, 0, "")
	pdf.SetY(y + chartH + 3)
	p.table(t, candW, fontSize, rh)
	p.warnings(t.Warnings)
	p.footer(t, info, ph)
	if err := pdf.Error(); err != nil {
		return nil, fmt.Errorf("laying out the trend PDF: %w", err)
	}
	var buf bytes.Buffer
	if err := pdf.Output(&buf); err != nil {
		return nil, fmt.Errorf("writing the trend PDF: %w", err)
	}
	return buf.Bytes(), nil
}

// page is the page being laid out.
type page struct {
	pdf  *gofpdf.Fpdf
	x, w float64
}

func (p *page) font(style string, size float64, c rgb) {
	p.pdf.SetFont("sans", style, size)
	p.pdf.SetTextColor(c.R, c.G, c.B)
}

func (p *page) fill(c rgb) { p.pdf.SetFillColor(c.R, c.G, c.B) }

// line writes one line of text across the page.
func (p *page) line(text string, h float64) {
	p.pdf.SetX(p.x)
	p.pdf.CellFormat(p.w, h, text, "", 1, "L", false, 0, "")
}

func (p *page) header(t *trend.Trend) {
	title := "Trend of acceptance records"
	if sys := strings.TrimSpace(t.System + " " + t.SystemVersion); sys != "" {
		title += " — " + sys
	}
	p.font("B", 14, heading)
	p.line(title, 7)
	p.font("", 8.5, muted)
	c := t.Class
	p.line(fmt.Sprintf("%d periods, %s to %s · %s model, %s method, %s design · ceiling %s at %s confidence",
		len(t.Periods), t.Periods[0].Label, t.Latest.Label, c.Model, c.Method, c.Design, numfmt.Setting(c.Ceiling), numfmt.Confidence(c.Confidence)), 4.4)
	if m := t.Measure; m != nil {
		p.line(fitText(p.pdf, fmt.Sprintf("Measure %s, ceiling %s: each period's claim as its record judged it; periods are not compared (weighted estimates).",
			m.Measure, numfmt.Setting(m.Ceiling)), p.w), 4.4)
		p.line(fitText(p.pdf, "Released: "+releasedList(t), p.w), 4.4)
	} else {
		p.line(fmt.Sprintf("Baseline %s · a period is flagged ↑ when Fisher's exact test (one-sided: error higher than the baseline's) gives p ≤ %s;",
			t.Baseline, numfmt.Number(t.Alpha)), 4.4)
		p.line(fmt.Sprintf("each of the %d comparisons per candidate is at that level (not adjusted for their number), whether or not the period passed.",
			len(t.Periods)-1), 4.4)
	}
	p.pdf.Ln(1)
	col := accept
	if t.Latest.OverallVerdict == record.Reject {
		col = reject
	}
	p.font("B", 10, col)
	p.line(fmt.Sprintf("Latest period %s: %s (record %s)", t.Latest.Label, t.Latest.OverallVerdict, t.Latest.RecordID), 5.5)
	if len(t.Unauthenticated) > 0 {
		p.font("B", 9, reject)
		p.line(fitText(p.pdf, fmt.Sprintf("UNAUTHENTICATED records charted (marked *): %d of %d, not authenticated by their signatures or not checked: %s",
			len(t.Unauthenticated), len(t.Periods), strings.Join(t.Unauthenticated, ", ")), p.w), 4.8)
	}
}

// releasedList is each period's released candidate ("none" when the
// release rule released none), fitted to the page by the caller's width.
func releasedList(t *trend.Trend) string {
	var out []string
	for i, per := range t.Periods {
		name := t.Measure.Released[i]
		if name == "" {
			name = "none"
		}
		out = append(out, per.Label+" "+name)
	}
	return strings.Join(out, " · ")
}

// shortID is the first 12 digits of a record id.
func shortID(id string) string {
	if len(id) > 12 {
		return id[:12]
	}
	return id
}

// authMark marks an unauthenticated record in the table.
func authMark(p trend.Period) string {
	if p.Authenticated {
		return ""
	}
	return " *"
}

// table draws one row per period.
func (p *page) table(t *trend.Trend, candW, size, rowH float64) {
	pdf := p.pdf
	sub := []float64{candW * 0.34, candW * 0.30, candW * 0.36}
	// First header row: candidate names over their three columns.
	p.fill(headFill)
	p.font("B", size, ink)
	pdf.SetX(p.x)
	pdf.CellFormat(colPeriod+colRecord+colOverall, rowH, "", "", 0, "L", true, 0, "")
	for _, s := range t.Candidates {
		pdf.CellFormat(candW, rowH, fitText(pdf, s.Name, candW-2), "L", 0, "C", true, 0, "")
	}
	pdf.Ln(-1)
	pdf.SetX(p.x)
	for _, h := range []struct {
		w float64
		s string
	}{{colPeriod, "period"}, {colRecord, "record"}, {colOverall, "overall"}} {
		pdf.CellFormat(h.w, rowH, h.s, "B", 0, "L", true, 0, "")
	}
	for range t.Candidates {
		pdf.CellFormat(sub[0], rowH, "errors/n", "LB", 0, "R", true, 0, "")
		pdf.CellFormat(sub[1], rowH, "upper", "B", 0, "R", true, 0, "")
		pdf.CellFormat(sub[2], rowH, "p vs base", "B", 0, "R", true, 0, "")
	}
	pdf.Ln(-1)
	rows := make([]map[string]trend.Point, len(t.Candidates))
	for i, s := range t.Candidates {
		rows[i] = map[string]trend.Point{}
		for _, r := range s.Rows {
			rows[i][r.Period] = r
		}
	}
	for j, per := range t.Periods {
		zebra := j%2 == 1
		p.fill(zebraFill)
		pdf.SetX(p.x)
		p.font("", size, ink)
		pdf.CellFormat(colPeriod, rowH, per.Label, "", 0, "L", zebra, 0, "")
		// The first 12 digits of the id: enough to find the record.
		pdf.CellFormat(colRecord, rowH, shortID(per.RecordID)+authMark(per), "", 0, "L", zebra, 0, "")
		vc := accept
		if per.OverallVerdict == record.Reject {
			vc = reject
		}
		p.font("B", size, vc)
		pdf.CellFormat(colOverall, rowH, per.OverallVerdict, "", 0, "L", zebra, 0, "")
		for i := range t.Candidates {
			r, ok := rows[i][per.Label]
			p.font("", size, ink)
			if !ok {
				p.font("", size, muted)
				pdf.CellFormat(sub[0], rowH, "—", "L", 0, "R", zebra, 0, "")
				pdf.CellFormat(sub[1]+sub[2], rowH, "not in this record", "", 0, "C", zebra, 0, "")
				continue
			}
			pdf.CellFormat(sub[0], rowH, numfmt.Count(r.Errors)+"/"+numfmt.Count(r.Labeled), "L", 0, "R", zebra, 0, "")
			if r.Verdict == record.Reject {
				p.font("B", size, reject)
			}
			pdf.CellFormat(sub[1], rowH, numfmt.RateUp(r.UpperBound), "", 0, "R", zebra, 0, "")
			pv := "base"
			p.font("", size, muted)
			if r.PValue != nil {
				pv = numfmt.PValue(*r.PValue)
				p.font("", size, ink)
				if r.Flagged {
					pv += " ↑"
					p.font("B", size, flag)
				}
			} else if per.Label != t.Baseline {
				pv = "—"
			}
			pdf.CellFormat(sub[2], rowH, pv, "", 0, "R", zebra, 0, "")
		}
		pdf.Ln(-1)
	}
	pdf.SetDrawColor(rule.R, rule.G, rule.B)
	y := pdf.GetY()
	pdf.Line(p.x, y, p.x+p.w, y)
	p.font("", 7, muted)
	pdf.Ln(0.8)
	if t.Measure != nil {
		p.line(fmt.Sprintf("%s: events/counted items of the claim, upper: its one-sided upper confidence bound; red bold: the claim was rejected. Ceiling %s.", t.Quantity(), numfmt.Setting(t.Class.Ceiling)), 3.6)
		return
	}
	p.line(fmt.Sprintf("upper: one-sided upper confidence bound of the record; red bold: that candidate was rejected (its errors exceeded the plan's acceptance number). Ceiling %s.", numfmt.Setting(t.Class.Ceiling)), 3.6)
}

// warningsHeight is the space the warnings take.
func (p *page) warningsHeight(ws []string) float64 {
	if len(ws) == 0 {
		return 0
	}
	p.font("", 7.5, ink)
	h := 5.0
	for _, w := range ws {
		h += 3.6 * float64(len(p.pdf.SplitText("• "+w, p.w)))
	}
	return h
}

func (p *page) warnings(ws []string) {
	if len(ws) == 0 {
		return
	}
	p.pdf.Ln(1.5)
	p.font("B", 8.5, flag)
	p.line("Warnings", 4.5)
	p.font("", 7.5, ink)
	for _, w := range ws {
		p.pdf.SetX(p.x)
		p.pdf.MultiCell(p.w, 3.6, "• "+w, "", "L", false)
	}
}

func (p *page) footer(t *trend.Trend, info PageInfo, ph float64) {
	pdf := p.pdf
	y := ph - pageMargin - 4
	pdf.SetDrawColor(rule.R, rule.G, rule.B)
	pdf.Line(p.x, y-1, p.x+p.w, y-1)
	pdf.SetXY(p.x, y)
	p.font("", 7, muted)
	left := fmt.Sprintf("probity %s · drawn from the %d records named in the table; every number is a field of those records", info.ToolVersion, len(t.Periods))
	pdf.CellFormat(p.w*0.85, 4, left, "", 0, "L", false, 0, "")
	pdf.CellFormat(p.w*0.15, 4, "page 1 of 1", "", 0, "R", false, 0, "")
}

// fitText shortens s with "…" until it fits in w mm in the current font.
func fitText(pdf *gofpdf.Fpdf, s string, w float64) string {
	if pdf.GetStringWidth(s) <= w {
		return s
	}
	r := []rune(s)
	for len(r) > 1 && pdf.GetStringWidth(string(r)+"…") > w {
		r = r[:len(r)-1]
	}
	return string(r) + "…"
}

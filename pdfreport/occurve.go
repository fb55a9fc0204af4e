package pdfreport

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"probity/plan"
	"probity/plan/numfmt"
	"probity/plan/record"
)

// Figure size on the page (mm) and raster resolution.
const (
	ocWidthMM  = 168.0
	ocHeightMM = 86.0
	ocDPI      = 200
	ocLegendMM = 52.0
	// ocStripMM is the height of the strip under the axis that holds the
	// candidates' observed estimates.
	ocStripMM = 11.0
)

var (
	plotCurve    = color.RGBA{R: 20, G: 45, B: 90, A: 255}
	plotCeiling  = color.RGBA{R: 190, G: 25, B: 35, A: 255}
	plotAnticip  = color.RGBA{R: 0, G: 122, B: 61, A: 255}
	plotAccepted = color.RGBA{R: 0, G: 122, B: 61, A: 255}
	plotRejected = color.RGBA{R: 190, G: 25, B: 35, A: 255}
	plotGrid     = color.RGBA{R: 215, G: 220, B: 228, A: 255}
)

// ocFigure draws the record's OC curve with gonum/plot and returns it as
// PNG: the true error rate (in percent) on x, the probability of
// acceptance on y, the ceiling and the anticipated error as vertical
// lines, the plan's consumer's risk as a point on the ceiling line, and,
// in a strip of its own under the axis (an observation, not a true error
// rate), each candidate's observed estimate as a numbered triangle (green
// when accepted, red when rejected). Every value drawn is a field of rec.
func ocFigure(rec *record.Record) ([]byte, error) {
	for i, pt := range rec.OC {
		if bad(pt.Error) || bad(pt.AcceptProbability) || pt.AcceptProbability < 0 || pt.AcceptProbability > 1 {
			return nil, fmt.Errorf("%w: oc[%d] = (%v, %v) is not an (error, probability) point",
				ErrRecord, i, pt.Error, pt.AcceptProbability)
		}
	}
	p := plot.New()
	sans := func(size vg.Length) font.Font {
		return font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, size)
	}
	p.Title.TextStyle.Font = sans(11)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = sans(10)
		ax.Tick.Label.Font = sans(9)
	}
	leg := plot.NewLegend()
	leg.TextStyle.Font = sans(9)
	p.X.Label.Text = "True error rate (%)"
	p.Y.Label.Text = "Probability of acceptance"
	p.Y.Min, p.Y.Max = 0, 1
	p.Y.Tick.Marker = fixedTicks{step: 0.1, format: "%.1f"}

	pts := make(plotter.XYs, len(rec.OC))
	for i, pt := range rec.OC {
		pts[i].X = 100 * pt.Error
		pts[i].Y = pt.AcceptProbability
	}
	xmax, step := ocXRange(rec)
	ceil := 100 * rec.Plan.Ceiling
	p.X.Min, p.X.Max = 0, xmax
	p.X.Tick.Marker = fixedTicks{step: step, format: ""}

	grid := plotter.NewGrid()
	grid.Vertical.Color, grid.Horizontal.Color = plotGrid, plotGrid
	grid.Vertical.Width, grid.Horizontal.Width = vg.Points(0.5), vg.Points(0.5)
	p.Add(grid)

	curve, err := plotter.NewLine(pts)
	if err != nil {
		return nil, fmt.Errorf("%w: oc curve: %v", ErrRecord, err)
	}
	curve.Color = plotCurve
	curve.Width = vg.Points(1.8)
	p.Add(curve)
	consumer, consumerWord, producer := rec.Plan.ConsumerRisk, "consumer's risk ", rec.Plan.ProducerRisk
	switch r := rec.Method.Rule; {
	case rec.Plan.Design == plan.DesignSequential:
		leg.Add(fmt.Sprintf("OC curve, sequential, n ≤ %d", rec.Plan.SampleSize), curve)
	case r != nil && r.Name == record.RuleStratifiedCount:
		leg.Add(fmt.Sprintf("OC curve, count rule, c = %d", r.AcceptanceNumber), curve)
		consumer, consumerWord, producer = r.ConsumerRiskBound, "consumer's risk ≤ ", r.ProducerRisk
	default:
		leg.Add(fmt.Sprintf("OC curve, n = %d, c = %d", rec.Plan.SampleSize, rec.Plan.AcceptanceNumber), curve)
	}

	ceilLine, err := vline(ceil, plotCeiling, []vg.Length{vg.Points(5), vg.Points(3)})
	if err != nil {
		return nil, err
	}
	p.Add(ceilLine)
	leg.Add("ceiling "+numfmt.Setting(rec.Plan.Ceiling), ceilLine)

	if consumer > 0 {
		risk, err := plotter.NewScatter(plotter.XYs{{X: ceil, Y: consumer}})
		if err != nil {
			return nil, err
		}
		risk.GlyphStyle = draw.GlyphStyle{Color: plotCeiling, Radius: vg.Points(3.5), Shape: draw.CircleGlyph{}}
		p.Add(risk)
		written := numfmt.Chance(consumer)
		if consumerWord != "consumer's risk " {
			written = numfmt.ChanceUp(consumer) // an "at most" is never printed below its value
		}
		leg.Add(consumerWord+written, risk)
	}
	if a := rec.Plan.Anticipated; a != nil {
		line, err := vline(100**a, plotAnticip, []vg.Length{vg.Points(2), vg.Points(2)})
		if err != nil {
			return nil, err
		}
		p.Add(line)
		leg.Add("anticipated error "+numfmt.Setting(*a), line)
		if pr := producer; pr != nil {
			// The curve's height at p0 is 1 − producer's risk.
			pt, err := plotter.NewScatter(plotter.XYs{{X: 100 * *a, Y: 1 - *pr}})
			if err != nil {
				return nil, err
			}
			pt.GlyphStyle = draw.GlyphStyle{Color: plotAnticip, Radius: vg.Points(3.5), Shape: draw.CircleGlyph{}}
			p.Add(pt)
			leg.Add("producer's risk "+numfmt.Chance(*pr), pt)
		}
	}
	// The estimates are observations, not true error rates: they go in a
	// strip of their own under the axis, numbered in declared order (the
	// caption names each number), and the legend says so.
	marks := estimateMarks(rec)
	for _, m := range []struct {
		verdict string
		label   string
	}{{record.Accept, "observed estimate, accepted"}, {record.Reject, "observed estimate, rejected"}} {
		for _, mk := range marks {
			if (mk.verdict == record.Accept) == (m.verdict == record.Accept) {
				sc, err := plotter.NewScatter(plotter.XYs{{}})
				if err != nil {
					return nil, err
				}
				sc.GlyphStyle = mk.glyph()
				leg.Add(m.label, sc)
				break
			}
		}
	}
	leg.Top = true
	leg.Left = true
	leg.YOffs = -vg.Points(8)
	leg.Padding = vg.Points(2.5)

	// The legend sits in a column right of the plot, so it never hides
	// the curve or the markers.
	w := vg.Length(ocWidthMM) * vg.Millimeter
	h := vg.Length(ocHeightMM) * vg.Millimeter
	legendW := vg.Length(ocLegendMM) * vg.Millimeter
	cnv := vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(ocDPI), vgimg.UseBackgroundColor(color.White))
	dc := draw.New(cnv)
	stripH := vg.Length(0)
	if len(marks) > 0 {
		stripH = vg.Length(ocStripMM) * vg.Millimeter
	}
	area := draw.Crop(dc, 0, -legendW, stripH, 0)
	p.Draw(area)
	if len(marks) > 0 {
		drawEstimateStrip(draw.Crop(dc, 0, -legendW, 0, -(h-stripH)), p.DataCanvas(area), marks, xmax, step, sans)
	}
	leg.Draw(draw.Crop(dc, w-legendW+vg.Points(6), 0, 0, 0))
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: cnv}).WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("encoding the OC figure: %w", err)
	}
	return buf.Bytes(), nil
}

// vline is a vertical line across the unit probability range at x.
func vline(x float64, c color.Color, dashes []vg.Length) (*plotter.Line, error) {
	l, err := plotter.NewLine(plotter.XYs{{X: x, Y: 0}, {X: x, Y: 1}})
	if err != nil {
		return nil, fmt.Errorf("%w: marker at %v: %v", ErrRecord, x, err)
	}
	l.Color = c
	l.Width = vg.Points(1.2)
	l.Dashes = dashes
	return l, nil
}

// niceStep is a 1-2-5 tick step giving about five to ten ticks on
// [0, max].
func niceStep(max float64) float64 {
	if !(max > 0) {
		return 1
	}
	raw := max / 8
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if raw <= m*mag {
			return m * mag
		}
	}
	return 10 * mag
}

// fixedTicks places major ticks every step from 0.
type fixedTicks struct {
	step   float64
	format string
}

// Ticks implements plot.Ticker.
func (t fixedTicks) Ticks(min, max float64) []plot.Tick {
	var ticks []plot.Tick
	decimals := 0
	if t.step < 1 {
		decimals = int(math.Ceil(-math.Log10(t.step) - 1e-9))
	}
	for i := 0; ; i++ {
		v := float64(i) * t.step
		if v > max+t.step*1e-9 {
			break
		}
		if v < min-t.step*1e-9 {
			continue
		}
		label := fmt.Sprintf("%.*f", decimals, v)
		if t.format != "" {
			label = fmt.Sprintf(t.format, v)
		}
		ticks = append(ticks, plot.Tick{Value: v, Label: label})
	}
	return ticks
}

// ocXRange is the x axis's end and tick step, in percent: past every
// point of the curve, 15 % past the ceiling, past the anticipated error
// and every estimate, ending on a tick.
func ocXRange(rec *record.Record) (xmax, step float64) {
	for _, pt := range rec.OC {
		xmax = math.Max(xmax, 100*pt.Error)
	}
	xmax = math.Max(xmax, 100*rec.Plan.Ceiling*1.15)
	if a := rec.Plan.Anticipated; a != nil && !bad(*a) {
		xmax = math.Max(xmax, 100**a*1.05)
	}
	for _, cand := range rec.Candidates {
		if !bad(cand.Estimate) {
			xmax = math.Max(xmax, 100*cand.Estimate*1.03)
		}
	}
	step = niceStep(xmax)
	return math.Ceil(xmax/step-1e-9) * step, step
}

// estimateMark is one candidate's observed estimate in the figure.
type estimateMark struct {
	number  int // the candidate's place in declared order, from 1
	x       float64
	verdict string
}

func (m estimateMark) glyph() draw.GlyphStyle {
	c := plotRejected
	if m.verdict == record.Accept {
		c = plotAccepted
	}
	return draw.GlyphStyle{Color: c, Radius: vg.Points(4), Shape: draw.PyramidGlyph{}}
}

// estimateMarks are the candidates' estimates in percent, numbered in
// declared order (a candidate without an estimate keeps its number).
func estimateMarks(rec *record.Record) []estimateMark {
	var marks []estimateMark
	for i, cand := range rec.Candidates {
		if bad(cand.Estimate) {
			continue
		}
		marks = append(marks, estimateMark{number: i + 1, x: 100 * cand.Estimate, verdict: cand.Verdict})
	}
	return marks
}

// drawEstimateStrip draws the estimates under the plot: a scale with the
// axis's ticks, aligned with the data area da, a numbered triangle at
// each estimate (numbers that would touch are raised a row) and the
// words "observed estimates" at the left.
func drawEstimateStrip(c, da draw.Canvas, marks []estimateMark, xmax, step float64, sans func(vg.Length) font.Font) {
	x0, x1 := da.Min.X, da.Max.X
	xOf := func(v float64) vg.Length { return x0 + vg.Length(v/xmax)*(x1-x0) }
	base := c.Min.Y + c.Size().Y*0.3
	rule := draw.LineStyle{Color: plotGrid, Width: vg.Points(0.8)}
	c.StrokeLine2(rule, x0, base, x1, base)
	for v := 0.0; v <= xmax+step*1e-9; v += step {
		c.StrokeLine2(rule, xOf(v), base-vg.Points(2), xOf(v), base+vg.Points(2))
	}
	label := draw.TextStyle{Color: color.Gray{Y: 90}, Font: sans(8), XAlign: draw.XRight, YAlign: draw.YCenter,
		Handler: plot.DefaultTextHandler}
	c.FillText(label, vg.Point{X: x0 - vg.Points(6), Y: base + vg.Points(4)}, "observed")
	c.FillText(label, vg.Point{X: x0 - vg.Points(6), Y: base - vg.Points(4)}, "estimates")
	num := draw.TextStyle{Color: plotCurve, Font: sans(8), XAlign: draw.XCenter, YAlign: draw.YBottom,
		Handler: plot.DefaultTextHandler}
	sorted := append([]estimateMark(nil), marks...)
	sort.SliceStable(sorted, func(i, j int) bool { return sorted[i].x < sorted[j].x })
	lastX, row := vg.Length(-1e9), 0
	for _, m := range sorted {
		x := xOf(m.x)
		if x-lastX < vg.Points(9) {
			row = (row + 1) % 2
		} else {
			row = 0
		}
		lastX = x
		c.DrawGlyphNoClip(m.glyph(), vg.Point{X: x, Y: base})
		c.FillText(num, vg.Point{X: x, Y: base + vg.Points(5) + vg.Length(row)*vg.Points(8)}, strconv.Itoa(m.number))
	}
}

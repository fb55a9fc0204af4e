package pdfreport

import (
	"bytes"
	"fmt"
	"image/color"
	"math"

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
// lines, the plan's consumer's risk as a point on the ceiling line, and
// each candidate's observed estimate as a triangle on the x axis (green
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

	xmax := 0.0
	pts := make(plotter.XYs, len(rec.OC))
	for i, pt := range rec.OC {
		pts[i].X = 100 * pt.Error
		pts[i].Y = pt.AcceptProbability
		xmax = math.Max(xmax, pts[i].X)
	}
	ceil := 100 * rec.Plan.Ceiling
	xmax = math.Max(xmax, ceil*1.15)
	if a := rec.Plan.Anticipated; a != nil && !bad(*a) {
		xmax = math.Max(xmax, 100**a*1.05)
	}
	for _, cand := range rec.Candidates {
		if !bad(cand.Estimate) {
			xmax = math.Max(xmax, 100*cand.Estimate*1.03)
		}
	}
	// End the axis on a tick.
	step := niceStep(xmax)
	xmax = math.Ceil(xmax/step-1e-9) * step
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
		leg.Add(consumerWord+numfmt.Chance(consumer), risk)
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
	var acc, rej plotter.XYs
	for _, cand := range rec.Candidates {
		if bad(cand.Estimate) {
			continue
		}
		pt := plotter.XY{X: 100 * cand.Estimate, Y: 0.015}
		if cand.Verdict == record.Accept {
			acc = append(acc, pt)
		} else {
			rej = append(rej, pt)
		}
	}
	for _, s := range []struct {
		pts   plotter.XYs
		c     color.Color
		label string
	}{{acc, plotAccepted, "estimate, accepted"}, {rej, plotRejected, "estimate, rejected"}} {
		if len(s.pts) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(s.pts)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: s.c, Radius: vg.Points(4), Shape: draw.PyramidGlyph{}}
		p.Add(sc)
		leg.Add(s.label, sc)
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
	p.Draw(draw.Crop(dc, 0, -legendW, 0, 0))
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

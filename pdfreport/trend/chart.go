package trend

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"math"
	"strings"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/trend"
)

// ErrTrend is wrapped by errors about a Trend that cannot be drawn.
var ErrTrend = errors.New("trend cannot be drawn")

// Colours of the chart.
var (
	inkCol      = color.RGBA{R: 25, G: 25, B: 30, A: 255}
	mutedCol    = color.RGBA{R: 95, G: 100, B: 110, A: 255}
	estimateCol = color.RGBA{R: 20, G: 45, B: 90, A: 255}
	boundCol    = color.RGBA{R: 70, G: 120, B: 190, A: 255}
	intervalCol = color.RGBA{R: 170, G: 195, B: 230, A: 255}
	ceilingCol  = color.RGBA{R: 190, G: 25, B: 35, A: 255}
	rejectCol   = color.RGBA{R: 190, G: 25, B: 35, A: 255}
	flagCol     = color.RGBA{R: 230, G: 120, B: 0, A: 255}
	gridCol     = color.RGBA{R: 222, G: 226, B: 233, A: 255}
)

// Geometry of the chart, in points.
const (
	headerH  = 40 // title and legend strip
	panelH   = 150
	titleH   = 15 // a panel's own title line
	bottomH  = 8
	minWidth = 360
)

// ChartSize returns the natural width and height of the chart of t (about
// 10 × 2.1 inches per candidate plus the header).
func ChartSize(t *trend.Trend) (w, h vg.Length) {
	n := len(t.Candidates)
	return 720, vg.Length(headerH + n*(panelH+titleH) + bottomH)
}

func sans(size vg.Length) font.Font {
	return font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, size)
}

func sansBold(size vg.Length) font.Font {
	return font.From(font.Font{Typeface: "Liberation", Variant: "Sans", Weight: xfont.WeightBold}, size)
}

func style(f font.Font, c color.Color) text.Style {
	return text.Style{Color: c, Font: f, Handler: plot.DefaultTextHandler, YAlign: text.YBottom}
}

// PNG draws the chart of t at w × h and dpi and returns it as PNG.
func PNG(t *trend.Trend, w, h vg.Length, dpi int) ([]byte, error) {
	if err := checkTrend(t); err != nil {
		return nil, err
	}
	if w < minWidth || h < vg.Length(headerH+len(t.Candidates)*60) || dpi < 36 || dpi > 600 {
		return nil, inputerr.Errorf("%w: size %v × %v at %d dpi is too small or too large", ErrTrend, w, h, dpi)
	}
	c := vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(dpi), vgimg.UseBackgroundColor(color.White))
	if err := drawChart(t, draw.New(c)); err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("encoding the chart: %w", err)
	}
	return buf.Bytes(), nil
}

// checkTrend refuses a Trend the chart cannot show faithfully.
func checkTrend(t *trend.Trend) error {
	if t == nil || len(t.Periods) == 0 || len(t.Candidates) == 0 {
		return fmt.Errorf("%w: no periods or no candidates", ErrTrend)
	}
	if !(t.Class.Ceiling > 0 && t.Class.Ceiling < 1) {
		return fmt.Errorf("%w: ceiling %v is outside (0, 1)", ErrTrend, t.Class.Ceiling)
	}
	idx := periodIndex(t)
	for _, s := range t.Candidates {
		for _, r := range s.Rows {
			if _, ok := idx[r.Period]; !ok {
				return fmt.Errorf("%w: %s has a row for period %s, which is not among the periods", ErrTrend, s.Name, r.Period)
			}
			if !(r.Estimate >= 0 && r.Estimate <= 1 && r.UpperBound >= 0 && r.UpperBound <= 1) {
				return fmt.Errorf("%w: %s in %s: estimate %v or upper bound %v is outside [0, 1]", ErrTrend, s.Name, r.Period, r.Estimate, r.UpperBound)
			}
		}
	}
	return nil
}

func periodIndex(t *trend.Trend) map[string]int {
	idx := make(map[string]int, len(t.Periods))
	for i, p := range t.Periods {
		idx[p.Label] = i
	}
	return idx
}

// drawChart draws the header (title and legend) and one panel per
// candidate into dc.
func drawChart(t *trend.Trend, dc draw.Canvas) error {
	header := draw.Crop(dc, 0, 0, dc.Max.Y-dc.Min.Y-headerH, 0)
	panels := draw.Crop(dc, 0, 0, bottomH, -headerH)
	ymax := yMax(t)
	plots := make([][]*plot.Plot, len(t.Candidates))
	for i, s := range t.Candidates {
		p, err := panel(t, s, ymax, i == len(t.Candidates)-1)
		if err != nil {
			return err
		}
		plots[i] = []*plot.Plot{p}
	}
	tiles := draw.Tiles{Rows: len(plots), Cols: 1, PadTop: titleH, PadY: titleH, PadLeft: 6, PadRight: 14}
	canvases := plot.Align(plots, tiles, panels)
	var left vg.Length
	for i, s := range t.Candidates {
		p := plots[i][0]
		p.Draw(canvases[i][0])
		data := p.DataCanvas(canvases[i][0])
		left = data.Min.X
		panelTitle(canvases[i][0], data.Min.X, s, t)
	}
	drawHeader(t, header, left)
	return nil
}

// yMax is the common top of every panel's y axis: the largest upper bound
// or 1.3 × the ceiling, whichever is higher, plus headroom for labels.
func yMax(t *trend.Trend) float64 {
	top := 1.3 * t.Class.Ceiling
	for _, s := range t.Candidates {
		for _, r := range s.Rows {
			top = math.Max(top, r.UpperBound*1.18)
		}
	}
	return math.Min(1, top)
}

// panel builds one candidate's plot.
func panel(t *trend.Trend, s trend.Series, ymax float64, bottom bool) (*plot.Plot, error) {
	idx := periodIndex(t)
	n := len(t.Periods)
	p := plot.New()
	p.BackgroundColor = color.Transparent
	p.X.Min, p.X.Max = -0.5, float64(n)-0.5
	p.Y.Min, p.Y.Max = 0, ymax
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Tick.Label.Font = sans(8.5)
		ax.Tick.Label.Color = inkCol
		ax.Label.TextStyle.Font = sans(9)
		ax.LineStyle.Color = mutedCol
		ax.Tick.LineStyle.Color = mutedCol
	}
	p.Y.Label.Text = t.Quantity()
	p.Y.Tick.Marker = percentTicks{}
	ticks := make([]plot.Tick, n)
	for i, per := range t.Periods {
		ticks[i] = plot.Tick{Value: float64(i)}
		if bottom {
			ticks[i].Label = per.Label
		}
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	if bottom && n > 14 {
		p.X.Tick.Label.Rotation = math.Pi / 4
		p.X.Tick.Label.XAlign = text.XRight
		p.X.Tick.Label.YAlign = text.YCenter
	}
	grid := plotter.NewGrid()
	grid.Vertical.Color = nil
	grid.Horizontal.Color = gridCol
	p.Add(grid)

	ceil, err := plotter.NewLine(plotter.XYs{{X: -0.5, Y: t.Class.Ceiling}, {X: float64(n) - 0.5, Y: t.Class.Ceiling}})
	if err != nil {
		return nil, err
	}
	ceil.Color, ceil.Width, ceil.Dashes = ceilingCol, 1.4, []vg.Length{6, 3}
	p.Add(ceil)

	est := make(plotter.XYs, 0, len(s.Rows))
	var flagged, rejectedEst, caps, rejectedCaps plotter.XYs
	var labels plotter.XYLabels
	for _, r := range s.Rows {
		x := float64(idx[r.Period])
		est = append(est, plotter.XY{X: x, Y: r.Estimate})
		bar, err := plotter.NewLine(plotter.XYs{{X: x, Y: r.Estimate}, {X: x, Y: r.UpperBound}})
		if err != nil {
			return nil, err
		}
		bar.Color, bar.Width = intervalCol, 3.5
		p.Add(bar)
		if r.Verdict == record.Reject {
			rejectedCaps = append(rejectedCaps, plotter.XY{X: x, Y: r.UpperBound})
			rejectedEst = append(rejectedEst, plotter.XY{X: x, Y: r.Estimate})
		} else {
			caps = append(caps, plotter.XY{X: x, Y: r.UpperBound})
		}
		if r.Flagged {
			flagged = append(flagged, plotter.XY{X: x, Y: r.Estimate})
			labels.XYs = append(labels.XYs, plotter.XY{X: x, Y: r.UpperBound})
			labels.Labels = append(labels.Labels, "p = "+numfmt.PValue(*r.PValue))
		}
	}
	// Caps are a fixed number of points wide, whatever the number of
	// periods.
	for _, cs := range []struct {
		xys plotter.XYs
		col color.Color
	}{{caps, boundCol}, {rejectedCaps, rejectCol}} {
		if len(cs.xys) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(cs.xys)
		if err != nil {
			return nil, err
		}
		sc.Shape, sc.Color, sc.Radius = capGlyph{width: 2}, cs.col, capHalf(n)
		p.Add(sc)
	}
	line, points, err := plotter.NewLinePoints(est)
	if err != nil {
		return nil, err
	}
	line.Color, line.Width = estimateCol, 1
	points.Shape = draw.CircleGlyph{}
	points.Color, points.Radius = estimateCol, 2.6
	p.Add(line, points)
	if len(rejectedEst) > 0 {
		rej, err := plotter.NewScatter(rejectedEst)
		if err != nil {
			return nil, err
		}
		rej.Shape, rej.Color, rej.Radius = draw.CircleGlyph{}, rejectCol, 2.6
		p.Add(rej)
	}
	if len(flagged) > 0 {
		ring, err := plotter.NewScatter(flagged)
		if err != nil {
			return nil, err
		}
		ring.Shape, ring.Color, ring.Radius = thickRing{width: 1.6}, flagCol, 5.5
		p.Add(ring)
		lab, err := plotter.NewLabels(labels)
		if err != nil {
			return nil, err
		}
		for i := range lab.TextStyle {
			lab.TextStyle[i].Font = sans(7.5)
			lab.TextStyle[i].Color = flagCol
			lab.TextStyle[i].XAlign = text.XCenter
		}
		lab.Offset = vg.Point{Y: 3}
		p.Add(lab)
	}
	return p, nil
}

// panelTitle writes the candidate's name and its flags above its panel.
func panelTitle(c draw.Canvas, left vg.Length, s trend.Series, t *trend.Trend) {
	alpha := t.Alpha
	y := c.Max.Y + 3
	name := style(sansBold(10), inkCol)
	c.FillText(name, vg.Point{X: left, Y: y}, s.Name)
	x := left + name.Width(s.Name) + 10
	var note string
	col := mutedCol
	switch {
	case t.Measure != nil:
		note = "each period's claim on " + t.Measure.Measure + "; no comparison between periods"
	case !s.Tested:
		note = "not in the baseline period: not tested"
	case len(s.Flagged) > 0:
		note = fmt.Sprintf("higher than baseline (p ≤ %s): %s", numfmt.Number(alpha), strings.Join(s.Flagged, ", "))
		col = flagCol
	default:
		note = "no period significantly higher than the baseline"
	}
	c.FillText(style(sans(8.5), col), vg.Point{X: x, Y: y}, note)
}

// drawHeader writes the title and a one-line legend.
func drawHeader(t *trend.Trend, c draw.Canvas, left vg.Length) {
	first, last := t.Periods[0].Label, t.Latest.Label
	title := fmt.Sprintf("Error per period against the ceiling, %s to %s", first, last)
	if t.Measure != nil {
		title = fmt.Sprintf("%s — %s — per period against the ceiling, %s to %s", t.Measure.Measure, t.Measure.Title, first, last)
	}
	tsty := style(sansBold(11.5), inkCol)
	c.FillText(tsty, vg.Point{X: left, Y: c.Max.Y - 16}, title)
	if n := len(t.Unauthenticated); n > 0 {
		note := "UNAUTHENTICATED: " + strings.Join(t.Unauthenticated, ", ")
		if n > 3 {
			note = fmt.Sprintf("UNAUTHENTICATED: %d of %d records", n, len(t.Periods))
		}
		c.FillText(style(sansBold(9.5), rejectCol), vg.Point{X: left + tsty.Width(title) + 16, Y: c.Max.Y - 15}, note)
	}
	y := c.Min.Y + 5
	x := left
	entry := func(th plot.Thumbnailer, label string) {
		tc := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + 18, Y: y + 9}}}
		th.Thumbnail(&tc)
		sty := style(sans(8.5), inkCol)
		c.FillText(sty, vg.Point{X: x + 22, Y: y}, label)
		x += 22 + sty.Width(label) + 14
	}
	est := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Shape: draw.CircleGlyph{}, Color: estimateCol, Radius: 2.6}}
	entry(est, "estimate")
	entry(&plotter.Line{LineStyle: draw.LineStyle{Color: boundCol, Width: 2}}, "upper bound ("+boundLabel(t)+")")
	entry(&plotter.Line{LineStyle: draw.LineStyle{Color: ceilingCol, Width: 1.4, Dashes: []vg.Length{6, 3}}}, "ceiling "+numfmt.Setting(t.Class.Ceiling))
	if t.Measure == nil {
		entry(&plotter.Scatter{GlyphStyle: draw.GlyphStyle{Shape: thickRing{width: 1.4}, Color: flagCol, Radius: 4}},
			"higher than "+t.Baseline+" (Fisher, one-sided)")
	}
	entry(&plotter.Line{LineStyle: draw.LineStyle{Color: rejectCol, Width: 2}}, "rejected")
}

// boundLabel states the confidence of the upper bounds.
func boundLabel(t *trend.Trend) string {
	var conf float64
	for _, s := range t.Candidates {
		for _, r := range s.Rows {
			if conf == 0 {
				conf = r.BoundConfidence
			} else if r.BoundConfidence != conf {
				return "one-sided, confidence per record"
			}
		}
	}
	if conf == 0 {
		return "one-sided"
	}
	return "one-sided " + numfmt.Confidence(conf)
}

// percentTicks label the y axis in percent: the smallest step of 1, 2 or
// 5 × 10^k giving at most 5 labeled ticks from min, with one unlabeled tick
// between labeled ones.
type percentTicks struct{}

// Ticks implements plot.Ticker.
func (percentTicks) Ticks(min, max float64) []plot.Tick {
	span := max - min
	if !(span > 0) {
		return []plot.Tick{{Value: min, Label: tickLabel(min)}}
	}
	step := math.Pow(10, math.Floor(math.Log10(span/5)))
	for _, m := range []float64{1, 2, 5, 10} {
		if span/(m*step) <= 5 {
			step *= m
			break
		}
	}
	var ts []plot.Tick
	for i := 0; ; i++ {
		v := min + float64(i)*step
		if v > max+step*1e-9 {
			break
		}
		ts = append(ts, plot.Tick{Value: v, Label: tickLabel(v)})
		if mid := v + step/2; mid <= max {
			ts = append(ts, plot.Tick{Value: mid})
		}
	}
	return ts
}

// tickLabel labels a tick of the percent axis: the value as a stated
// percentage (numfmt.Setting, the digits it has: "0.5 %", "1 %"); the
// tick values are round, so this is exact.
func tickLabel(x float64) string { return numfmt.Setting(x) }

// thickRing is a circle outline of a given line width (draw.RingGlyph's
// line is fixed at half a point, too thin to see on a busy panel).
type thickRing struct{ width vg.Length }

// DrawGlyph implements draw.GlyphDrawer.
func (g thickRing) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.width})
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.Stroke(p)
}

// capGlyph is a horizontal bar Radius to each side of the point: the top
// of an upper-bound interval.
type capGlyph struct{ width vg.Length }

// DrawGlyph implements draw.GlyphDrawer.
func (g capGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.StrokeLine2(draw.LineStyle{Color: sty.Color, Width: g.width}, pt.X-sty.Radius, pt.Y, pt.X+sty.Radius, pt.Y)
}

// capHalf is the half-width of a cap: 8 points, narrower when many periods
// share the axis.
func capHalf(periods int) vg.Length {
	if periods <= 12 {
		return 8
	}
	return vg.Length(math.Max(3, 8*12/float64(periods)))
}

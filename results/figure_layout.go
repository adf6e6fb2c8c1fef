package results

import (
	"image/color"
	"math"
	"slices"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Layout of a figure on its canvas, from the outside in:
//
//   - a blank margin of figMargin on every side;
//   - the title, fitted to the width (fitText: shrunk by at most 15 %, else
//     wrapped), centred over the plot (over the whole width if it is
//     wider), titleGap above the rest;
//   - with LegendRight, a strip on the right as wide as the legend, whose
//     entries start level with the top of the data area (the legend's
//     font shrinks, down to 6 pt, when it would take more than 40 % of the
//     width or not fit in the height);
//   - the axis labels, fitted like the title to the length of their axis
//     and centred on the data area (gonum/plot centres the padding of a
//     label on a log axis at the arithmetic mean of the range, which
//     leaves a large empty band; drawing them here avoids that);
//   - the plot itself (gonum/plot's axes, tick labels and data area), with
//     the tick labels of the x axis fitted: when labels of valueTicks
//     would collide, only every s-th from the first keeps its label, for
//     the smallest s that keeps them apart (the ticks stay), category labels
//     (NominalX) are turned by 30°, 45°, 60° or 90° until neighbours are
//     apart, and shrunk at 90° if they still collide; the plot moves right
//     when the first tick label would reach past the y label (gonum pads
//     the data area on the left for plotter glyphs only);
//   - without LegendRight, the legend where gonum would put it, on a white
//     box with a thin border.
//
// The plot passed to Figure is never modified: the layout works on a
// shallow copy, so one figure can be rendered any number of times, and
// different figures concurrently.
const (
	figMargin = vg.Length(6)  // blank border of every figure, points
	titleGap  = vg.Length(6)  // between the title and the plot
	labelGap  = vg.Length(3)  // between an axis label and its tick labels
	legendGap = vg.Length(10) // between the plot and a legend strip
	tickGap   = vg.Length(3)  // least distance between two tick labels
	minLegend = vg.Length(6)  // smallest legend font size
	minShrink = 0.85          // smallest title and axis label size, relative
)

// draw lays the figure out on c (see the layout notes above).
func (f Figure) draw(dc draw.Canvas) {
	q := *f.Plot
	if q.BackgroundColor != nil {
		dc.SetColor(q.BackgroundColor)
		dc.Fill(dc.Rectangle.Path())
		q.BackgroundColor = nil
	}
	c := draw.Crop(dc, figMargin, -figMargin, figMargin, -figMargin)
	spaceLegend(&q.Legend)

	var leg plot.Legend
	var legW vg.Length
	if f.LegendRight {
		leg = q.Legend
		q.Legend = plot.NewLegend()
		for leg.Rectangle(c).Size().X > 0.4*c.Size().X && leg.TextStyle.Font.Size > minLegend {
			leg.TextStyle.Font.Size -= 0.5
			spaceLegend(&leg)
		}
		legW = leg.Rectangle(c).Size().X
	}
	plotC := c
	if legW > 0 {
		plotC.Max.X -= legW + legendGap
	}

	if q.Title.Text != "" {
		tb := titleLayout(q.Title.TextStyle, q.Title.Text, c.Size().X)
		cx := plotC.Center().X
		if tb.width() > plotC.Size().X {
			cx = c.Center().X
		}
		drawBlock(c, tb, cx, c.Max.Y)
		c.Max.Y -= tb.height() + titleGap
		plotC.Max.Y = c.Max.Y
		q.Title.Text = ""
	}

	xl, yl := q.X.Label, q.Y.Label
	q.X.Label.Text, q.Y.Label.Text = "", ""
	inner := plotC
	var xb, yb textBlock
	if xl.Text != "" {
		xb = fitText(xl.TextStyle, xl.Text, plotC.Size().X, minShrink)
		inner.Min.Y += xb.height() + labelGap
	}
	if yl.Text != "" {
		yb = fitText(yl.TextStyle, yl.Text, inner.Size().Y, minShrink)
		yb.sty.Rotation = math.Pi / 2
		inner.Min.X += yb.height() + labelGap
	}
	// gonum/plot pads the data area on the left for the glyphs of its
	// plotters but not for the tick labels of the x axis, whose first label
	// may reach past the left edge (long category names turned by 30°):
	// move the plot right until it does not reach into the y label's
	// strip.
	limit := inner.Min.X
	for range 4 {
		fitXTicks(&q, inner)
		qs, _ := tickQuads(&q, q.DataCanvas(inner), q.X.Tick.Marker.Ticks(q.X.Min, q.X.Max))
		lo := limit
		for _, tq := range qs {
			lo = min(lo, tq.bounds().Min.X)
		}
		if lo >= limit {
			break
		}
		inner.Min.X += limit - lo
	}
	data := q.DataCanvas(inner)
	if len(xb.lines) > 0 {
		drawBlock(plotC, xb, data.Center().X, plotC.Min.Y+xb.height())
	}
	if len(yb.lines) > 0 {
		w := yb.width()
		cy := clamp(data.Center().Y, inner.Min.Y+w/2, inner.Max.Y-w/2)
		pitch := linePitch(yb.sty)
		for i, line := range yb.lines {
			putText(plotC, yb.sty, vg.Point{X: plotC.Min.X + vg.Length(i)*pitch, Y: cy}, 0.5, 1, line)
		}
	}
	var inside plot.Legend
	if !f.LegendRight {
		inside = q.Legend
		q.Legend = plot.NewLegend()
	}
	q.Draw(inner)
	if !f.LegendRight {
		drawLegendInside(data, inside)
	}

	if legW > 0 {
		top := data.Max.Y
		for leg.Rectangle(c).Size().Y > top-c.Min.Y && leg.TextStyle.Font.Size > minLegend {
			leg.TextStyle.Font.Size -= 0.5
			spaceLegend(&leg)
		}
		side := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: c.Max.X - legW, Y: c.Min.Y},
			Max: vg.Point{X: c.Max.X, Y: top},
		}}
		leg.Top, leg.Left = true, true
		leg.XOffs, leg.YOffs = 0, 0
		leg.Draw(side)
	}
}

// drawLegendInside draws a legend that sits in the data area where
// gonum/plot would put it (its Top, Left, XOffs and YOffs), on a white,
// slightly translucent box with a thin border, so that it stays
// readable over the data (matplotlib's default legend frame is the same
// idea: common practice).
func drawLegendInside(data draw.Canvas, leg plot.Legend) {
	size := leg.Rectangle(data).Size()
	if size.X <= 0 {
		return
	}
	const pad = vg.Length(3)
	var r vg.Rectangle
	if leg.Left {
		r.Min.X = data.Min.X
	} else {
		r.Min.X = data.Max.X - size.X
	}
	if leg.Top {
		r.Min.Y = data.Max.Y - size.Y
	} else {
		r.Min.Y = data.Min.Y
	}
	r.Min = r.Min.Add(vg.Point{X: leg.XOffs, Y: leg.YOffs})
	r.Max = r.Min.Add(size)
	// Legend.Draw's text reaches a little below the entries' rectangle
	// (the descent of the last line).
	r = vg.Rectangle{
		Min: vg.Point{X: r.Min.X - pad, Y: r.Min.Y - pad - lineHeight(leg.TextStyle) + leg.TextStyle.Rectangle("x").Max.Y},
		Max: vg.Point{X: r.Max.X + pad, Y: r.Max.Y + pad},
	}
	data.SetColor(color.NRGBA{0xFF, 0xFF, 0xFF, 0xD9})
	data.Fill(r.Path())
	data.StrokeLines(draw.LineStyle{Color: color.NRGBA{0x99, 0x99, 0x99, 0xFF}, Width: vg.Points(0.5)},
		[]vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
	leg.Draw(data)
}

// titleLayout fits a title to the width of a figure's canvas inside the
// margins.
func titleLayout(sty text.Style, s string, width vg.Length) textBlock {
	return fitText(sty, s, width, minShrink)
}

// drawBlock draws the lines of b centred on cx (moved so that the widest
// line stays within c), the first line's box top at top.
func drawBlock(c draw.Canvas, b textBlock, cx, top vg.Length) {
	w := b.width()
	cx = clamp(cx, c.Min.X+w/2, c.Max.X-w/2)
	pitch := linePitch(b.sty)
	for i, line := range b.lines {
		putText(c, b.sty, vg.Point{X: cx, Y: top - vg.Length(i)*pitch}, 0.5, 1, line)
	}
}

// clamp limits v to [lo, hi]; to their middle when lo > hi.
func clamp(v, lo, hi vg.Length) vg.Length {
	if lo > hi {
		return (lo + hi) / 2
	}
	return max(lo, min(v, hi))
}

// spaceLegend sets the padding between legend entries so that the boxes
// of their text lines are a fifth of the font size apart: Legend.Draw
// steps entries by the height of the text's Rectangle, which is smaller
// than the box of the drawn line, plus Padding.
func spaceLegend(l *plot.Legend) {
	sty := l.TextStyle
	need := lineHeight(sty) + 0.2*sty.Font.Size - sty.Rectangle("x").Max.Y
	l.Padding = max(l.Padding, need)
}

// fitXTicks fits the tick labels of the x axis of p, drawn in c, so that
// no two of them collide (see the layout notes).
func fitXTicks(p *plot.Plot, c draw.Canvas) {
	switch m := p.X.Tick.Marker.(type) {
	case valueTicks:
		data := p.DataCanvas(c)
		qs, vals := tickQuads(p, data, m.Ticks(p.X.Min, p.X.Max))
		// The smallest stride s such that labels at every s-th drawn tick
		// from the first keep tickGap apart.
		keep := make([]bool, len(m.vals))
		for s := 1; s <= max(len(qs), 1); s++ {
			ok := true
			for j := s; j < len(qs); j += s {
				if overlapDepth(qs[j-s], qs[j]) > -tickGap {
					ok = false
					break
				}
			}
			if ok {
				for j := 0; j < len(qs); j += s {
					keep[slices.Index(m.vals, vals[j])] = true
				}
				break
			}
		}
		p.X.Tick.Marker = m.without(keep)
	case plot.ConstantTicks:
		base := p.X.Tick.Label
		for _, rot := range []float64{base.Rotation, math.Pi / 6, math.Pi / 4, math.Pi / 3, math.Pi / 2} {
			if rot < base.Rotation {
				continue
			}
			sty := base
			if rot != base.Rotation {
				sty.Rotation = rot
				sty.XAlign, sty.YAlign = draw.XRight, draw.YTop
				if rot == math.Pi/2 {
					sty.YAlign = draw.YCenter
				}
			}
			p.X.Tick.Label = sty
			if !ticksCollide(p, c, m) {
				return
			}
		}
		for p.X.Tick.Label.Font.Size > 6 && ticksCollide(p, c, m) {
			p.X.Tick.Label.Font.Size -= 0.5
		}
	}
}

// ticksCollide reports whether two neighbouring labels of the x axis
// ticks come closer than tickGap.
func ticksCollide(p *plot.Plot, c draw.Canvas, m plot.Ticker) bool {
	data := p.DataCanvas(c)
	qs, _ := tickQuads(p, data, m.Ticks(p.X.Min, p.X.Max))
	for j := 1; j < len(qs); j++ {
		if overlapDepth(qs[j-1], qs[j]) > -tickGap {
			return true
		}
	}
	return false
}

// tickQuads are the boxes of the labelled ticks of the x axis within the
// data area, left to right, at a common height (the axis draws all tick
// labels on one line, so only their relative positions matter).
func tickQuads(p *plot.Plot, data draw.Canvas, ticks []plot.Tick) ([]quad, []float64) {
	sort.SliceStable(ticks, func(i, j int) bool { return ticks[i].Value < ticks[j].Value })
	var qs []quad
	var vals []float64
	for _, t := range ticks {
		if t.IsMinor() {
			continue
		}
		x := data.X(p.X.Norm(t.Value))
		if !data.ContainsX(x) {
			continue
		}
		qs = append(qs, plainQuad(p.X.Tick.Label, vg.Point{X: x}, t.Label))
		vals = append(vals, t.Value)
	}
	return qs, vals
}

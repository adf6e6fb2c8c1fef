package results

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// CDWidth is the width of a critical-difference diagram.
const CDWidth = 6 * vg.Inch

// CDDiagram draws the critical-difference diagram of a rank table
// (Demšar, JMLR 7:1, 2006, section on post-hoc tests): models on an axis
// of average rank (rank 1, the best, on the left), the Nemenyi critical
// difference as a bar above the axis, and thick bars joining the models of
// each group not significantly different (RankGroups). It also returns
// the height that fits the drawing when it is rendered CDWidth wide.
//
// Layout: the better half of the models is listed on the left, the worse
// half on the right, each label "name  rank" joined to its rank by an
// elbow line. The axis takes what the labels leave, but at least 35 % of
// the width and room for every rank's tick label; a label that does not
// fit its side is wrapped (after '-', '_', ... in a long name). Tick
// labels are written at every integer rank, or at every 2nd, 5th, 10th
// ... from 1 when their measured width does not fit the spacing. The CD
// value is written right of its bar, or left of the axis, or above the
// bar, whichever fits first.
func CDDiagram(t RankTable, title string) (*plot.Plot, vg.Length, error) {
	k := len(t.Models)
	if k < 2 || len(t.AvgRanks) != k {
		return nil, 0, fmt.Errorf("results: CD diagram needs at least two models with ranks, got %d models and %d ranks", k, len(t.AvgRanks))
	}
	for _, r := range t.AvgRanks {
		if math.IsNaN(r) || r < 1 || r > float64(k) {
			return nil, 0, fmt.Errorf("results: CD diagram: average rank %v outside [1, %d]", r, k)
		}
	}
	p := newPlot(title, "", "")
	p.HideAxes()
	p.X.Padding, p.Y.Padding = 0, 0
	cd := &cdPlotter{t: t, groups: t.Groups()}
	p.Add(cd)
	w := CDWidth - 2*figMargin
	h := 2*figMargin + cdLayout(t, cd.groups, w).height
	if title != "" {
		h += titleLayout(p.Title.TextStyle, title, w).height() + titleGap
	}
	return p, h, nil
}

// Vertical layout of the CD diagram, in points down from the top of the
// data area.
const (
	cdBarY      = 6.0  // the CD bar
	cdTextRow   = 11.0 // extra room when the CD value goes above its bar
	cdBarToAxis = 24.0 // CD bar to axis line
	cdNoBarAxis = 20.0 // axis line when there is no CD bar
	cdGroupGap  = 9.0  // axis to first group bar
	cdGroupStep = 6.0  // between group bars
	cdRowsGap   = 8.0  // last group bar to the first label row
	cdRowStep   = 15.0 // between label rows (plus the extra lines of a wrapped label)
	cdPad       = 12.0 // axis end to the end of the labels' side
	cdTextGap   = 8.0  // axis end to a label
)

// cdPlace is where the CD value is written.
type cdPlace int

const (
	cdRight cdPlace = iota // right of the bar's end
	cdLeft                 // left of the axis start
	cdAbove                // above the bar, centred
	cdNone                 // no finite CD
)

// cdGeom is the layout of a CD diagram at a given width.
type cdGeom struct {
	lab, tick text.Style
	lines     [][]string  // per model: the lines of its label
	x0, x1    vg.Length   // axis ends, from the left edge
	step      int         // tick labels at ranks 1, 1+step, 1+2·step, ...
	cdText    string      // "CD = ... (α = ...)"
	place     cdPlace     // where cdText goes
	barY      vg.Length   // the CD bar, down from the top
	axisY     vg.Length   // the axis line, down from the top
	rowY      []vg.Length // per model: centre of the first line of its label, down from the top
	height    vg.Length   // of the whole drawing
}

// cdLayout lays out the diagram of t at the given width (see CDDiagram).
func cdLayout(t RankTable, groups [][]int, width vg.Length) cdGeom {
	k := len(t.Models)
	g := cdGeom{
		lab:  text.Style{Color: color.Black, Font: font.From(plot.DefaultFont, 9), Handler: plot.DefaultTextHandler},
		tick: text.Style{Color: color.Black, Font: font.From(plot.DefaultFont, 8), Handler: plot.DefaultTextHandler},
		step: 1, lines: make([][]string, k), rowY: make([]vg.Length, k),
	}
	order := rankOrder(t.AvgRanks)
	nLeft := (k + 1) / 2
	rankW := g.lab.Width("  00.00")
	natural := func(side int) vg.Length { // widest label of a side on one line
		var m vg.Length
		for i, j := range order {
			if (i < nLeft) == (side == 0) {
				m = max(m, g.lab.Width(t.Models[j])+rankW)
			}
		}
		return m
	}
	tickW := g.tick.Width(fmt.Sprint(k))
	minAxis := max(0.35*width, vg.Length(k-1)*(tickW+tickGap))
	budget := max(width-minAxis-2*cdPad, 2*rankW+g.lab.Width("abcdef"))
	nl, nr := natural(0), natural(1)
	maxL, maxR := nl, nr
	if nl+nr > budget {
		switch {
		case nl <= budget/2:
			maxR = budget - nl
		case nr <= budget/2:
			maxL = budget - nr
		default:
			maxL, maxR = budget/2, budget/2
		}
	}
	var wl, wr vg.Length
	for i, j := range order {
		side := maxR
		if i < nLeft {
			side = maxL
		}
		name := wrapText(t.Models[j], side-rankW, g.lab.Width)
		name[len(name)-1] += fmt.Sprintf("  %.2f", t.AvgRanks[j])
		g.lines[j] = name
		for _, l := range name {
			if i < nLeft {
				wl = max(wl, g.lab.Width(l))
			} else {
				wr = max(wr, g.lab.Width(l))
			}
		}
	}
	g.x0, g.x1 = wl+cdPad, width-wr-cdPad
	if g.x1-g.x0 < vg.Points(60) {
		// Cannot happen with the budget above unless width is tiny.
		mid := width / 2
		g.x0, g.x1 = mid-vg.Points(30), mid+vg.Points(30)
	}
	spacing := (g.x1 - g.x0) / vg.Length(k-1)
	for _, s := range []int{1, 2, 5, 10, 20, 50} {
		g.step = s
		if vg.Length(s)*spacing >= tickW+tickGap {
			break
		}
	}

	g.place = cdNone
	g.barY = cdBarY
	g.axisY = cdNoBarAxis
	if t.CD > 0 && !math.IsInf(t.CD, 0) {
		g.cdText = fmt.Sprintf("CD = %.3f (α = %s)", t.CD, fmtAlpha(t.Alpha))
		tw := g.tick.Width(g.cdText)
		xe := g.xr(math.Min(1+t.CD, float64(k)), k)
		switch {
		case xe+4+tw <= width:
			g.place = cdRight
		case g.x0-4-tw >= 0:
			g.place = cdLeft
		default:
			g.place = cdAbove
			g.barY += cdTextRow
		}
		g.axisY = g.barY + cdBarToAxis
	}
	pitch := linePitch(g.lab)
	rowsTop := g.axisY + cdGroupGap + cdGroupStep*vg.Length(len(groups)) + cdRowsGap
	yl, yr := rowsTop, rowsTop
	var bottom vg.Length
	for i := range order {
		// Left: best at the top; right: worst at the top.
		j := order[i]
		y := &yl
		if i >= nLeft {
			j = order[k-1-(i-nLeft)]
			y = &yr
		}
		g.rowY[j] = *y
		extra := vg.Length(len(g.lines[j])-1) * pitch
		bottom = max(bottom, *y+extra+lineHeight(g.lab)/2)
		*y += extra + cdRowStep
	}
	g.height = bottom + 4
	return g
}

// xr is the position of average rank r on the axis.
func (g cdGeom) xr(r float64, k int) vg.Length {
	return g.x0 + vg.Length((r-1)/float64(k-1))*(g.x1-g.x0)
}

type cdPlotter struct {
	t      RankTable
	groups [][]int
}

func (d *cdPlotter) Plot(c draw.Canvas, _ *plot.Plot) {
	t := d.t
	k := len(t.Models)
	g := cdLayout(t, d.groups, c.Size().X)
	left, top := c.Min.X, c.Max.Y
	xr := func(r float64) vg.Length { return left + g.xr(r, k) }
	x0, x1 := left+g.x0, left+g.x1
	axisY := top - g.axisY
	thin := draw.LineStyle{Color: color.Black, Width: vg.Points(0.8)}
	c.StrokeLine2(thin, x0, axisY, x1, axisY)
	for r := 1; r <= k; r++ {
		x := xr(float64(r))
		c.StrokeLine2(thin, x, axisY, x, axisY+vg.Points(4))
		if (r-1)%g.step == 0 {
			putText(c, g.tick, vg.Point{X: x, Y: axisY + vg.Points(6)}, 0.5, 0, fmt.Sprint(r))
		}
		if r < k {
			xm := xr(float64(r) + 0.5)
			c.StrokeLine2(thin, xm, axisY, xm, axisY+vg.Points(2))
		}
	}
	// Critical difference bar, from rank 1.
	if g.place != cdNone {
		cdY := top - g.barY
		xe := xr(math.Min(1+t.CD, float64(k)))
		bar := draw.LineStyle{Color: color.Black, Width: vg.Points(1.2)}
		c.StrokeLine2(bar, x0, cdY, xe, cdY)
		c.StrokeLine2(thin, x0, cdY-vg.Points(3), x0, cdY+vg.Points(3))
		c.StrokeLine2(thin, xe, cdY-vg.Points(3), xe, cdY+vg.Points(3))
		switch g.place {
		case cdRight:
			putText(c, g.tick, vg.Point{X: xe + vg.Points(4), Y: cdY}, 0, 0.5, g.cdText)
		case cdLeft:
			putText(c, g.tick, vg.Point{X: x0 - vg.Points(4), Y: cdY}, 1, 0.5, g.cdText)
		case cdAbove:
			mid := clamp((x0+xe)/2, left+g.tick.Width(g.cdText)/2, c.Max.X-g.tick.Width(g.cdText)/2)
			putText(c, g.tick, vg.Point{X: mid, Y: cdY + vg.Points(4)}, 0.5, 0, g.cdText)
		}
	}
	// Groups of models not significantly different.
	gsty := draw.LineStyle{Color: color.Black, Width: vg.Points(2.6)}
	for gi, grp := range d.groups {
		y := axisY - vg.Points(cdGroupGap+cdGroupStep*float64(gi))
		lo, hi := t.AvgRanks[grp[0]], t.AvgRanks[grp[len(grp)-1]]
		c.StrokeLine2(gsty, xr(lo)-vg.Points(3), y, xr(hi)+vg.Points(3), y)
	}
	// Models: better half to the left, worse half to the right.
	order := rankOrder(t.AvgRanks)
	nLeft := (k + 1) / 2
	ls := draw.LineStyle{Color: color.NRGBA{0x33, 0x33, 0x33, 0xFF}, Width: vg.Points(0.7)}
	pitch := linePitch(g.lab)
	for i, j := range order {
		x := xr(t.AvgRanks[j])
		y := top - g.rowY[j]
		xEnd, xText, ax := x0-vg.Points(6), x0-vg.Points(cdTextGap), 1.0
		if i >= nLeft {
			xEnd, xText, ax = x1+vg.Points(6), x1+vg.Points(cdTextGap), 0
		}
		c.StrokeLines(ls, []vg.Point{{X: x, Y: axisY}, {X: x, Y: y}, {X: xEnd, Y: y}})
		for li, line := range g.lines[j] {
			putText(c, g.lab, vg.Point{X: xText, Y: y - vg.Length(li)*pitch}, ax, 0.5, line)
		}
	}
}

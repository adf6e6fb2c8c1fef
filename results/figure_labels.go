package results

import (
	"image/color"
	"math"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Placement of point labels (the repel step of the scatter figures).
//
// Every label is a box of its text's measured size. Candidate positions
// lie around its point: the 8 compass directions, in the order E, NE,
// SE, W, NW, SW, N, S (the box's nearest edge or corner at the given
// distance from the point), on rings at distances r0, r0 + step, ...,
// r0 + (labelRings−1)·step, where r0 is the glyph radius plus 1.5 pt and
// step is 0.9 of the label height. Labels are placed one at a time,
// greedily, the most crowded point first (ascending distance to its
// nearest neighbour, ties by input order). The cost of a candidate is
// the area it overlaps the labels already placed, the glyphs of all
// points and the other obstacles (a legend), each box grown by
// labelPad, plus 10 times the area it sticks out of the bounds (the data
// area); the first candidate of least cost wins, so a label stays on the
// innermost ring and earliest direction that is free. A label placed
// beyond the first ring gets a thin leader line to its point. The result
// depends only on the input.

// labelRings is the number of rings of candidate positions.
const labelRings = 10

// labelPad is the clearance kept around labels, glyphs and obstacles.
const labelPad = vg.Length(1)

// labelItem is a label to be placed: its point, the radius of the
// point's glyph and the size of its text box.
type labelItem struct {
	at     vg.Point
	radius vg.Length
	w, h   vg.Length
}

// labelSpot is where a label went: its box and the ring (0 = nearest).
type labelSpot struct {
	box  vg.Rectangle
	ring int
}

// compass lists the directions of candidate positions, in order of
// preference.
var compass = [8][2]float64{{1, 0}, {1, 1}, {1, -1}, {-1, 0}, {-1, 1}, {-1, -1}, {0, 1}, {0, -1}}

// placeLabels places the labels of items within bounds, avoiding the
// glyphs of all items and the obstacles (see the notes above).
func placeLabels(items []labelItem, obstacles []vg.Rectangle, bounds vg.Rectangle) []labelSpot {
	n := len(items)
	glyphs := make([]vg.Rectangle, n)
	for i, it := range items {
		glyphs[i] = grow(vg.Rectangle{Min: it.at, Max: it.at}, it.radius)
	}
	// Most crowded first.
	nearest := make([]float64, n)
	for i := range items {
		nearest[i] = math.Inf(1)
		for j := range items {
			if i != j {
				d := items[i].at.Sub(items[j].at)
				nearest[i] = math.Min(nearest[i], math.Hypot(float64(d.X), float64(d.Y)))
			}
		}
	}
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return nearest[order[a]] < nearest[order[b]] })

	spots := make([]labelSpot, n)
	var placed []vg.Rectangle
	for _, i := range order {
		it := items[i]
		r0 := it.radius + 1.5
		step := 0.9 * it.h
		best, bestCost := labelSpot{}, math.Inf(1)
		for ring := range labelRings {
			r := r0 + vg.Length(ring)*step
			for _, d := range compass {
				box := candidate(it, d, r)
				cost := outside(box, bounds) * 10
				g := grow(box, labelPad)
				for _, p := range placed {
					cost += area(g, p)
				}
				for j, gl := range glyphs {
					if j != i { // the candidates keep clear of their own glyph
						cost += area(g, grow(gl, labelPad))
					}
				}
				for _, o := range obstacles {
					cost += area(g, grow(o, labelPad))
				}
				if cost < bestCost {
					best, bestCost = labelSpot{box: box, ring: ring}, cost
				}
			}
			if bestCost == 0 {
				break
			}
		}
		spots[i] = best
		placed = append(placed, best.box)
	}
	return spots
}

// candidate is the box of item it in direction d at distance r.
func candidate(it labelItem, d [2]float64, r vg.Length) vg.Rectangle {
	u := vg.Length(1)
	if d[0] != 0 && d[1] != 0 {
		u = vg.Length(math.Sqrt2 / 2)
	}
	var x0, y0 vg.Length
	switch d[0] {
	case 1:
		x0 = it.at.X + r*u
	case -1:
		x0 = it.at.X - r*u - it.w
	default:
		x0 = it.at.X - it.w/2
	}
	switch d[1] {
	case 1:
		y0 = it.at.Y + r*u
	case -1:
		y0 = it.at.Y - r*u - it.h
	default:
		y0 = it.at.Y - it.h/2
	}
	return vg.Rectangle{Min: vg.Point{X: x0, Y: y0}, Max: vg.Point{X: x0 + it.w, Y: y0 + it.h}}
}

// grow widens r by d on every side.
func grow(r vg.Rectangle, d vg.Length) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: r.Min.X - d, Y: r.Min.Y - d}, Max: vg.Point{X: r.Max.X + d, Y: r.Max.Y + d}}
}

// area is the area of the intersection of two rectangles, in pt².
func area(a, b vg.Rectangle) float64 {
	w := min(a.Max.X, b.Max.X) - max(a.Min.X, b.Min.X)
	h := min(a.Max.Y, b.Max.Y) - max(a.Min.Y, b.Min.Y)
	if w <= 0 || h <= 0 {
		return 0
	}
	return float64(w * h)
}

// outside is the area of r outside bounds.
func outside(r, bounds vg.Rectangle) float64 {
	return float64(r.Size().X*r.Size().Y) - area(r, bounds)
}

// labelPoint is one labelled point of a pointLabels layer.
type labelPoint struct {
	X, Y   float64 // data coordinates
	Text   string
	Color  color.Color
	Radius vg.Length // of the point's glyph
}

// legendItem is an entry of the legend a pointLabels layer draws.
type legendItem struct {
	Text  string
	Thumb plot.Thumbnailer
}

// pointLabels is a plotter that labels points (placeLabels) and draws a
// legend in the corner of the data area that covers the fewest points:
// top right, bottom left, bottom right, top left, in that order of
// preference; on a white box, which the labels avoid.
type pointLabels struct {
	points []labelPoint
	legend []legendItem
	style  text.Style // of the labels; Color is taken from each point
	legSty text.Style // of the legend
}

func (l *pointLabels) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	items := make([]labelItem, len(l.points))
	h := lineHeight(l.style)
	for i, pt := range l.points {
		items[i] = labelItem{at: vg.Point{X: tx(pt.X), Y: ty(pt.Y)}, radius: pt.Radius, w: l.style.Width(pt.Text), h: h}
	}
	var obstacles []vg.Rectangle
	if len(l.legend) > 0 {
		obstacles = append(obstacles, l.drawLegend(c, items))
	}
	spots := placeLabels(items, obstacles, c.Rectangle)
	for i, s := range spots {
		if s.ring == 0 {
			continue
		}
		// Leader from the glyph's edge to the nearest point of the box.
		at := items[i].at
		to := vg.Point{X: clamp(at.X, s.box.Min.X, s.box.Max.X), Y: clamp(at.Y, s.box.Min.Y, s.box.Max.Y)}
		d := to.Sub(at)
		n := vg.Length(math.Hypot(float64(d.X), float64(d.Y)))
		if n <= items[i].radius+1 {
			continue
		}
		from := at.Add(d.Scale(items[i].radius / n))
		ls := draw.LineStyle{Color: l.points[i].Color, Width: vg.Points(0.5)}
		c.StrokeLine2(ls, from.X, from.Y, to.X, to.Y)
	}
	for i, s := range spots {
		sty := l.style
		sty.Color = l.points[i].Color
		putText(c, sty, s.box.Min, 0, 0, l.points[i].Text)
	}
}

// drawLegend draws the legend in the emptiest corner and returns its box.
func (l *pointLabels) drawLegend(c draw.Canvas, items []labelItem) vg.Rectangle {
	leg := plot.NewLegend()
	leg.TextStyle = l.legSty
	for _, e := range l.legend {
		leg.Add(e.Text, e.Thumb)
	}
	spaceLegend(&leg)
	size := leg.Rectangle(c).Size()
	const inset, pad = vg.Length(4), vg.Length(4)
	w, h := size.X+2*pad, size.Y+2*pad+lineHeight(l.legSty)-l.legSty.Rectangle("x").Max.Y
	corners := []vg.Point{
		{X: c.Max.X - inset - w, Y: c.Max.Y - inset - h}, // top right
		{X: c.Min.X + inset, Y: c.Min.Y + inset},         // bottom left
		{X: c.Max.X - inset - w, Y: c.Min.Y + inset},     // bottom right
		{X: c.Min.X + inset, Y: c.Max.Y - inset - h},     // top left
	}
	var box vg.Rectangle
	best := math.Inf(1)
	for _, at := range corners {
		r := vg.Rectangle{Min: at, Max: vg.Point{X: at.X + w, Y: at.Y + h}}
		var cost float64
		for _, it := range items {
			cost += area(r, grow(vg.Rectangle{Min: it.at, Max: it.at}, it.radius+it.h))
		}
		if cost < best {
			box, best = r, cost
		}
	}
	c.SetColor(color.White)
	c.Fill(box.Path())
	c.StrokeLines(draw.LineStyle{Color: color.NRGBA{0x99, 0x99, 0x99, 0xFF}, Width: vg.Points(0.5)},
		[]vg.Point{box.Min, {X: box.Max.X, Y: box.Min.Y}, box.Max, {X: box.Min.X, Y: box.Max.Y}, box.Min})
	leg.Top, leg.Left = true, true
	leg.Draw(draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
		Min: vg.Point{X: box.Min.X + pad, Y: box.Min.Y + pad},
		Max: vg.Point{X: box.Max.X - pad, Y: box.Max.Y - pad},
	}})
	return box
}

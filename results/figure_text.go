package results

import (
	"math"
	"strings"
	"unicode/utf8"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Text geometry of the figures. A line of text occupies the box from its
// baseline start to the font's advance width, Ascent above the baseline
// and Descent below it (the font's extents, as gonum/plot measures text);
// a rotated line occupies that box rotated about its anchor. The layout
// code places text by these boxes, and the layout test checks them on
// what is actually drawn.

// quad is the box of one line of text: its corners, counter-clockwise
// from the lower left of the unrotated box.
type quad [4]vg.Point

// bounds is the axis-aligned rectangle around q.
func (q quad) bounds() vg.Rectangle {
	r := vg.Rectangle{Min: q[0], Max: q[0]}
	for _, p := range q[1:] {
		r.Min.X, r.Min.Y = min(r.Min.X, p.X), min(r.Min.Y, p.Y)
		r.Max.X, r.Max.Y = max(r.Max.X, p.X), max(r.Max.Y, p.Y)
	}
	return r
}

// rectQuad is the quad of an axis-aligned rectangle.
func rectQuad(r vg.Rectangle) quad {
	return quad{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
}

// overlapDepth is how far two convex quads interpenetrate: the smallest,
// over the edge normals of both (the separating-axis theorem), of the
// overlap of their projections. It is positive when they intersect, zero
// when they touch and negative (minus the gap along the best separating
// axis) when they are apart.
func overlapDepth(a, b quad) vg.Length {
	depth := vg.Length(math.Inf(1))
	for _, q := range []quad{a, b} {
		for i := range q {
			e := q[(i+1)%4].Sub(q[i])
			n := math.Hypot(float64(e.X), float64(e.Y))
			if n == 0 {
				continue
			}
			nx, ny := -float64(e.Y)/n, float64(e.X)/n
			alo, ahi := project(a, nx, ny)
			blo, bhi := project(b, nx, ny)
			depth = min(depth, vg.Length(math.Min(ahi, bhi)-math.Max(alo, blo)))
		}
	}
	return depth
}

func project(q quad, nx, ny float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, p := range q {
		v := float64(p.X)*nx + float64(p.Y)*ny
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return lo, hi
}

// faceOf is the font face a style draws with.
func faceOf(sty text.Style) font.Face {
	return sty.Handler.Cache().Lookup(sty.Font, sty.Font.Size)
}

// lineHeight is the height of the box of one line: ascent + descent.
func lineHeight(sty text.Style) vg.Length {
	face := faceOf(sty)
	e := face.Extents()
	return e.Ascent + e.Descent
}

// linePitch is the distance between the baselines of two lines of a
// block: the font's line height (ascent, descent and line gap).
func linePitch(sty text.Style) vg.Length {
	face := faceOf(sty)
	return face.Extents().Height
}

// plainQuad is the box of a single line that gonum/plot's plain text
// handler (text.Plain.Draw) draws for FillText(sty, pt, line): it repeats
// that method's arithmetic (rotation about the origin, alignment by the
// style's height, baseline at Size − Ascent above the aligned bottom).
// It is used to test gonum's tick labels for collisions before drawing.
func plainQuad(sty text.Style, pt vg.Point, line string) quad {
	face := faceOf(sty)
	ext := face.Extents()
	w := face.Width(line)
	sin64, cos64 := math.Sincos(sty.Rotation)
	sin, cos := vg.Length(sin64), vg.Length(cos64)
	x, y := pt.Y*sin+pt.X*cos, pt.Y*cos-pt.X*sin
	y += sty.Height(line)*vg.Length(sty.YAlign) - ext.Ascent + sty.Font.Size
	x += vg.Length(sty.XAlign) * w
	local := quad{{X: x, Y: y - ext.Descent}, {X: x + w, Y: y - ext.Descent}, {X: x + w, Y: y + ext.Ascent}, {X: x, Y: y + ext.Ascent}}
	var q quad
	for i, p := range local {
		q[i] = vg.Point{X: p.X*cos - p.Y*sin, Y: p.X*sin + p.Y*cos}
	}
	return q
}

// putQuad is the box of a line drawn by putText with the same arguments.
func putQuad(sty text.Style, at vg.Point, ax, ay float64, line string) quad {
	face := faceOf(sty)
	ext := face.Extents()
	w, h := face.Width(line), ext.Ascent+ext.Descent
	x0, y0 := -vg.Length(ax)*w, -vg.Length(ay)*h
	local := quad{{X: x0, Y: y0}, {X: x0 + w, Y: y0}, {X: x0 + w, Y: y0 + h}, {X: x0, Y: y0 + h}}
	sin64, cos64 := math.Sincos(sty.Rotation)
	sin, cos := vg.Length(sin64), vg.Length(cos64)
	var q quad
	for i, p := range local {
		q[i] = vg.Point{X: at.X + p.X*cos - p.Y*sin, Y: at.Y + p.X*sin + p.Y*cos}
	}
	return q
}

// putText draws one line of text so that the point (ax, ay) of its box,
// in fractions of the box's width and height from its lower left corner,
// lies at at; the box is rotated by sty.Rotation about at. The alignment
// fields of sty are ignored. Unlike FillText it places the box exactly
// (putQuad gives it), whatever the font.
func putText(c draw.Canvas, sty text.Style, at vg.Point, ax, ay float64, line string) {
	if line == "" || sty.Font.Size <= 0 {
		return
	}
	face := faceOf(sty)
	ext := face.Extents()
	w, h := face.Width(line), ext.Ascent+ext.Descent
	c.SetColor(sty.Color)
	c.Push()
	c.Translate(at)
	if sty.Rotation != 0 {
		c.Rotate(sty.Rotation)
	}
	c.FillString(face, vg.Point{X: -vg.Length(ax) * w, Y: -vg.Length(ay)*h + ext.Descent}, line)
	c.Pop()
}

// wrapText breaks s into lines no wider than width (measured by w):
// at spaces first; a word wider than width is broken after one of
// "-_+/", else after one of ".,;:", else between characters. Lines keep their
// breaking punctuation and lose the spaces they were broken at.
func wrapText(s string, width vg.Length, w func(string) vg.Length) []string {
	var lines []string
	cur := ""
	for _, word := range strings.Fields(s) {
		pieces := breakWord(word, width, w)
		if len(pieces) > 1 {
			// A word too wide for a line: its pieces fill whole lines.
			if cur != "" {
				lines = append(lines, cur)
			}
			lines = append(lines, pieces[:len(pieces)-1]...)
			cur = pieces[len(pieces)-1]
			continue
		}
		switch {
		case cur == "":
			cur = word
		case w(cur+" "+word) <= width:
			cur += " " + word
		default:
			lines = append(lines, cur)
			cur = word
		}
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	if len(lines) == 0 {
		return []string{""}
	}
	return lines
}

// breakWord splits a word that is wider than width into pieces that fit,
// preferring to break after punctuation.
func breakWord(word string, width vg.Length, w func(string) vg.Length) []string {
	var out []string
	for w(word) > width {
		cut := -1
		// The longest prefix that fits ending in a separator, else in a
		// punctuation mark (not to split 0.3 when a '-' will do).
		for _, breaks := range []string{"-_+/", ".,;:"} {
			for i, r := range word {
				if i == 0 || !strings.ContainsRune(breaks, r) {
					continue
				}
				end := i + utf8.RuneLen(r)
				if end < len(word) && w(word[:end]) <= width {
					cut = end
				}
			}
			if cut >= 0 {
				break
			}
		}
		if cut < 0 {
			// The longest prefix that fits, at least one character.
			for i := range word {
				if i > 0 && w(word[:i]) <= width {
					cut = i
				}
			}
			if cut < 0 {
				_, n := utf8.DecodeRuneInString(word)
				cut = n
			}
		}
		out = append(out, word[:cut])
		word = word[cut:]
	}
	return append(out, word)
}

// textBlock is text fitted to a width: the style it is drawn in and its
// lines, drawn one below the other linePitch apart.
type textBlock struct {
	sty   text.Style
	lines []string
}

// height is the height of the block: the box of the first line plus one
// pitch for every further line.
func (b textBlock) height() vg.Length {
	if len(b.lines) == 0 {
		return 0
	}
	return lineHeight(b.sty) + vg.Length(len(b.lines)-1)*linePitch(b.sty)
}

// width is the width of the block's widest line.
func (b textBlock) width() vg.Length {
	var m vg.Length
	for _, l := range b.lines {
		m = max(m, b.sty.Width(l))
	}
	return m
}

// fitText fits s to width: in its own size if it fits, else in the
// largest size down to shrink × that size (in steps of 0.25 pt) in which
// it fits on one line, else wrapped (wrapText) in its own size. Explicit
// newlines in s always break. An empty s gives an empty block.
func fitText(sty text.Style, s string, width vg.Length, shrink float64) textBlock {
	if strings.TrimSpace(s) == "" {
		return textBlock{sty: sty}
	}
	paras := strings.Split(s, "\n")
	widest := func(st text.Style) vg.Length {
		var m vg.Length
		for _, p := range paras {
			m = max(m, st.Width(p))
		}
		return m
	}
	if widest(sty) <= width {
		return textBlock{sty: sty, lines: paras}
	}
	lo := vg.Length(shrink) * sty.Font.Size
	for size := sty.Font.Size - vg.Points(0.25); size >= lo; size -= vg.Points(0.25) {
		st := sty
		st.Font.Size = size
		if widest(st) <= width {
			return textBlock{sty: st, lines: paras}
		}
	}
	var lines []string
	for _, p := range paras {
		lines = append(lines, wrapText(p, width, sty.Width)...)
	}
	return textBlock{sty: sty, lines: lines}
}

package results

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

func square(x, y, side vg.Length) quad {
	return rectQuad(vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + side, Y: y + side}})
}

// rotated is the square of the given side centred on c, turned by theta.
func rotated(c vg.Point, side vg.Length, theta float64) quad {
	s, k := math.Sincos(theta)
	var q quad
	for i, p := range []vg.Point{{X: -side / 2, Y: -side / 2}, {X: side / 2, Y: -side / 2}, {X: side / 2, Y: side / 2}, {X: -side / 2, Y: side / 2}} {
		q[i] = vg.Point{X: c.X + p.X*vg.Length(k) - p.Y*vg.Length(s), Y: c.Y + p.X*vg.Length(s) + p.Y*vg.Length(k)}
	}
	return q
}

func TestOverlapDepth(t *testing.T) {
	for _, c := range []struct {
		name string
		a, b quad
		want float64 // derived by hand
	}{
		{"half overlap", square(0, 0, 1), square(0.5, 0, 1), 0.5},
		{"touching", square(0, 0, 1), square(1, 0, 1), 0},
		{"apart", square(0, 0, 1), square(3, 0, 1), -2},
		{"diagonal apart", square(0, 0, 1), square(2, 2, 1), -1},
		{"inside", square(0, 0, 4), square(1, 1, 1), 1},
		// A unit square turned 45° about (2.2, 0.5): its left corner at
		// x = 2.2 − √2/2 = 1.4929, 0.4929 from a unit square at x ≤ 1.
		{"turned apart", square(0, 0, 1), rotated(vg.Point{X: 2.2, Y: 0.5}, 1, math.Pi/4), -(2.2 - math.Sqrt2/2 - 1)},
		// Centred at x = 1.5: its corner reaches 1.5 − √2/2 = 0.7929,
		// 0.2071 into the square.
		{"turned overlapping", square(0, 0, 1), rotated(vg.Point{X: 1.5, Y: 0.5}, 1, math.Pi/4), 1 - (1.5 - math.Sqrt2/2)},
	} {
		for _, ab := range [][2]quad{{c.a, c.b}, {c.b, c.a}} {
			// Tolerance: float64 arithmetic on lengths of order 1.
			if got := float64(overlapDepth(ab[0], ab[1])); !scalar.EqualWithinAbsOrRel(got, c.want, 1e-12, 1e-12) {
				t.Errorf("%s: overlapDepth = %v, want %v", c.name, got, c.want)
			}
		}
	}
}

// TestPlainQuadMatchesDrawn checks the copy of text.Plain.Draw's
// arithmetic that the layout uses to test tick labels before drawing
// them against what Plain.Draw actually draws on a recorder, for the
// rotations and alignments the figures use.
func TestPlainQuadMatchesDrawn(t *testing.T) {
	base := text.Style{Font: font.From(plot.DefaultFont, 10), Handler: plot.DefaultTextHandler}
	for _, rot := range []float64{0, math.Pi / 6, math.Pi / 4, math.Pi / 3, math.Pi / 2} {
		for _, xa := range []text.XAlignment{draw.XLeft, draw.XCenter, draw.XRight} {
			for _, ya := range []text.YAlignment{draw.YBottom, draw.YCenter, draw.YTop} {
				sty := base
				sty.Rotation, sty.XAlign, sty.YAlign = rot, xa, ya
				rec := newRecorder(400, 400)
				at := vg.Point{X: 173.5, Y: 211.25}
				c := draw.New(rec)
				c.FillText(sty, at, "breast-cancer")
				want := plainQuad(sty, at, "breast-cancer")
				got := rec.texts[0].q
				for i := range got {
					d := got[i].Sub(want[i])
					// Tolerance: float64 rounding of a few hundred points.
					if math.Hypot(float64(d.X), float64(d.Y)) > 1e-9 {
						t.Errorf("rotation %.3f, align %v/%v: corner %d drawn at %v, plainQuad %v", rot, xa, ya, i, got[i], want[i])
					}
				}
			}
		}
	}
}

// TestPutText checks that putText puts the anchor of the box where it is
// asked to, at any rotation, and that putQuad is the drawn box.
func TestPutText(t *testing.T) {
	sty := text.Style{Font: font.From(plot.DefaultFont, 9), Handler: plot.DefaultTextHandler}
	for _, rot := range []float64{0, math.Pi / 2, 1} {
		sty.Rotation = rot
		for _, a := range [][2]float64{{0, 0}, {0.5, 1}, {1, 0.5}} {
			rec := newRecorder(300, 300)
			at := vg.Point{X: 120, Y: 140}
			putText(draw.New(rec), sty, at, a[0], a[1], "label 7")
			got, want := rec.texts[0].q, putQuad(sty, at, a[0], a[1], "label 7")
			for i := range got {
				if d := got[i].Sub(want[i]); math.Hypot(float64(d.X), float64(d.Y)) > 1e-9 {
					t.Errorf("rotation %v anchor %v: corner %d at %v, putQuad %v", rot, a, i, got[i], want[i])
				}
			}
			// The anchor: bilinear in the corners (0: lower left, 1: lower
			// right, 3: upper left), derived by hand.
			q := got
			ax, ay := vg.Length(a[0]), vg.Length(a[1])
			p := q[0].Add(q[1].Sub(q[0]).Scale(ax)).Add(q[3].Sub(q[0]).Scale(ay))
			if d := p.Sub(at); math.Hypot(float64(d.X), float64(d.Y)) > 1e-9 {
				t.Errorf("rotation %v anchor %v: anchor point at %v, want %v", rot, a, p, at)
			}
		}
	}
}

func TestWrapText(t *testing.T) {
	sty := text.Style{Font: font.From(plot.DefaultFont, 9), Handler: plot.DefaultTextHandler}
	for _, c := range []struct {
		s     string
		width vg.Length
		want  []string // when fixed by the rules
	}{
		{"short", 200, []string{"short"}},
		{"Average ranks, pipeline std+l2 (5 datasets)", 100, nil},
		// A '-' is preferred to the '.' inside the number.
		{"interference-noisy-gdep0.3-shots512-balanced", 80, []string{"interference-noisy-", "gdep0.3-shots512-", "balanced"}},
		{"abcdefghijklmnopqrstuvwxyz", 30, nil}, // no break character: between letters
		{"", 50, []string{""}},
	} {
		got := wrapText(c.s, c.width, sty.Width)
		if c.want != nil && strings.Join(got, "|") != strings.Join(c.want, "|") {
			t.Errorf("wrapText(%q, %v) = %q, want %q", c.s, c.width, got, c.want)
		}
		for _, l := range got {
			if sty.Width(l) > c.width {
				t.Errorf("wrapText(%q, %v): line %q is %v wide", c.s, c.width, l, sty.Width(l))
			}
		}
		// Nothing is lost: the lines joined give the words back.
		if j := strings.ReplaceAll(strings.Join(got, " "), " ", ""); j != strings.ReplaceAll(c.s, " ", "") {
			t.Errorf("wrapText(%q): lines %q lose text", c.s, got)
		}
	}
}

func TestFitText(t *testing.T) {
	sty := text.Style{Font: font.From(plot.DefaultFont, 11), Handler: plot.DefaultTextHandler}
	s := "Accuracy against shot budget, pipeline std+l2"
	w := sty.Width(s)
	if b := fitText(sty, s, w+1, 0.85); len(b.lines) != 1 || b.sty.Font.Size != 11 {
		t.Errorf("fits: %v lines at %v pt, want 1 at 11", len(b.lines), b.sty.Font.Size)
	}
	// 10 % too wide: shrinking to 10 pt (width scales with the size) fits.
	if b := fitText(sty, s, w*0.91, 0.85); len(b.lines) != 1 || b.sty.Font.Size > 10.01 || b.width() > w*0.91 {
		t.Errorf("10%% too wide: %v lines at %v pt, %v wide", len(b.lines), b.sty.Font.Size, b.width())
	}
	// Half the width: wrapped in its own size.
	if b := fitText(sty, s, w/2, 0.85); len(b.lines) < 2 || b.sty.Font.Size != 11 || b.width() > w/2 {
		t.Errorf("half width: %q at %v pt", b.lines, b.sty.Font.Size)
	} else if h := b.height(); h != lineHeight(sty)+vg.Length(len(b.lines)-1)*linePitch(sty) {
		t.Errorf("height %v", h)
	}
	if b := fitText(sty, "two\nlines", 500, 0.85); len(b.lines) != 2 {
		t.Errorf("explicit newline: %q", b.lines)
	}
}

package results

import (
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/plot/vg"
)

var labelBounds = vg.Rectangle{Max: vg.Point{X: 400, Y: 250}}

func item(x, y vg.Length) labelItem {
	return labelItem{at: vg.Point{X: x, Y: y}, radius: 3, w: 40, h: 8}
}

func TestPlaceLabelsFree(t *testing.T) {
	// Alone in the middle: ring 0, east, its left edge r0 = radius + 1.5
	// right of the point, centred on it (the rules of placeLabels).
	s := placeLabels([]labelItem{item(200, 100)}, nil, labelBounds)[0]
	want := vg.Rectangle{Min: vg.Point{X: 204.5, Y: 96}, Max: vg.Point{X: 244.5, Y: 104}}
	if s.ring != 0 || s.box != want {
		t.Errorf("free point: %+v, want ring 0 at %v", s, want)
	}
	// At the right edge the label goes west, inside the bounds.
	s = placeLabels([]labelItem{item(398, 100)}, nil, labelBounds)[0]
	if s.box.Max.X > labelBounds.Max.X || s.box.Max.X > 398 {
		t.Errorf("edge point: label at %v, want it inside and to the west", s.box)
	}
	// An obstacle east of the point sends the label to the next direction.
	obst := []vg.Rectangle{{Min: vg.Point{X: 203, Y: 90}, Max: vg.Point{X: 260, Y: 104}}}
	s = placeLabels([]labelItem{item(200, 100)}, obst, labelBounds)[0]
	if area(grow(s.box, labelPad), grow(obst[0], labelPad)) > 0 {
		t.Errorf("label at %v overlaps the obstacle %v", s.box, obst[0])
	}
}

// TestPlaceLabelsCrowded places the labels of clusters of points and
// requires that no two labels overlap, no label covers a glyph, all stay
// within the bounds, and that the result is the same every time.
func TestPlaceLabelsCrowded(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 9))
	for _, n := range []int{2, 10, 30, 36} {
		var items []labelItem
		for i := range n {
			// Half the points in a 60 × 40 pt cluster, some coincident.
			x, y := 50+350*rng.Float64(), 20+210*rng.Float64()
			if i%2 == 0 {
				x, y = 150+60*rng.Float64(), 100+40*rng.Float64()
			}
			if i%7 == 3 {
				x, y = float64(items[0].at.X), float64(items[0].at.Y)
			}
			it := item(vg.Length(x), vg.Length(y))
			it.w = vg.Length(20 + 40*rng.Float64())
			items = append(items, it)
		}
		spots := placeLabels(items, nil, labelBounds)
		for i, s := range spots {
			if outside(s.box, labelBounds) > 0 {
				t.Errorf("n = %d: label %d at %v leaves the bounds", n, i, s.box)
			}
			for j, u := range spots[i+1:] {
				if area(s.box, u.box) > 0 {
					t.Errorf("n = %d: labels %d and %d overlap: %v, %v", n, i, i+1+j, s.box, u.box)
				}
			}
			for j, it := range items {
				if j != i && area(s.box, grow(vg.Rectangle{Min: it.at, Max: it.at}, it.radius)) > 0 {
					t.Errorf("n = %d: label %d at %v covers the glyph of point %d", n, i, s.box, j)
				}
			}
		}
		if again := placeLabels(items, nil, labelBounds); !slices.Equal(again, spots) {
			t.Errorf("n = %d: a second placement differs", n)
		}
	}
}

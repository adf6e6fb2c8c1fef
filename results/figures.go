package results

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"math"
	"sync"
	"time"

	"codeberg.org/go-pdf/fpdf"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// FigureFormats lists the formats every figure is written in.
var FigureFormats = []string{"svg", "pdf", "png"}

// PNGDPI is the resolution of PNG figures.
const PNGDPI = 150

// Figure is a plot to be written as Name.svg, Name.pdf and Name.png.
type Figure struct {
	Name          string // path relative to the run directory, without extension
	Caption       string // one line, plain text
	Plot          *plot.Plot
	Width, Height vg.Length
	// LegendRight draws the plot's legend in a strip to the right of the
	// plot instead of inside the data area.
	LegendRight bool
}

// draw draws the figure on c. With LegendRight it swaps the plot's legend
// out while drawing the plot, so Render is not safe for concurrent use on
// one figure.
func (f Figure) draw(c draw.Canvas) {
	if !f.LegendRight {
		f.Plot.Draw(c)
		return
	}
	leg := f.Plot.Legend
	empty := plot.NewLegend()
	f.Plot.Legend = empty
	defer func() { f.Plot.Legend = leg }()
	w := leg.Rectangle(c).Size().X + vg.Points(8)
	f.Plot.Draw(draw.Crop(c, 0, -w, 0, 0))
	side := draw.Crop(c, c.Size().X-w, 0, 0, -vg.Points(24))
	leg.Top, leg.Left = true, true
	leg.XOffs, leg.YOffs = 0, 0
	leg.Draw(side)
}

// pdfDefaults makes PDF output reproducible: fpdf otherwise stamps the
// creation and modification times and writes its font and image
// catalogues in map order. The settings are fpdf's package-wide defaults,
// read when a document is created; fringe is their only user.
var pdfDefaults sync.Once

// pdfEpoch is the fixed creation date written into every PDF figure.
var pdfEpoch = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// Render draws the figure in one of FigureFormats. SVG and PNG output is
// byte-identical for identical figures; so is PDF, whose creation date is
// fixed (pdfEpoch) and whose catalogues are sorted.
func (f Figure) Render(format string) ([]byte, error) {
	if f.Plot == nil {
		return nil, errors.New("results: figure " + f.Name + " has no plot")
	}
	var buf bytes.Buffer
	switch format {
	case "svg":
		c := vgsvg.New(f.Width, f.Height)
		f.draw(draw.New(c))
		if _, err := c.WriteTo(&buf); err != nil {
			return nil, fmt.Errorf("results: render %s.svg: %w", f.Name, err)
		}
	case "pdf":
		pdfDefaults.Do(func() {
			fpdf.SetDefaultCreationDate(pdfEpoch)
			fpdf.SetDefaultModificationDate(pdfEpoch)
			fpdf.SetDefaultCatalogSort(true)
		})
		c := vgpdf.New(f.Width, f.Height)
		f.draw(draw.New(c))
		if _, err := c.WriteTo(&buf); err != nil {
			return nil, fmt.Errorf("results: render %s.pdf: %w", f.Name, err)
		}
	case "png":
		c := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(PNGDPI))
		f.draw(draw.New(c))
		if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
			return nil, fmt.Errorf("results: render %s.png: %w", f.Name, err)
		}
	default:
		return nil, fmt.Errorf("results: unknown figure format %q (want svg, pdf or png)", format)
	}
	return buf.Bytes(), nil
}

// palette is the colour-blind-safe palette of Okabe & Ito ("Color
// Universal Design", 2008), black moved last; lines cycle through it.
var palette = []color.NRGBA{
	{0xE6, 0x9F, 0x00, 0xFF}, // orange
	{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
	{0x00, 0x9E, 0x73, 0xFF}, // bluish green
	{0xD5, 0x5E, 0x00, 0xFF}, // vermillion
	{0x00, 0x72, 0xB2, 0xFF}, // blue
	{0xCC, 0x79, 0xA7, 0xFF}, // reddish purple
	{0xF0, 0xE4, 0x42, 0xFF}, // yellow
	{0x00, 0x00, 0x00, 0xFF}, // black
}

func lineColor(i int) color.NRGBA { return palette[i%len(palette)] }

func translucent(c color.NRGBA, a uint8) color.NRGBA {
	// Non-premultiplied: keep the hue, lower the opacity.
	c.A = a
	return c
}

var (
	dashed = []vg.Length{vg.Points(5), vg.Points(3)}
	dotted = []vg.Length{vg.Points(1.2), vg.Points(2.4)}
)

func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.Title.TextStyle.Font.Size = vg.Points(11)
	return p
}

// SweepLine is one line of a sweep figure: a metric against a parameter
// (shot budget, noise strength), with its interval band and two
// horizontal reference levels.
type SweepLine struct {
	Label           string
	X, Mean, Lo, Hi []float64 // equal lengths; X ascending; Lo/Hi NaN: no band at that point
	Exact, Baseline float64   // reference levels; NaN for none
}

// Sweep is a figure of one metric against a parameter, one line per
// dataset.
type Sweep struct {
	Title, XLabel, YLabel string
	LogX                  bool
	Lines                 []SweepLine
}

// SweepPlot draws the sweep: each line with markers and a translucent
// band between Lo and Hi, its exact-mode level dashed and its best
// baseline dotted, in the line's colour. It returns an error for lines of
// unequal lengths, no points, or non-positive X on a log axis.
func SweepPlot(s Sweep) (*plot.Plot, error) {
	p := newPlot(s.Title, s.XLabel, s.YLabel)
	if s.LogX {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = plot.LogTicks{Prec: -1}
	}
	xmin, xmax := math.Inf(1), math.Inf(-1)
	for _, l := range s.Lines {
		n := len(l.X)
		if n == 0 || len(l.Mean) != n || len(l.Lo) != n || len(l.Hi) != n {
			return nil, fmt.Errorf("results: sweep line %q: want equal, non-empty X, Mean, Lo, Hi", l.Label)
		}
		for _, x := range l.X {
			if s.LogX && !(x > 0) {
				return nil, fmt.Errorf("results: sweep line %q: x = %v on a log axis", l.Label, x)
			}
			xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
		}
	}
	if len(s.Lines) == 0 {
		return nil, errors.New("results: sweep has no lines")
	}
	if xmin == xmax {
		// One point: give the reference lines some length.
		if s.LogX {
			xmin, xmax = xmin/2, xmax*2
		} else {
			xmin, xmax = xmin-0.5, xmax+0.5
		}
	}
	for i, l := range s.Lines {
		col := lineColor(i)
		var band plotter.XYs
		for j := range l.X {
			if !math.IsNaN(l.Lo[j]) && !math.IsNaN(l.Hi[j]) {
				band = append(band, plotter.XY{X: l.X[j], Y: l.Lo[j]})
			}
		}
		for j := len(l.X) - 1; j >= 0; j-- {
			if !math.IsNaN(l.Lo[j]) && !math.IsNaN(l.Hi[j]) {
				band = append(band, plotter.XY{X: l.X[j], Y: l.Hi[j]})
			}
		}
		if len(band) >= 4 {
			poly, err := plotter.NewPolygon(band)
			if err != nil {
				return nil, fmt.Errorf("results: sweep band %q: %w", l.Label, err)
			}
			poly.Color = translucent(col, 0x40)
			poly.LineStyle.Width = 0
			p.Add(poly)
		} else if len(band) == 2 {
			// A single point: an error bar.
			bar, err := plotter.NewLine(band)
			if err != nil {
				return nil, err
			}
			bar.LineStyle.Color = translucent(col, 0x90)
			bar.LineStyle.Width = vg.Points(3)
			p.Add(bar)
		}
		pts := make(plotter.XYs, len(l.X))
		for j := range l.X {
			pts[j] = plotter.XY{X: l.X[j], Y: l.Mean[j]}
		}
		line, sc, err := plotter.NewLinePoints(pts)
		if err != nil {
			return nil, fmt.Errorf("results: sweep line %q: %w", l.Label, err)
		}
		line.LineStyle.Color = col
		line.LineStyle.Width = vg.Points(1.5)
		sc.GlyphStyle.Color = col
		sc.GlyphStyle.Radius = vg.Points(2.5)
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		p.Add(line, sc)
		p.Legend.Add(l.Label, line, sc)
		for _, ref := range []struct {
			y    float64
			dash []vg.Length
		}{{l.Exact, dashed}, {l.Baseline, dotted}} {
			if math.IsNaN(ref.y) {
				continue
			}
			h, err := plotter.NewLine(plotter.XYs{{X: xmin, Y: ref.y}, {X: xmax, Y: ref.y}})
			if err != nil {
				return nil, err
			}
			h.LineStyle.Color = col
			h.LineStyle.Width = vg.Points(1)
			h.LineStyle.Dashes = ref.dash
			p.Add(h)
		}
	}
	// Legend entries explaining the reference lines, drawn in grey.
	grey := color.NRGBA{0x55, 0x55, 0x55, 0xFF}
	for _, ref := range []struct {
		label string
		dash  []vg.Length
		has   func(SweepLine) bool
	}{
		{"exact mode (dashed)", dashed, func(l SweepLine) bool { return !math.IsNaN(l.Exact) }},
		{"best baseline (dotted)", dotted, func(l SweepLine) bool { return !math.IsNaN(l.Baseline) }},
	} {
		used := false
		for _, l := range s.Lines {
			used = used || ref.has(l)
		}
		if !used {
			continue
		}
		th := &plotter.Line{XYs: plotter.XYs{{X: 0, Y: 0}}}
		th.LineStyle = draw.LineStyle{Color: grey, Width: vg.Points(1), Dashes: ref.dash}
		p.Legend.Add(ref.label, th)
	}
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Add(plotter.NewGrid())
	return p, nil
}

// KernelCurve is an RBF kernel exp(−γ d²) drawn beside the interference
// kernel.
type KernelCurve struct {
	Label string
	Gamma float64
}

// KernelProfile draws the interference kernel κ = 1 − d²/4 against the
// Euclidean distance d ∈ [0, 2] of two unit vectors (the kernel of the
// distance-based classifier on amplitude-encoded data), and an RBF kernel
// exp(−γ d²) for each curve. It returns an error for a γ that is not
// positive and finite.
func KernelProfile(curves []KernelCurve) (*plot.Plot, error) {
	p := newPlot("Kernel profile on unit vectors", "Euclidean distance d of the normalised vectors", "kernel value")
	kappa := plotter.NewFunction(func(d float64) float64 { return 1 - d*d/4 })
	kappa.XMin, kappa.XMax, kappa.Samples = 0, 2, 201
	kappa.LineStyle.Color = color.Black
	kappa.LineStyle.Width = vg.Points(2)
	p.Add(kappa)
	p.Legend.Add("interference κ = 1 − d²/4", kappa)
	for i, c := range curves {
		if !(c.Gamma > 0) || math.IsInf(c.Gamma, 0) {
			return nil, fmt.Errorf("results: kernel curve %q: gamma = %v, want a positive finite value", c.Label, c.Gamma)
		}
		g := c.Gamma
		f := plotter.NewFunction(func(d float64) float64 { return math.Exp(-g * d * d) })
		f.XMin, f.XMax, f.Samples = 0, 2, 201
		f.LineStyle.Color = lineColor(i)
		f.LineStyle.Width = vg.Points(1.3)
		if i%2 == 1 {
			f.LineStyle.Dashes = dashed
		}
		p.Add(f)
		p.Legend.Add(c.Label, f)
	}
	p.X.Min, p.X.Max = 0, 2
	p.Y.Min, p.Y.Max = 0, 1.02
	// Bottom left is empty: every kernel is near 1 at small distances.
	p.Legend.Top, p.Legend.Left = false, true
	p.Legend.XOffs, p.Legend.YOffs = vg.Points(6), vg.Points(6)
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Add(plotter.NewGrid())
	return p, nil
}

// BoxSeries is one series of a grouped box plot: Values[g] are the
// observations in group g (may be empty).
type BoxSeries struct {
	Label  string
	Values [][]float64
}

// Boxes is a grouped box plot: one group per category on the x axis, one
// box per series within a group.
type Boxes struct {
	Title, YLabel string
	Groups        []string
	Series        []BoxSeries
}

// BoxPlot draws grouped box plots (Tukey boxes: quartiles, whiskers to
// the furthest point within 1.5 IQR, outliers as points). It returns an
// error when a series does not have one value slice per group.
func BoxPlot(b Boxes) (*plot.Plot, error) {
	p := newPlot(b.Title, "", b.YLabel)
	ns := len(b.Series)
	if ns == 0 || len(b.Groups) == 0 {
		return nil, errors.New("results: box plot needs at least one group and one series")
	}
	width := vg.Points(math.Min(18, 120/float64(ns*len(b.Groups))+6))
	for si, s := range b.Series {
		if len(s.Values) != len(b.Groups) {
			return nil, fmt.Errorf("results: box series %q has %d groups, want %d", s.Label, len(s.Values), len(b.Groups))
		}
		col := lineColor(si)
		var thumb *plotter.Polygon
		for gi, vals := range s.Values {
			if len(vals) == 0 {
				continue
			}
			// Series spread symmetrically around the group's position.
			loc := float64(gi) + (float64(si)-float64(ns-1)/2)*0.8/float64(ns)
			bp, err := plotter.NewBoxPlot(width, loc, plotter.Values(vals))
			if err != nil {
				return nil, fmt.Errorf("results: box %q/%q: %w", s.Label, b.Groups[gi], err)
			}
			bp.FillColor = translucent(col, 0x99)
			bp.GlyphStyle.Radius = vg.Points(1.5)
			p.Add(bp)
			if thumb == nil {
				thumb, _ = plotter.NewPolygon(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}, {X: 1, Y: 1}})
				thumb.Color = translucent(col, 0x99)
			}
		}
		if thumb != nil {
			p.Legend.Add(s.Label, thumb)
		}
	}
	p.NominalX(b.Groups...)
	p.X.Min, p.X.Max = -0.6, float64(len(b.Groups))-0.4
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Add(plotter.NewGrid())
	return p, nil
}

// CDWidth is the width of a critical-difference diagram.
const CDWidth = 6 * vg.Inch

// CDDiagram draws the critical-difference diagram of a rank table
// (Demšar, JMLR 7:1, 2006, section on post-hoc tests): models on an axis
// of average rank (rank 1, the best, on the left), the Nemenyi critical
// difference as a bar above the axis, and thick bars joining the models of
// each group not significantly different (RankGroups). It also returns
// the height that fits the drawing at the given width.
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
	cd := &cdPlotter{t: t, groups: t.Groups()}
	p.Add(cd)
	rows := (k + 1) / 2
	// Data area plus the title and the plot's padding.
	h := vg.Points(cdTop + cdGroupGap + cdGroupStep*float64(len(cd.groups)) + 8 + cdRowStep*float64(rows-1) + 12 + 30)
	return p, h, nil
}

// Vertical layout of the CD diagram, in points from the top of the data
// area.
const (
	cdTop       = 34.0 // axis line
	cdGroupGap  = 9.0  // axis to first group bar
	cdGroupStep = 6.0  // between group bars
	cdRowStep   = 15.0 // between label rows
)

type cdPlotter struct {
	t      RankTable
	groups [][]int
}

func (d *cdPlotter) Plot(c draw.Canvas, _ *plot.Plot) {
	t := d.t
	k := len(t.Models)
	sty := text.Style{Color: color.Black, Font: font.From(plot.DefaultFont, 9), Handler: plot.DefaultTextHandler}
	small := sty
	small.Font.Size = vg.Points(8)
	order := rankOrder(t.AvgRanks)
	nLeft := (k + 1) / 2
	label := func(j int) string { return fmt.Sprintf("%s  %.2f", t.Models[j], t.AvgRanks[j]) }
	var wl, wr vg.Length
	for i, j := range order {
		w := sty.Width(label(j))
		if i < nLeft {
			wl = max(wl, w)
		} else {
			wr = max(wr, w)
		}
	}
	pad := vg.Points(12)
	x0 := c.Min.X + wl + pad
	x1 := c.Max.X - wr - pad
	if x1-x0 < vg.Points(60) {
		// Long names: give the axis at least some room.
		mid := (c.Min.X + c.Max.X) / 2
		x0, x1 = mid-vg.Points(30), mid+vg.Points(30)
	}
	xr := func(r float64) vg.Length { return x0 + vg.Length((r-1)/float64(k-1))*(x1-x0) }
	top := c.Max.Y
	axisY := top - vg.Points(cdTop)
	thin := draw.LineStyle{Color: color.Black, Width: vg.Points(0.8)}
	c.StrokeLine2(thin, x0, axisY, x1, axisY)
	tickSty := small
	tickSty.XAlign, tickSty.YAlign = text.XCenter, text.YBottom
	for r := 1; r <= k; r++ {
		x := xr(float64(r))
		c.StrokeLine2(thin, x, axisY, x, axisY+vg.Points(4))
		c.FillText(tickSty, vg.Point{X: x, Y: axisY + vg.Points(6)}, fmt.Sprint(r))
		if r < k {
			xm := xr(float64(r) + 0.5)
			c.StrokeLine2(thin, xm, axisY, xm, axisY+vg.Points(2))
		}
	}
	// Critical difference bar, from rank 1.
	if t.CD > 0 && !math.IsInf(t.CD, 0) {
		cdY := top - vg.Points(6)
		xe := xr(math.Min(1+t.CD, float64(k)))
		bar := draw.LineStyle{Color: color.Black, Width: vg.Points(1.2)}
		c.StrokeLine2(bar, x0, cdY, xe, cdY)
		c.StrokeLine2(thin, x0, cdY-vg.Points(3), x0, cdY+vg.Points(3))
		c.StrokeLine2(thin, xe, cdY-vg.Points(3), xe, cdY+vg.Points(3))
		cs := small
		cs.XAlign, cs.YAlign = text.XLeft, text.YCenter
		c.FillText(cs, vg.Point{X: xe + vg.Points(4), Y: cdY}, fmt.Sprintf("CD = %.3f (α = %s)", t.CD, fmtAlpha(t.Alpha)))
	}
	// Groups of models not significantly different.
	gsty := draw.LineStyle{Color: color.Black, Width: vg.Points(2.6)}
	for gi, g := range d.groups {
		y := axisY - vg.Points(cdGroupGap+cdGroupStep*float64(gi))
		lo, hi := t.AvgRanks[g[0]], t.AvgRanks[g[len(g)-1]]
		c.StrokeLine2(gsty, xr(lo)-vg.Points(3), y, xr(hi)+vg.Points(3), y)
	}
	// Models: best half to the left, worst half to the right.
	rowsTop := axisY - vg.Points(cdGroupGap+cdGroupStep*float64(len(d.groups))+8)
	ls := draw.LineStyle{Color: color.NRGBA{0x33, 0x33, 0x33, 0xFF}, Width: vg.Points(0.7)}
	for i, j := range order {
		x := xr(t.AvgRanks[j])
		var row int
		lsty := sty
		lsty.YAlign = text.YCenter
		var xEnd, xText vg.Length
		if i < nLeft {
			row = i
			xEnd, xText = x0-vg.Points(6), x0-vg.Points(8)
			lsty.XAlign = text.XRight
		} else {
			row = k - 1 - i
			xEnd, xText = x1+vg.Points(6), x1+vg.Points(8)
			lsty.XAlign = text.XLeft
		}
		y := rowsTop - vg.Points(cdRowStep*float64(row))
		c.StrokeLines(ls, []vg.Point{{X: x, Y: axisY}, {X: x, Y: y}, {X: xEnd, Y: y}})
		c.FillText(lsty, vg.Point{X: xText, Y: y}, label(j))
	}
}

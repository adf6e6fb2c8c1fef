package results

import (
	"bytes"
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"sync"
	"time"

	"codeberg.org/go-pdf/fpdf"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
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
//
// Render lays it out itself around gonum/plot's drawing: a blank margin
// of 6 pt; the title fitted to the width (shrunk by at most 15 %, else
// wrapped) with 6 pt below it; the axis labels fitted likewise and
// centred on the data area; with LegendRight a legend strip level with
// the top of the data area (its font shrinks, down to 6 pt, when it would
// take over 40 % of the width or not fit the height), else the legend in
// the data area on a white box; and the x tick labels fitted: sweep axes
// label every value used unless neighbours would collide (then every
// s-th, from the first), category labels turn by 30°, 45°, 60° or 90° as
// their spacing needs. No two text boxes overlap and none leaves the
// canvas at the sizes the bench uses (TestFigureLayout).
type Figure struct {
	Name          string // path relative to the run directory, without extension
	Caption       string // one line, plain text
	Plot          *plot.Plot
	Width, Height vg.Length
	// LegendRight draws the plot's legend in a strip to the right of the
	// plot, level with the top of the data area, instead of inside the
	// data area.
	LegendRight bool
}

// pdfDefaults makes PDF output reproducible: fpdf otherwise stamps the
// creation and modification times and writes its font and image
// catalogues in map order. The settings are fpdf's package-wide defaults,
// read when a document is created; fringe is their only user.
var pdfDefaults sync.Once

// pdfEpoch is the fixed creation date written into every PDF figure.
var pdfEpoch = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// Render draws the figure in one of FigureFormats, laid out as described
// at Figure. It never modifies f.Plot, so a figure may be rendered any
// number of times, and from several goroutines at once.
// SVG and PNG output is byte-identical for identical figures; so is PDF,
// whose creation date is fixed (pdfEpoch) and whose catalogues are
// sorted.
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
		warmPDFFonts()
		c := vgpdf.New(f.Width, f.Height)
		f.draw(draw.New(pdfText{c}))
		if _, err := c.WriteTo(&buf); err != nil {
			return nil, fmt.Errorf("results: render %s.pdf: %w", f.Name, err)
		}
	case "png":
		c := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(PNGDPI))
		f.draw(draw.New(c))
		var err error
		if img, ok := c.Image().(*image.RGBA); ok {
			err = writePNG(&buf, img)
		} else {
			err = (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(&buf, c.Image())
		}
		if err != nil {
			return nil, fmt.Errorf("results: render %s.png: %w", f.Name, err)
		}
	default:
		return nil, fmt.Errorf("results: unknown figure format %q (want svg, pdf or png)", format)
	}
	return buf.Bytes(), nil
}

// pdfTextSize is the one font size at which PDF figures set text; other
// sizes are drawn at it and scaled (pdfText).
const pdfTextSize = vg.Length(12)

// pdfText draws text on a PDF canvas at the single size pdfTextSize,
// scaled about the text's anchor to the size asked for, so that a PDF
// figure embeds one font program per typeface (fpdf builds an embedded
// font, parsing and compressing the whole TrueType file, once per
// process for each distinct face and size it is asked for: tens of
// milliseconds each, the largest cost of a PDF figure when every size is
// its own). The glyphs, their positions and the text's extents are those
// of the size asked for: the scale is applied to the whole text box.
type pdfText struct{ *vgpdf.Canvas }

// FillString draws text at size fnt.Font.Size, set at pdfTextSize and
// scaled.
func (c pdfText) FillString(fnt font.Face, pt vg.Point, text string) {
	size := fnt.Font.Size
	if size == 0 {
		return
	}
	if size == pdfTextSize {
		c.Canvas.FillString(fnt, pt, text)
		return
	}
	k := float64(size / pdfTextSize)
	fnt.Font.Size = pdfTextSize
	c.Push()
	c.Translate(pt)
	c.Scale(k, k)
	c.Canvas.FillString(fnt, vg.Point{}, text)
	c.Pop()
}

// pdfFontsWarm guards WarmFigureFonts.
var pdfFontsWarm sync.Once

// warmPDFFonts builds, once per process, fpdf's embedded form of every
// face the figures draw text in (at pdfTextSize), so that concurrent PDF
// renderings find it built instead of each building its own.
func warmPDFFonts() {
	pdfFontsWarm.Do(func() {
		for _, fnt := range figureFonts() {
			c := vgpdf.New(vg.Points(10), vg.Points(10))
			face := plot.DefaultTextHandler.Cache().Lookup(fnt, pdfTextSize)
			c.FillString(face, vg.Point{}, "x")
		}
	})
}

// figureFonts lists the fonts the figures draw text in: gonum/plot's
// default font (titles, labels, ticks and legends all use it).
func figureFonts() []font.Font {
	return []font.Font{plot.DefaultFont}
}

// WarmFigureFonts prepares, once per process, what every PDF figure
// embeds (the font programs, see Figure.Render), which takes tens of
// milliseconds. Render does it on first use; a caller that will render
// figures may start it early in a goroutine of its own, beside other
// work, so that rendering does not wait for it. It is safe for
// concurrent use and changes no output.
func WarmFigureFonts() { warmPDFFonts() }

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

// maxValueTicks is the largest number of distinct x values of a linear
// sweep axis that get a tick each; more get gonum's default ticks.
const maxValueTicks = 12

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
	p.Add(plotter.NewGrid()) // first, under the data
	xmin, xmax := math.Inf(1), math.Inf(-1)
	var xs []float64
	for _, l := range s.Lines {
		n := len(l.X)
		if n == 0 || len(l.Mean) != n || len(l.Lo) != n || len(l.Hi) != n {
			return nil, fmt.Errorf("results: sweep line %q: want equal, non-empty X, Mean, Lo, Hi", l.Label)
		}
		for _, x := range l.X {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, fmt.Errorf("results: sweep line %q: x = %v", l.Label, x)
			}
			if s.LogX && !(x > 0) {
				return nil, fmt.Errorf("results: sweep line %q: x = %v on a log axis", l.Label, x)
			}
			xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
		}
		xs = append(xs, l.X...)
	}
	if len(s.Lines) == 0 {
		return nil, errors.New("results: sweep has no lines")
	}
	// The axis runs a little beyond the first and last value (4 % of the
	// range, in log units on a log axis), so that their markers and tick
	// labels sit inside; the reference lines span it. Ticks: a labelled
	// tick at every value used (on a linear axis while there are at most
	// maxValueTicks distinct values).
	ticks := newValueTicks(xs)
	if s.LogX {
		f := math.Max(math.Pow(xmax/xmin, 0.04), 1.15)
		xmin, xmax = xmin/f, xmax*f
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = ticks
	} else {
		pad := 0.04 * (xmax - xmin)
		if pad == 0 {
			pad = math.Max(0.1*math.Abs(xmin), 0.5)
		}
		xmin, xmax = xmin-pad, xmax+pad
		if len(ticks.vals) <= maxValueTicks {
			p.X.Tick.Marker = ticks
		}
	}
	p.X.Min, p.X.Max = xmin, xmax
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
	p.Add(plotter.NewGrid()) // first, under the data
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
	p.Add(plotter.NewGrid()) // first, under the data
	ns := len(b.Series)
	if ns == 0 || len(b.Groups) == 0 {
		return nil, errors.New("results: box plot needs at least one group and one series")
	}
	// Box width: about 300 pt of the data area shared by all boxes (the
	// figures are 7 to 8 inches wide), at most 18 pt, at least 2 pt, so
	// that neighbouring boxes of a group do not overlap.
	width := vg.Points(math.Max(2, math.Min(18, 300/float64(ns*len(b.Groups)))))
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
	return p, nil
}

package results

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// recorder is a vg.Canvas that draws nothing and records the box of every
// line of text drawn on it: from the FillString position (the baseline
// start) along the face's measured advance width, its ascent above and
// descent below, mapped through the current transform (Translate, Rotate,
// Scale, Push, Pop). That is what the figure draws, measured as
// gonum/plot measures text, without pixels.
type recorder struct {
	w, h  vg.Length
	m     affine
	stack []affine
	texts []drawnText
}

type drawnText struct {
	text string
	at   vg.Point // the baseline start on the canvas
	q    quad
}

// affine maps (x, y) to (a·x + c·y + e, b·x + d·y + f).
type affine struct{ a, b, c, d, e, f float64 }

var identity = affine{a: 1, d: 1}

// then is the transform that applies n first and then m (the canvas
// convention: a new transform acts on the coordinates that follow).
func (m affine) then(n affine) affine {
	return affine{
		a: m.a*n.a + m.c*n.b, b: m.b*n.a + m.d*n.b,
		c: m.a*n.c + m.c*n.d, d: m.b*n.c + m.d*n.d,
		e: m.a*n.e + m.c*n.f + m.e, f: m.b*n.e + m.d*n.f + m.f,
	}
}

func (m affine) apply(p vg.Point) vg.Point {
	x, y := float64(p.X), float64(p.Y)
	return vg.Point{X: vg.Length(m.a*x + m.c*y + m.e), Y: vg.Length(m.b*x + m.d*y + m.f)}
}

func newRecorder(w, h vg.Length) *recorder { return &recorder{w: w, h: h, m: identity} }

func (r *recorder) Size() (vg.Length, vg.Length)        { return r.w, r.h }
func (r *recorder) SetLineWidth(vg.Length)              {}
func (r *recorder) SetLineDash([]vg.Length, vg.Length)  {}
func (r *recorder) SetColor(color.Color)                {}
func (r *recorder) Stroke(vg.Path)                      {}
func (r *recorder) Fill(vg.Path)                        {}
func (r *recorder) DrawImage(vg.Rectangle, image.Image) {}
func (r *recorder) Push()                               { r.stack = append(r.stack, r.m) }
func (r *recorder) Pop() {
	r.m = r.stack[len(r.stack)-1]
	r.stack = r.stack[:len(r.stack)-1]
}
func (r *recorder) Translate(p vg.Point) {
	r.m = r.m.then(affine{a: 1, d: 1, e: float64(p.X), f: float64(p.Y)})
}
func (r *recorder) Rotate(rad float64) {
	s, c := math.Sincos(rad)
	r.m = r.m.then(affine{a: c, b: s, c: -s, d: c})
}
func (r *recorder) Scale(x, y float64) { r.m = r.m.then(affine{a: x, d: y}) }

func (r *recorder) FillString(f font.Face, pt vg.Point, txt string) {
	if f.Font.Size == 0 || strings.TrimSpace(txt) == "" {
		return
	}
	ext := f.Extents()
	w := f.Width(txt)
	local := quad{{X: pt.X, Y: pt.Y - ext.Descent}, {X: pt.X + w, Y: pt.Y - ext.Descent}, {X: pt.X + w, Y: pt.Y + ext.Ascent}, {X: pt.X, Y: pt.Y + ext.Ascent}}
	var q quad
	for i, p := range local {
		q[i] = r.m.apply(p)
	}
	r.texts = append(r.texts, drawnText{text: txt, at: r.m.apply(pt), q: q})
}

// layoutOf draws f on a recorder and returns the text it drew.
func layoutOf(f Figure) []drawnText {
	rec := newRecorder(f.Width, f.Height)
	f.draw(draw.New(rec))
	return rec.texts
}

// layoutTol is the overlap tolerated between two text boxes, or of a box
// beyond the canvas edge: rounding noise of float32 canvas coordinates,
// a thousand times smaller than anything visible.
const layoutTol = vg.Length(0.01)

// layoutProblems lists the text boxes that cross the canvas edge or each
// other (at most 12).
func layoutProblems(f Figure, texts []drawnText) []string {
	var out []string
	for i, a := range texts {
		b := a.q.bounds()
		if b.Min.X < -layoutTol || b.Min.Y < -layoutTol || b.Max.X > f.Width+layoutTol || b.Max.Y > f.Height+layoutTol {
			out = append(out, fmt.Sprintf("%q at %v crosses the edge of the %v × %v canvas", a.text, b, f.Width, f.Height))
		}
		for _, c := range texts[i+1:] {
			if d := overlapDepth(a.q, c.q); d > layoutTol {
				out = append(out, fmt.Sprintf("%q at %v and %q at %v overlap by %.2f pt", a.text, b, c.text, c.q.bounds(), d))
			}
		}
		if len(out) > 12 {
			return out[:12]
		}
	}
	return out
}

// joined is all drawn text, one line each, to look for what must appear.
func joined(texts []drawnText) string {
	var b strings.Builder
	for _, x := range texts {
		b.WriteString(x.text)
		b.WriteByte('\n')
	}
	return b.String()
}

// wantTexts reports each want not drawn as one line (after joining
// wrapped lines with a space or without one).
func wantTexts(t *testing.T, name string, texts []drawnText, wants ...string) {
	t.Helper()
	all := joined(texts)
	flat := strings.ReplaceAll(all, "\n", "")
	spaced := strings.ReplaceAll(all, "\n", " ")
	for _, w := range wants {
		if !strings.Contains(all, w+"\n") && !strings.Contains(flat, w) && !strings.Contains(spaced, w) {
			t.Errorf("%s: %q not drawn", name, w)
		}
	}
}

// Synthetic names for the layout scenarios.
var (
	longModel   = "interference-noisy-gdep0.3-shots512-balanced-weights" // 53 characters
	longDataset = "rather-long-dataset-name-from-a-csv"
)

func modelNames(k int, long bool) []string {
	base := []string{"interference", "knn-k5", "svm-rbf-C1", "svm-linear-C1", "logreg-C1", "centroid", "svm-interference-C1"}
	out := make([]string, k)
	for i := range out {
		switch {
		case long && i%2 == 0:
			out[i] = fmt.Sprintf("%s-%02d", longModel, i)
		default:
			out[i] = fmt.Sprintf("%s-%d", base[i%len(base)], i)
		}
	}
	return out
}

func datasetNames(n int, long bool) []string {
	base := []string{"iris", "wine", "breast-cancer", "cats", "penguins", "glass", "segment", "ionosphere", "digits", "synth-cullet", "synth-bearings"}
	out := make([]string, n)
	for i := range out {
		if long && i%3 == 1 {
			out[i] = fmt.Sprintf("%s-%02d", longDataset, i)
		} else {
			out[i] = fmt.Sprintf("%s%d", base[i%len(base)], i)
		}
	}
	return out
}

// layoutCase is a figure and texts it must show (a wrapped text counts
// when its lines, joined, contain it).
type layoutCase struct {
	fig  Figure
	want []string
}

// cdCases are rank tables of 2 to 14 models, short and long names, with
// a small, a large and no finite critical difference.
func cdCases(rng *rand.Rand) []layoutCase {
	var cases []layoutCase
	for k := 2; k <= 14; k++ {
		for _, long := range []bool{false, true} {
			for _, cd := range []float64{0.4, float64(k) * 0.8, math.Inf(1)} {
				ranks := make([]float64, k)
				for i := range ranks {
					ranks[i] = 1 + rng.Float64()*float64(k-1)
				}
				ranks[0], ranks[k-1] = 1, float64(k)
				title := fmt.Sprintf("Average ranks, pipeline std+l2 (%d datasets)", 3+k)
				if long {
					title = "Average ranks, pipeline std+minmax+l2+pad+something-longer-still (123 datasets) with a title too long for one line"
				}
				models := modelNames(k, long)
				p, h, err := CDDiagram(RankTable{Models: models, AvgRanks: ranks, CD: cd, Alpha: 0.05}, title)
				if err != nil {
					panic(err)
				}
				// The size of bench/report.Figures' CD diagrams.
				c := layoutCase{fig: Figure{Name: fmt.Sprintf("cd-k%d-long%v-cd%.3g", k, long, cd), Plot: p, Width: CDWidth, Height: h}}
				c.want = append(c.want, title, "1")
				for i, m := range models {
					c.want = append(c.want, fmt.Sprintf("%s  %.2f", m, ranks[i]))
				}
				if !math.IsInf(cd, 0) {
					c.want = append(c.want, fmt.Sprintf("CD = %.3f (α = 0.05)", cd))
				}
				cases = append(cases, c)
			}
		}
	}
	return cases
}

// sweepCase is a sweep of n datasets over xs; it must show every
// dataset, the first x value and the axis labels.
func sweepCase(rng *rand.Rand, name string, n int, long, logX bool, xs []float64, title string) layoutCase {
	var lines []SweepLine
	dss := datasetNames(n, long)
	for i, ds := range dss {
		l := SweepLine{Label: ds, Exact: 0.7 + 0.3*rng.Float64(), Baseline: 0.7 + 0.3*rng.Float64()}
		if i%4 == 3 {
			l.Exact = math.NaN()
		}
		for j, x := range xs {
			m := 0.4 + 0.5*float64(j+1)/float64(len(xs)) + 0.05*rng.Float64()
			l.X = append(l.X, x)
			l.Mean = append(l.Mean, m)
			l.Lo = append(l.Lo, m-0.05)
			l.Hi = append(l.Hi, math.Min(m+0.05, 1))
		}
		lines = append(lines, l)
	}
	xl := "shots per test instance"
	if !logX {
		xl = "global_depolarizing strength"
	}
	p, err := SweepPlot(Sweep{Title: title, XLabel: xl, YLabel: "accuracy", LogX: logX, Lines: lines})
	if err != nil {
		panic(err)
	}
	// The size of bench/report.Figures' sweeps.
	c := layoutCase{fig: Figure{Name: name, Plot: p, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true}}
	c.want = append(append(c.want, title, xl, "accuracy", "exact mode (dashed)", "best baseline (dotted)"), dss...)
	if logX || len(xs) <= maxValueTicks {
		c.want = append(c.want, tickLabel(xs[0])) // the first value is always labelled
	}
	return c
}

func sweepCases(rng *rand.Rand) []layoutCase {
	pow := func(base float64, from, to int) []float64 {
		var xs []float64
		for e := from; e <= to; e++ {
			xs = append(xs, math.Pow(base, float64(e)))
		}
		return xs
	}
	short := "Accuracy against shot budget, pipeline std+l2"
	long := "Accuracy against global_depolarizing noise, pipeline std+minmax+l2+pad (interference-noisy-balanced-weights-variant) shots 512"
	return []layoutCase{
		sweepCase(rng, "shots-4", 5, false, true, []float64{32, 128, 512, 2048}, short),
		sweepCase(rng, "shots-1", 2, false, true, []float64{100}, short),
		sweepCase(rng, "shots-pow2", 14, true, true, pow(2, 3, 20), long),
		sweepCase(rng, "shots-pow10", 3, false, true, pow(10, 1, 6), short),
		sweepCase(rng, "shots-dense", 6, false, true, []float64{1000, 1100, 1200, 1500, 2000, 2100}, short),
		sweepCase(rng, "noise-3", 5, false, false, []float64{0.1, 0.2, 0.3}, long),
		sweepCase(rng, "noise-12", 14, true, false, []float64{0, 0.01, 0.02, 0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.09, 0.1, 0.11}, short),
		sweepCase(rng, "noise-log", 4, false, true, []float64{1e-4, 1e-3, 3e-3, 1e-2, 3e-2, 0.1}, short),
		sweepCase(rng, "noise-20", 3, false, false, pow(1.1, 1, 20), short),
	}
}

func kernelCases() []layoutCase {
	var cases []layoutCase
	for _, n := range []int{0, 2, 14} {
		var curves []KernelCurve
		c := layoutCase{want: []string{"Kernel profile on unit vectors", "interference κ = 1 − d²/4"}}
		for i, ds := range datasetNames(n, true) {
			curves = append(curves, KernelCurve{Label: fmt.Sprintf("RBF γ = 1/(d·Var) on %s (%.3g)", ds, 0.5+0.1*float64(i)), Gamma: 0.5 + 0.1*float64(i)})
			c.want = append(c.want, curves[i].Label)
		}
		p, err := KernelProfile(curves)
		if err != nil {
			panic(err)
		}
		// The size of bench/report.KernelFigure.
		c.fig = Figure{Name: fmt.Sprintf("kernel-%d", n), Plot: p, Width: 6 * vg.Inch, Height: 4 * vg.Inch}
		cases = append(cases, c)
	}
	return cases
}

func boxCases(rng *rand.Rand) []layoutCase {
	var cases []layoutCase
	for _, n := range []int{1, 5, 14, 30} {
		for _, long := range []bool{false, true} {
			dss := datasetNames(n, long)
			b := Boxes{Title: "Post-selection probability p_acc of " + modelNames(1, long)[0] + " per test instance", YLabel: "p_acc", Groups: dss}
			pipes := []string{"pipeline std+l2", "pipeline l2", "pipeline std+lift"}
			for _, pipe := range pipes {
				s := BoxSeries{Label: pipe, Values: make([][]float64, n)}
				for g := range s.Values {
					for range 20 {
						s.Values[g] = append(s.Values[g], 0.3+0.7*rng.Float64())
					}
				}
				b.Series = append(b.Series, s)
			}
			p, err := BoxPlot(b)
			if err != nil {
				panic(err)
			}
			// The size of bench's p_acc figures.
			c := layoutCase{fig: Figure{Name: fmt.Sprintf("pacc-%d-long%v", n, long), Plot: p, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true}}
			c.want = append(append(append(c.want, b.Title, "p_acc"), dss...), pipes...)
			cases = append(cases, c)
		}
	}
	return cases
}

// assessCase is an assessment of n datasets under three pipelines with
// invented scores: gaps in [−0.45, 0.02], median shots spread over
// 10 … 1e12, every 7th row without a finite budget.
func assessCase(rng *rand.Rand, n int, long bool) *Assessment {
	a := &Assessment{Ratio: 10}
	pipes := []string{"std+l2", "l2", "std+lift"}
	befores := []string{"std", "raw", "std"}
	for di, ds := range datasetNames(n, long) {
		for pi, pipe := range pipes {
			r := AssessRow{Dataset: ds, Pipeline: pipe, Before: befores[pi],
				ShotsMedian: math.Pow(10, 1+11*rng.Float64()*rng.Float64()), Gap: 0.02 - 0.47*rng.Float64()*rng.Float64(),
				KNNBefore: rng.Float64(), KNNL2: rng.Float64(), KNNLift: rng.Float64(), NormOnly: rng.Float64(), Chance: 0.3}
			if (di*3+pi)%7 == 6 {
				r.ShotsMedian = math.Inf(1)
			}
			for range 30 {
				r.PAcc = append(r.PAcc, 0.4+0.6*rng.Float64())
			}
			a.Rows = append(a.Rows, r)
			for _, m := range []int{8, 16, 32, 100 + 10*di} {
				a.Resources = append(a.Resources, AssessResource{Dataset: ds, Pipeline: pipe, Train: m, NoiseBudget: 0.1 / float64(m) * (0.5 + rng.Float64())})
			}
		}
	}
	return a
}

func assessCases(rng *rand.Rand) []layoutCase {
	var cases []layoutCase
	for _, c := range []struct {
		n    int
		long bool
	}{{3, false}, {11, false}, {14, true}, {20, true}} {
		a := assessCase(rng, c.n, c.long)
		if c.n == 20 {
			// No row with a finite budget: an empty map, every row listed
			// in the title (the first few by name).
			for i := range a.Rows {
				a.Rows[i].ShotsMedian = math.Inf(1)
			}
		}
		fs, err := AssessFigures(a, func(s string) string { return s })
		if err != nil {
			panic(err)
		}
		for _, f := range fs {
			lc := layoutCase{fig: f}
			if f.Name == "figures/assess-cost-gain" {
				// Every point with a finite budget is labelled.
				// Every point with a finite budget is labelled; the first
				// row without one is named in the title.
				first := ""
				for _, r := range a.Rows {
					if !math.IsInf(r.ShotsMedian, 0) {
						lc.want = append(lc.want, r.Dataset)
					} else if first == "" {
						first = r.Dataset + "/" + r.Pipeline
						lc.want = append(lc.want, "not shown (no finite budget): "+first)
					}
				}
				if c.n < 20 {
					lc.want = append(lc.want, "std+l2", "l2", "std+lift")
				}
			}
			lc.fig.Name = fmt.Sprintf("%s-n%d-long%v", f.Name, c.n, c.long)
			cases = append(cases, lc)
		}
	}
	return cases
}

// layoutCases are all the scenarios of the layout tests.
func layoutCases() []layoutCase {
	rng := rand.New(rand.NewPCG(14, 1))
	var cases []layoutCase
	cases = append(cases, cdCases(rng)...)
	cases = append(cases, sweepCases(rng)...)
	cases = append(cases, kernelCases()...)
	cases = append(cases, boxCases(rng)...)
	cases = append(cases, assessCases(rng)...)
	return cases
}

// TestFigureLayout draws every kind of figure at the sizes the bench
// layer uses, with 2 to 14 models, up to 30 datasets and long names, on a
// recorder, and requires that no text box crosses another or the edge of
// the canvas, and that the texts a reader needs are drawn.
func TestFigureLayout(t *testing.T) {
	keep := os.Getenv("FRINGE_KEEP_FIGURES") // a directory to look at the figures
	for _, c := range layoutCases() {
		f := c.fig
		texts := layoutOf(f)
		for _, p := range layoutProblems(f, texts) {
			t.Errorf("%s: %s", f.Name, p)
		}
		wantTexts(t, f.Name, texts, c.want...)
		if keep != "" {
			b, err := f.Render("png")
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(keep, strings.ReplaceAll(f.Name, "/", "_")+".png"), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
}

// svgTexts reads the text elements of an SVG written by vgsvg: their
// strings and their positions on the canvas (y up, as the recorder
// reports them), through the transforms of the enclosing groups.
func svgTexts(b []byte, height vg.Length) ([]drawnText, error) {
	dec := xml.NewDecoder(bytes.NewReader(b))
	stack := []affine{identity}
	var out []drawnText
	var cur *drawnText
	for {
		tok, err := dec.Token()
		if err != nil {
			if err.Error() == "EOF" {
				return out, nil
			}
			return nil, err
		}
		switch el := tok.(type) {
		case xml.StartElement:
			m := stack[len(stack)-1]
			var x, y float64
			for _, a := range el.Attr {
				switch a.Name.Local {
				case "transform":
					tr, err := parseTransform(a.Value)
					if err != nil {
						return nil, err
					}
					m = m.then(tr)
				case "x":
					x, _ = strconv.ParseFloat(a.Value, 64)
				case "y":
					y, _ = strconv.ParseFloat(a.Value, 64)
				}
			}
			if el.Name.Local == "text" {
				p := m.apply(vg.Point{X: vg.Length(x), Y: vg.Length(y)})
				out = append(out, drawnText{at: vg.Point{X: p.X, Y: height - p.Y}})
				cur = &out[len(out)-1]
			}
			stack = append(stack, m)
		case xml.CharData:
			if cur != nil {
				cur.text += string(el)
			}
		case xml.EndElement:
			stack = stack[:len(stack)-1]
			cur = nil
		}
	}
}

// parseTransform reads an SVG transform list of translate, scale and
// rotate (degrees), composed left to right as SVG does.
func parseTransform(s string) (affine, error) {
	m := identity
	for s = strings.TrimSpace(s); s != ""; s = strings.TrimSpace(s) {
		open, end := strings.IndexByte(s, '('), strings.IndexByte(s, ')')
		if open < 0 || end < open {
			return m, fmt.Errorf("transform %q", s)
		}
		name := strings.TrimSpace(s[:open])
		var args []float64
		for _, f := range strings.FieldsFunc(s[open+1:end], func(r rune) bool { return r == ',' || r == ' ' }) {
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				return m, fmt.Errorf("transform %q: %w", s, err)
			}
			args = append(args, v)
		}
		for len(args) < 2 {
			args = append(args, args[0]) // scale(s) is scale(s, s); translate(x) is never written
		}
		switch name {
		case "translate":
			m = m.then(affine{a: 1, d: 1, e: args[0], f: args[1]})
		case "scale":
			m = m.then(affine{a: args[0], d: args[1]})
		case "rotate":
			sn, cs := math.Sincos(args[0] * math.Pi / 180)
			m = m.then(affine{a: cs, b: sn, c: -sn, d: cs})
		default:
			return m, fmt.Errorf("transform %q: unknown %s", s, name)
		}
		s = s[end+1:]
	}
	return m, nil
}

// TestRecorderMatchesSVG checks the recorder against an independent
// reading of the same drawing: the SVG backend's text elements, placed
// through the SVG's own group transforms, must be the recorded texts in
// the same order at the same baseline points (within 0.02 pt: vgsvg
// writes coordinates with 5 significant digits, so rounding moves a
// point of a 600 pt canvas by up to 0.005 pt per coordinate, and a
// rotated label's position by a few times that).
func TestRecorderMatchesSVG(t *testing.T) {
	cases := layoutCases()
	for i, c := range cases {
		if i%4 != 0 && !strings.Contains(c.fig.Name, "long") {
			continue // a quarter of the short-name cases, every long one
		}
		b, err := c.fig.Render("svg")
		if err != nil {
			t.Fatal(err)
		}
		got, err := svgTexts(b, c.fig.Height)
		if err != nil {
			t.Fatalf("%s.svg: %v", c.fig.Name, err)
		}
		rec := layoutOf(c.fig)
		if len(got) != len(rec) {
			t.Errorf("%s: %d texts in the SVG, %d recorded", c.fig.Name, len(got), len(rec))
			continue
		}
		for j := range rec {
			d := got[j].at.Sub(rec[j].at)
			if got[j].text != rec[j].text || math.Hypot(float64(d.X), float64(d.Y)) > 0.02 {
				t.Errorf("%s: text %d: SVG %q at %v, recorded %q at %v", c.fig.Name, j, got[j].text, got[j].at, rec[j].text, rec[j].at)
			}
		}
	}
}

// TestLayoutProblemsFound checks that the layout check finds what it must:
// a plot drawn by gonum/plot alone puts its title above the top edge, and
// two labels drawn at one point overlap.
func TestLayoutProblemsFound(t *testing.T) {
	p, err := SweepPlot(Sweep{Title: "a title", XLabel: "x", YLabel: "y", LogX: true, Lines: []SweepLine{
		{Label: "a", X: []float64{32, 128}, Mean: []float64{0.5, 0.6}, Lo: []float64{0.4, 0.5}, Hi: []float64{0.6, 0.7}, Exact: math.NaN(), Baseline: math.NaN()}}})
	if err != nil {
		t.Fatal(err)
	}
	f := Figure{Name: "raw", Plot: p, Width: 7 * vg.Inch, Height: 4 * vg.Inch}
	rec := newRecorder(f.Width, f.Height)
	p.Draw(draw.New(rec))
	probs := layoutProblems(f, rec.texts)
	if len(probs) == 0 || !strings.Contains(probs[0], `"a title"`) || !strings.Contains(probs[0], "edge") {
		t.Errorf("title of a plain gonum plot: problems %q, want the title crossing the edge", probs)
	}
	// text.Plain.Draw puts the baseline of a one-line YTop text at
	// y − 2·Ascent − Descent + Size for the point y it is given, and
	// Plot.Draw gives the title y = top + Descent: its box ends
	// Size − Ascent above the top (derived by hand from those two
	// methods). 11 pt Liberation Serif has Ascent 9.80224609375 pt
	// (font.Face.Extents, printed by hand), so 1.19775390625 pt; the
	// tolerance is float rounding.
	for _, x := range rec.texts {
		if x.text == "a title" {
			if top := x.q.bounds().Max.Y - f.Height; math.Abs(float64(top)-1.19775390625) > 1e-6 {
				t.Errorf("title top %v pt above the edge, want 1.19775390625", top)
			}
		}
	}

	rec = newRecorder(100, 100)
	c := draw.New(rec)
	sty := p.X.Tick.Label
	putText(c, sty, vg.Point{X: 50, Y: 50}, 0.5, 0.5, "left")
	putText(c, sty, vg.Point{X: 52, Y: 51}, 0.5, 0.5, "right")
	if probs := layoutProblems(Figure{Width: 100, Height: 100}, rec.texts); len(probs) != 1 || !strings.Contains(probs[0], "overlap") {
		t.Errorf("two labels at one point: problems %q, want one overlap", probs)
	}
}

// BenchmarkLayout measures the layout's cost against gonum/plot drawing
// the same plots by itself, both on a recorder (no output format), in
// one run: the ratio of the two is the overhead of fitting titles,
// labels and ticks.
func BenchmarkLayout(b *testing.B) {
	figs, err := buildTestFigures()
	if err != nil {
		b.Fatal(err)
	}
	b.Run("draw=gonum", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			for _, f := range figs {
				f.Plot.Draw(draw.New(newRecorder(f.Width, f.Height)))
			}
		}
		b.ReportMetric(b.Elapsed().Seconds()/float64(b.N*len(figs))*1e3, "ms/figure")
	})
	b.Run("draw=layout", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			for _, f := range figs {
				f.draw(draw.New(newRecorder(f.Width, f.Height)))
			}
		}
		b.ReportMetric(b.Elapsed().Seconds()/float64(b.N*len(figs))*1e3, "ms/figure")
	})
}

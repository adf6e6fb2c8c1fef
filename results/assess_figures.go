package results

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// AssessFigures builds the figures of an assessment, in a fixed order and
// named figures/assess-<kind>[-<pipeline>]: the cost–gain map (accuracy
// gap against median shots), the p_acc distributions, the noise budget
// against the training-set size (one per pipeline), and the k-NN
// accuracies before and after unit-norm scaling (one per pipeline before
// normalisation). fileSafe turns a pipeline into a file-name fragment.
func AssessFigures(a *Assessment, fileSafe func(string) string) ([]Figure, error) {
	if len(a.Rows) == 0 {
		return nil, errors.New("results: assessment has no rows")
	}
	var figs []Figure
	p, err := costGainPlot(a)
	if err != nil {
		return nil, err
	}
	figs = append(figs, Figure{Name: "figures/assess-cost-gain", Plot: p, Width: 7 * vg.Inch, Height: 4.5 * vg.Inch,
		Caption: "Accuracy gap of the exact classifier to the best baseline against the shots a device needs for a 95% right decision at the median test instance; up and to the left is better"})

	var dss, pipes []string
	seenD, seenP := map[string]bool{}, map[string]bool{}
	for _, r := range a.Rows {
		if !seenD[r.Dataset] {
			seenD[r.Dataset] = true
			dss = append(dss, r.Dataset)
		}
		if !seenP[r.Pipeline] {
			seenP[r.Pipeline] = true
			pipes = append(pipes, r.Pipeline)
		}
	}
	box := Boxes{Title: "Post-selection probability p_acc over test instances", YLabel: "p_acc", Groups: dss}
	for _, pipe := range pipes {
		s := BoxSeries{Label: pipe, Values: make([][]float64, len(dss))}
		for _, r := range a.Rows {
			if r.Pipeline == pipe {
				for gi, d := range dss {
					if d == r.Dataset {
						s.Values[gi] = r.PAcc
					}
				}
			}
		}
		box.Series = append(box.Series, s)
	}
	bp, err := BoxPlot(box)
	if err != nil {
		return nil, err
	}
	bp.Y.Max = 1
	bp.X.Tick.Label.Rotation = math.Pi / 6
	bp.X.Tick.Label.XAlign, bp.X.Tick.Label.YAlign = draw.XRight, draw.YTop
	figs = append(figs, Figure{Name: "figures/assess-p-acc", Plot: bp, Width: 8 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true,
		Caption: "Distribution of the post-selection probability p_acc of the assessed form over all test instances, per dataset and pipeline"})

	for _, pipe := range pipes {
		np, err := noiseBudgetPlot(a, pipe)
		if err != nil {
			return nil, err
		}
		if np == nil {
			continue // no resource rows for this pipeline
		}
		figs = append(figs, Figure{Name: "figures/assess-noise-" + fileSafe(pipe), Plot: np, Width: 7 * vg.Inch, Height: 4.5 * vg.Inch, LegendRight: true,
			Caption: fmt.Sprintf("Two-qubit error rate at which the estimated fidelity of the compiled circuit drops to 1/2, against the training-set size, pipeline %s (p1 = p2/%g)", pipe, a.Ratio)})
	}

	var befores []string
	seenB := map[string]bool{}
	for _, r := range a.Rows {
		if !seenB[r.Before] {
			seenB[r.Before] = true
			befores = append(befores, r.Before)
		}
	}
	for _, before := range befores {
		nb, err := normBarsPlot(a, before)
		if err != nil {
			return nil, err
		}
		figs = append(figs, Figure{Name: "figures/assess-norm-" + fileSafe(before), Plot: nb, Width: 8 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true,
			Caption: fmt.Sprintf("k-NN (k = 5) accuracy on the vectors of pipeline %s, after l2, after lift, and on the norm alone, with the majority-class rate", before)})
	}
	return figs, nil
}

// costGainPlot draws one point per row: x = median shots (log), y = gap,
// coloured and shaped by pipeline, labelled with the dataset (labels
// placed by the repel step of pointLabels, the legend in the emptiest
// corner). Rows with infinite or undefined shots are left out and listed
// on a second title line.
func costGainPlot(a *Assessment) (*plot.Plot, error) {
	p := newPlot("Cost and gain of the interference classifier", "shots for a 95% right decision at the median test instance", "accuracy gap to the best baseline")
	p.Add(plotter.NewGrid())
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = decadeTicks{}
	var pipes []string
	seen := map[string]bool{}
	for _, r := range a.Rows {
		if !seen[r.Pipeline] {
			seen[r.Pipeline] = true
			pipes = append(pipes, r.Pipeline)
		}
	}
	labels := &pointLabels{
		style:  text.Style{Font: font.From(plot.DefaultFont, 7), Handler: plot.DefaultTextHandler},
		legSty: text.Style{Font: font.From(plot.DefaultFont, 8), Handler: plot.DefaultTextHandler},
	}
	var left []string
	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymin, ymax := 0.0, 0.0 // the zero line is always shown
	for pi, pipe := range pipes {
		var pts plotter.XYs
		var names []string
		for _, r := range a.Rows {
			if r.Pipeline != pipe {
				continue
			}
			if !(r.ShotsMedian >= 1) || math.IsInf(r.ShotsMedian, 0) || math.IsNaN(r.Gap) || math.IsInf(r.Gap, 0) {
				left = append(left, r.Dataset+"/"+r.Pipeline)
				continue
			}
			pts = append(pts, plotter.XY{X: math.Ceil(r.ShotsMedian), Y: r.Gap})
			names = append(names, r.Dataset)
		}
		if len(pts) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, fmt.Errorf("results: cost-gain figure: %w", err)
		}
		col := lineColor(pi)
		sc.GlyphStyle.Color = col
		sc.GlyphStyle.Radius = vg.Points(3)
		sc.GlyphStyle.Shape = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.TriangleGlyph{}, draw.SquareGlyph{}, draw.CrossGlyph{}}[pi%4]
		p.Add(sc)
		labels.legend = append(labels.legend, legendItem{Text: pipe, Thumb: sc})
		for i, pt := range pts {
			labels.points = append(labels.points, labelPoint{X: pt.X, Y: pt.Y, Text: names[i], Color: col, Radius: sc.GlyphStyle.Radius})
			xmin, xmax = math.Min(xmin, pt.X), math.Max(xmax, pt.X)
			ymin, ymax = math.Min(ymin, pt.Y), math.Max(ymax, pt.Y)
		}
	}
	zero := plotter.NewFunction(func(float64) float64 { return 0 })
	zero.LineStyle.Dashes = dashed
	zero.LineStyle.Width = vg.Points(0.8)
	p.Add(zero, labels)
	if len(labels.points) == 0 {
		xmin, xmax = 1, 10 // nothing to show; a log axis needs a positive range
	}
	// Room around the points for their labels and the legend: 5 % of the
	// decades on either side (at least a factor 1.5), 8 % of the gap range
	// below and 12 % above.
	f := math.Max(math.Pow(xmax/xmin, 0.05), 1.5)
	p.X.Min, p.X.Max = xmin/f, xmax*f
	span := math.Max(ymax-ymin, 0.05)
	p.Y.Min, p.Y.Max = ymin-0.08*span, ymax+0.12*span
	if len(left) > 0 {
		// At most about two lines of names; the rest are counted.
		shown, n := "", 0
		for n < len(left) && len(shown)+len(left[n]) <= 150 {
			if n > 0 {
				shown += ", "
			}
			shown += left[n]
			n++
		}
		if n == 0 {
			shown, n = left[0], 1
		}
		if n < len(left) {
			shown += fmt.Sprintf(" and %d more (shots_median inf in assess.csv)", len(left)-n)
		}
		p.Title.Text += "\nnot shown (no finite budget): " + shown
	}
	return p, nil
}

// noiseBudgetPlot draws the noise budget against the training-set size,
// one line per dataset, log–log; nil when no resource row has the
// pipeline.
func noiseBudgetPlot(a *Assessment, pipe string) (*plot.Plot, error) {
	p := newPlot("Noise budget, pipeline "+pipe, "training vectors M", "p2 at fidelity 1/2")
	p.Add(plotter.NewGrid()) // first, under the data
	p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
	p.X.Tick.Marker, p.Y.Tick.Marker = decadeTicks{}, decadeTicks{}
	var dss []string
	seen := map[string]bool{}
	for _, r := range a.Resources {
		if r.Pipeline == pipe && !seen[r.Dataset] {
			seen[r.Dataset] = true
			dss = append(dss, r.Dataset)
		}
	}
	if len(dss) == 0 {
		return nil, nil
	}
	for di, ds := range dss {
		var pts plotter.XYs
		for _, r := range a.Resources {
			if r.Pipeline == pipe && r.Dataset == ds && r.NoiseBudget > 0 {
				pts = append(pts, plotter.XY{X: float64(r.Train), Y: r.NoiseBudget})
			}
		}
		if len(pts) == 0 {
			continue
		}
		l, sc, err := plotter.NewLinePoints(pts)
		if err != nil {
			return nil, fmt.Errorf("results: noise-budget figure: %w", err)
		}
		col := lineColor(di)
		l.LineStyle.Color, l.LineStyle.Width = col, vg.Points(1.3)
		if di >= len(palette) {
			l.LineStyle.Dashes = dashed
		}
		sc.GlyphStyle.Color, sc.GlyphStyle.Radius = col, vg.Points(2.2)
		p.Add(l, sc)
		p.Legend.Add(ds, l, sc)
	}
	decadeRange(&p.X.Min, &p.X.Max)
	decadeRange(&p.Y.Min, &p.Y.Max)
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	return p, nil
}

// decadeRange widens a positive axis range to whole powers of ten.
func decadeRange(lo, hi *float64) {
	if !(*lo > 0) || !(*hi > 0) {
		return
	}
	*lo = math.Pow(10, math.Floor(math.Log10(*lo)))
	*hi = math.Pow(10, math.Ceil(math.Log10(*hi)))
	if *hi <= *lo {
		*hi = *lo * 10
	}
}

// decadeTicks marks a log axis at powers of ten, labelled at most seven
// times (every k-th decade from the first within the range), written
// 1, 10, ..., 10000 and 1e5, 1e-3.
type decadeTicks struct{}

func (decadeTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0) || !(max > min) {
		return nil
	}
	// From the first decade within the range, so that it is labelled.
	lo, hi := int(math.Ceil(math.Log10(min)-1e-9)), int(math.Floor(math.Log10(max)+1e-9))
	if hi < lo {
		// No power of ten within the range: 1, 2, 3 and 5 times one
		// (neighbours at most a factor 2 apart, so a range of a factor
		// 2 or more gets one).
		var ticks []plot.Tick
		for e := lo - 1; e <= lo; e++ {
			for _, m := range []float64{1, 2, 3, 5} {
				if v := m * math.Pow(10, float64(e)); v >= min*(1-1e-9) && v <= max*(1+1e-9) {
					ticks = append(ticks, plot.Tick{Value: v, Label: tickLabel(v)})
				}
			}
		}
		return ticks
	}
	step := max1((hi-lo+6)/7, 1)
	var ticks []plot.Tick
	for e := lo; e <= hi; e++ {
		v := math.Pow(10, float64(e))
		if v < min*(1-1e-9) || v > max*(1+1e-9) {
			continue
		}
		t := plot.Tick{Value: v}
		if (e-lo)%step == 0 {
			switch {
			case e >= 0 && e <= 4:
				t.Label = strconv.FormatFloat(v, 'f', 0, 64)
			case e < 0 && e >= -2:
				t.Label = strconv.FormatFloat(v, 'f', -e, 64)
			default:
				t.Label = "1e" + strconv.Itoa(e)
			}
		}
		ticks = append(ticks, t)
	}
	return ticks
}

func max1(a, b int) int {
	if a > b {
		return a
	}
	return b
}

// normBarsPlot draws, per dataset, the k-NN accuracies before and after
// normalisation, after lift and on the norm alone, for the rows whose
// vectors before normalisation come from pipeline before.
func normBarsPlot(a *Assessment, before string) (*plot.Plot, error) {
	p := newPlot("What unit norm throws away (vectors of pipeline "+before+")", "", "k-NN accuracy")
	p.Add(plotter.NewGrid()) // first, under the data
	var rows []AssessRow
	seen := map[string]bool{}
	for _, r := range a.Rows {
		if r.Before == before && !seen[r.Dataset] {
			seen[r.Dataset] = true
			rows = append(rows, r)
		}
	}
	names := make([]string, len(rows))
	for i, r := range rows {
		names[i] = r.Dataset
	}
	series := []struct {
		label string
		get   func(AssessRow) float64
	}{
		{"before (" + before + ")", func(r AssessRow) float64 { return r.KNNBefore }},
		{"after l2", func(r AssessRow) float64 { return r.KNNL2 }},
		{"after lift", func(r AssessRow) float64 { return r.KNNLift }},
		{"norm only", func(r AssessRow) float64 { return r.NormOnly }},
		{"majority class", func(r AssessRow) float64 { return r.Chance }},
	}
	w := vg.Points(math.Min(9, 300/float64(len(rows)*len(series)+1)))
	for si, s := range series {
		vals := make(plotter.Values, len(rows))
		for i, r := range rows {
			v := s.get(r)
			if math.IsNaN(v) {
				v = 0
			}
			vals[i] = v
		}
		bc, err := plotter.NewBarChart(vals, w)
		if err != nil {
			return nil, fmt.Errorf("results: norm figure: %w", err)
		}
		bc.Color = lineColor(si)
		bc.LineStyle.Width = 0
		bc.Offset = w * vg.Length(float64(si)-float64(len(series)-1)/2)
		p.Add(bc)
		p.Legend.Add(s.label, bc)
	}
	p.NominalX(names...)
	p.X.Tick.Label.Rotation = math.Pi / 6
	p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XRight, draw.YTop
	p.Y.Min, p.Y.Max = 0, 1
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	return p, nil
}

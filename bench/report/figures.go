package report

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/plot/vg"

	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/bench/outdir"
	"fringe/bench/plan"
	"fringe/datasets"
	"fringe/results"
)

// Figures builds the figures that follow from a report and the
// prediction records: a critical-difference diagram per rank table,
// accuracy against shot budget per (pipeline, family) with shot-mode
// variants, accuracy against noise strength per (pipeline, family, noise
// model, shot budget) with noisy variants, and the distribution of p_acc
// per dataset for each exact interference model that reports it. The
// figures are in a fixed order and named figures/<kind>-<...>.
func Figures(rep *results.Report, preds []results.Prediction) ([]results.Figure, error) {
	var figs []results.Figure
	for _, t := range rep.Ranks {
		p, h, err := results.CDDiagram(t, fmt.Sprintf("Average ranks, pipeline %s (%d datasets)", t.Pipeline, len(t.Datasets)))
		if err != nil {
			return nil, fmt.Errorf("report: figures: %w", err)
		}
		figs = append(figs, results.Figure{
			Name: "figures/cd-" + outdir.SafeName(t.Pipeline), Plot: p, Width: results.CDWidth, Height: h,
			Caption: fmt.Sprintf("Critical-difference diagram, pipeline %s: average accuracy ranks over %d datasets; Nemenyi CD at alpha %g", t.Pipeline, len(t.Datasets), t.Alpha),
		})
	}
	for _, sw := range sweepSpecs(rep) {
		p, err := results.SweepPlot(sw.sweep)
		if err != nil {
			return nil, fmt.Errorf("report: figures: %w", err)
		}
		figs = append(figs, results.Figure{Name: sw.name, Caption: sw.caption, Plot: p, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true})
	}
	pf, err := paccFigures(rep, preds)
	if err != nil {
		return nil, err
	}
	figs = append(figs, pf...)
	return figs, nil
}

// sweepSpec is the data of one sweep figure.
type sweepSpec struct {
	name, caption string
	sweep         results.Sweep
}

// sweepIndex holds what the sweep figures of a report are drawn from: its
// cells by (dataset, pipeline, model), and its datasets, pipelines and
// interference families in first-seen order.
type sweepIndex struct {
	rep          *results.Report
	cell         map[cellID]results.Summary
	dss, pipes   []string
	families     []string
	manyFamilies bool
}

func newSweepIndex(rep *results.Report) *sweepIndex {
	x := &sweepIndex{rep: rep, cell: map[cellID]results.Summary{}}
	seenD, seenP, seenF := map[string]bool{}, map[string]bool{}, map[string]bool{}
	for _, s := range rep.Summary {
		x.cell[idOf(s)] = s
		if !seenD[s.Dataset] {
			seenD[s.Dataset] = true
			x.dss = append(x.dss, s.Dataset)
		}
		if !seenP[s.Pipeline] {
			seenP[s.Pipeline] = true
			x.pipes = append(x.pipes, s.Pipeline)
		}
	}
	for _, v := range rep.Variants {
		if v.Interference && !seenF[v.Family] {
			seenF[v.Family] = true
			x.families = append(x.families, v.Family)
		}
	}
	x.manyFamilies = len(x.families) > 1
	return x
}

// bestBaseline is the highest mean accuracy of a classical model on
// (dataset, pipeline), NaN for none.
func (x *sweepIndex) bestBaseline(ds, pipe string) float64 {
	best := math.NaN()
	for _, v := range x.rep.Variants {
		if v.Interference {
			continue
		}
		if s, ok := x.cell[cellID{ds, pipe, v.Model}]; ok && (math.IsNaN(best) || s.Metrics[0].Mean > best) {
			best = s.Metrics[0].Mean
		}
	}
	return best
}

// exactOf is the accuracy of the family's exact variant (mode exact, or
// else a noiseless circuit simulation without shots), NaN for none.
func (x *sweepIndex) exactOf(fam, ds, pipe string) float64 {
	for _, mode := range []string{"exact", "circuit"} {
		for _, v := range x.rep.Variants {
			if v.Interference && v.Family == fam && v.Mode == mode && v.Shots == 0 && v.Noise == "" {
				if s, ok := x.cell[cellID{ds, pipe, v.Model}]; ok {
					return s.Metrics[0].Mean
				}
			}
		}
	}
	return math.NaN()
}

// suffix and titleFamily name the family in file names and titles when
// the report has several.
func (x *sweepIndex) suffix(fam string) string {
	if x.manyFamilies {
		return "-" + outdir.SafeName(fam)
	}
	return ""
}

func (x *sweepIndex) titleFamily(fam string) string {
	if x.manyFamilies {
		return " (" + fam + ")"
	}
	return ""
}

// lines makes the lines of one sweep over the variants vs (sorted by
// at(v)), one line per dataset that has any of them.
func (x *sweepIndex) lines(vs []results.Variant, pipe, fam string, at func(results.Variant) float64) []results.SweepLine {
	slices.SortStableFunc(vs, func(p, q results.Variant) int { return cmp.Compare(at(p), at(q)) })
	var lines []results.SweepLine
	for _, ds := range x.dss {
		l := results.SweepLine{Label: ds, Exact: x.exactOf(fam, ds, pipe), Baseline: x.bestBaseline(ds, pipe)}
		for _, v := range vs {
			s, ok := x.cell[cellID{ds, pipe, v.Model}]
			if !ok {
				continue
			}
			m := s.Metrics[0]
			l.X = append(l.X, at(v))
			l.Mean = append(l.Mean, m.Mean)
			l.Lo = append(l.Lo, m.Lo)
			l.Hi = append(l.Hi, m.Hi)
		}
		if len(l.X) > 0 {
			lines = append(lines, l)
		}
	}
	return lines
}

// noiseKey groups noisy variants into one sweep: same noise model, same
// shot budget.
type noiseKey struct {
	noise string
	shots int
}

// sweepSpecs lists the shot-budget and noise-strength sweeps of a report:
// per pipeline and family, one sweep over the shot-mode variants without
// noise and one per (noise model, shot budget) over the noisy variants.
func sweepSpecs(rep *results.Report) []sweepSpec {
	x := newSweepIndex(rep)
	var out []sweepSpec
	for _, pipe := range x.pipes {
		for _, fam := range x.families {
			var shots []results.Variant
			var noiseKeys []noiseKey
			noisy := map[noiseKey][]results.Variant{}
			for _, v := range rep.Variants {
				if !v.Interference || v.Family != fam {
					continue
				}
				switch {
				case v.Noise == "" && v.Shots > 0:
					shots = append(shots, v)
				case v.Noise != "" && !math.IsNaN(v.Strength):
					k := noiseKey{v.Noise, v.Shots}
					if _, ok := noisy[k]; !ok {
						noiseKeys = append(noiseKeys, k)
					}
					noisy[k] = append(noisy[k], v)
				}
			}
			if sw, ok := x.shotSweep(shots, pipe, fam); ok {
				out = append(out, sw)
			}
			slices.SortStableFunc(noiseKeys, func(p, q noiseKey) int { return cmp.Or(cmp.Compare(p.noise, q.noise), cmp.Compare(p.shots, q.shots)) })
			for _, k := range noiseKeys {
				if sw, ok := x.noiseSweep(noisy[k], k, pipe, fam); ok {
					out = append(out, sw)
				}
			}
		}
	}
	return out
}

// shotSweep is accuracy against shot budget; ok is false without lines.
func (x *sweepIndex) shotSweep(vs []results.Variant, pipe, fam string) (sweepSpec, bool) {
	lines := x.lines(vs, pipe, fam, func(v results.Variant) float64 { return float64(v.Shots) })
	if len(lines) == 0 {
		return sweepSpec{}, false
	}
	return sweepSpec{
		name:    "figures/shots-" + outdir.SafeName(pipe) + x.suffix(fam),
		caption: fmt.Sprintf("Accuracy of %s against shot budget, pipeline %s, one line per dataset with its %s interval; exact mode dashed, best baseline dotted", fam, pipe, fmtLevel(x.rep.Protocol.Level)),
		sweep: results.Sweep{
			Title:  fmt.Sprintf("Accuracy against shot budget, pipeline %s%s", pipe, x.titleFamily(fam)),
			XLabel: "shots per test instance", YLabel: "accuracy", LogX: true, Lines: lines,
		},
	}, true
}

// noiseSweep is accuracy against noise strength for one noise model and
// shot budget, on a log axis when the strengths span a factor of 20 or
// more; ok is false without lines.
func (x *sweepIndex) noiseSweep(vs []results.Variant, k noiseKey, pipe, fam string) (sweepSpec, bool) {
	lines := x.lines(vs, pipe, fam, func(v results.Variant) float64 { return v.Strength })
	if len(lines) == 0 {
		return sweepSpec{}, false
	}
	logX := true
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, l := range lines {
		for _, v := range l.X {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if !(lo > 0) || hi/lo < 20 {
		logX = false
	}
	name := "figures/noise-" + outdir.SafeName(k.noise) + "-" + outdir.SafeName(pipe) + x.suffix(fam)
	shotsText := "exact probabilities"
	if k.shots > 0 {
		name += fmt.Sprintf("-shots%d", k.shots)
		shotsText = fmt.Sprintf("%d shots", k.shots)
	}
	return sweepSpec{
		name:    name,
		caption: fmt.Sprintf("Accuracy of %s against %s strength, pipeline %s, %s, one line per dataset with its %s interval; exact mode dashed, best baseline dotted", fam, k.noise, pipe, shotsText, fmtLevel(x.rep.Protocol.Level)),
		sweep: results.Sweep{
			Title:  fmt.Sprintf("Accuracy against %s noise, pipeline %s%s", k.noise, pipe, x.titleFamily(fam)),
			XLabel: k.noise + " strength", YLabel: "accuracy", LogX: logX, Lines: lines,
		},
	}, true
}

func fmtLevel(l float64) string { return fmt.Sprintf("%g%%", 100*l) }

// paccFigures builds the p_acc distributions of the exact interference
// models: one figure per model, a box per (dataset, pipeline).
func paccFigures(rep *results.Report, preds []results.Prediction) ([]results.Figure, error) {
	var dss, pipes []string
	seenD, seenP := map[string]bool{}, map[string]bool{}
	for _, s := range rep.Summary {
		if !seenD[s.Dataset] {
			seenD[s.Dataset] = true
			dss = append(dss, s.Dataset)
		}
		if !seenP[s.Pipeline] {
			seenP[s.Pipeline] = true
			pipes = append(pipes, s.Pipeline)
		}
	}
	dIdx, pIdx := map[string]int{}, map[string]int{}
	for i, d := range dss {
		dIdx[d] = i
	}
	for i, p := range pipes {
		pIdx[p] = i
	}
	var figs []results.Figure
	for _, v := range rep.Variants {
		if !v.Interference || v.Mode != "exact" || v.Shots != 0 || v.Noise != "" {
			continue
		}
		vals := make([][][]float64, len(pipes)) // [pipeline][dataset]
		for i := range vals {
			vals[i] = make([][]float64, len(dss))
		}
		n := 0
		for _, p := range preds {
			if p.Model != v.Model || math.IsNaN(p.PAcc) {
				continue
			}
			di, ok1 := dIdx[p.Dataset]
			pi, ok2 := pIdx[p.Pipeline]
			if !ok1 || !ok2 {
				continue
			}
			vals[pi][di] = append(vals[pi][di], p.PAcc)
			n++
		}
		if n == 0 {
			continue
		}
		b := results.Boxes{Title: fmt.Sprintf("Post-selection probability p_acc of %s per test instance", v.Model), YLabel: "p_acc", Groups: dss}
		for pi, pipe := range pipes {
			b.Series = append(b.Series, results.BoxSeries{Label: "pipeline " + pipe, Values: vals[pi]})
		}
		p, err := results.BoxPlot(b)
		if err != nil {
			return nil, fmt.Errorf("report: figures: %w", err)
		}
		figs = append(figs, results.Figure{
			Name: "figures/pacc-" + outdir.SafeName(v.Model), Plot: p, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true,
			Caption: fmt.Sprintf("Distribution of p_acc of %s over the test predictions, per dataset and pipeline", v.Model),
		})
	}
	return figs, nil
}

// KernelFigure draws the interference kernel against the Euclidean
// distance of normalised vectors beside the RBF kernel of every svm model
// of the spec with kernel = "rbf": a numeric gamma gives one curve;
// gamma = "scale" gives one curve per dataset, with gamma = 1/(d·Var(X))
// computed as the model would on the dataset transformed by the spec's
// first pipeline ending in l2 (fitted on all rows, for illustration), or
// by its first pipeline when none ends in l2.
func KernelFigure(p *plan.Plan) (results.Figure, error) {
	var curves []results.KernelCurve
	seen := map[string]bool{}
	pipe := p.Spec.Pipelines[0]
	for _, s := range p.Spec.Pipelines {
		if strings.HasSuffix(strings.TrimSpace(s), "l2") {
			pipe = s
			break
		}
	}
	for _, m := range p.Spec.Models {
		if m.Kind != "svm" || m.Params["kernel"] != "rbf" {
			continue
		}
		g, _ := m.Params["gamma"].(string)
		if g != modelkit.GammaInverseVariance {
			v, err := strconv.ParseFloat(g, 64)
			if err != nil {
				continue // not a gamma this figure can draw
			}
			label := fmt.Sprintf("RBF γ = %s (%s)", g, m.Name)
			if !seen[label] {
				seen[label] = true
				curves = append(curves, results.KernelCurve{Label: label, Gamma: v})
			}
			continue
		}
		if seen[modelkit.GammaInverseVariance] {
			continue
		}
		seen[modelkit.GammaInverseVariance] = true
		pl, err := datasets.ParsePipeline(pipe)
		if err != nil {
			return results.Figure{}, &input.Error{File: p.Spec.File, Key: "pipelines", Err: err}
		}
		for _, d := range p.Datasets {
			Z, err := pl.FitTransformLabeled(d.Data.X, d.Data.Y, d.Data.Rows)
			if err != nil {
				return results.Figure{}, fmt.Errorf("report: kernel figure: dataset %s: %w", d.Name, err)
			}
			gamma := ScaleGamma(Z)
			curves = append(curves, results.KernelCurve{Label: fmt.Sprintf("RBF γ = 1/(d·Var) on %s (%.3g)", d.Name, gamma), Gamma: gamma})
		}
	}
	pl, err := results.KernelProfile(curves)
	if err != nil {
		return results.Figure{}, fmt.Errorf("report: kernel figure: %w", err)
	}
	return results.Figure{
		Name: "figures/kernel-profile", Plot: pl, Width: 6 * vg.Inch, Height: 4 * vg.Inch,
		Caption: "Interference kernel 1 − d²/4 against the Euclidean distance d of normalised vectors, beside the RBF kernels of the spec (gamma = inverse-variance, 1/(d·Var(X)), on pipeline " + pipe + ")",
	}, nil
}

// ScaleGamma is the "inverse-variance" rule 1/(d·Var(X)) of baselines.SVM:
// population variance over all entries of X, 1 when it is 0.
func ScaleGamma(X *mat.Dense) float64 {
	n, d := X.Dims()
	if n == 0 || d == 0 {
		return 1
	}
	var mean float64
	for i := 0; i < n; i++ {
		for _, v := range X.RawRowView(i) {
			mean += v
		}
	}
	mean /= float64(n * d)
	var ss float64
	for i := 0; i < n; i++ {
		for _, v := range X.RawRowView(i) {
			ss += (v - mean) * (v - mean)
		}
	}
	v := ss / float64(n*d)
	if v == 0 {
		return 1
	}
	return 1 / (float64(d) * v)
}

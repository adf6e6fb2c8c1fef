package results

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot/vg"
)

// LearningRow is one row of learning.csv: a (dataset, pipeline, model)
// cell at one training size, a fraction of each outer training part.
type LearningRow struct {
	Dataset, Pipeline, Model string
	Size                     float64 // fraction of the outer training part (1: the run itself)
	NTrain                   float64 // mean training rows over the folds
	Folds                    int
	Interval                 string
	Metrics                  []MetricSummary // in the order of MetricNames
	MeanPAcc                 float64         // NaN for models without one
	ShotsMedian              float64         // median shots for a confident decision; NaN without class probabilities
}

// WriteLearning writes learning.csv.
func WriteLearning(w io.Writer, rows []LearningRow) error {
	cw := csv.NewWriter(w)
	head := []string{"dataset", "pipeline", "model", "train_size", "n_train", "n_scores", "interval"}
	for _, m := range MetricNames {
		head = append(head, m+"_mean", m+"_std", m+"_lo", m+"_hi")
	}
	head = append(head, "mean_p_acc", "shots_median")
	cw.Write(head)
	for _, r := range rows {
		if len(r.Metrics) != len(MetricNames) {
			return fmt.Errorf("results: learning row %s/%s/%s has %d metrics", r.Dataset, r.Pipeline, r.Model, len(r.Metrics))
		}
		rec := csvTexts(r.Dataset, r.Pipeline, r.Model)
		rec = append(rec, strconv.FormatFloat(r.Size, 'g', -1, 64), strconv.FormatFloat(r.NTrain, 'f', 1, 64), strconv.Itoa(r.Folds), r.Interval)
		for _, m := range r.Metrics {
			rec = append(rec, Fmt(m.Mean), Fmt(m.Std), Fmt(m.Lo), Fmt(m.Hi))
		}
		shots := Fmt(r.ShotsMedian)
		if math.IsInf(r.ShotsMedian, 1) {
			shots = "inf"
		}
		rec = append(rec, Fmt(r.MeanPAcc), shots)
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// LearningFigures draws one learning curve per dataset: accuracy against
// the training size (fraction of each outer training part), one line per
// (pipeline, model) with its interval. Named figures/learning-<dataset>.
func LearningFigures(rows []LearningRow, level float64, fileSafe func(string) string) ([]Figure, error) {
	var dss []string
	lines := map[string][]SweepLine{}
	idx := map[string]int{}
	for _, r := range rows {
		if _, ok := lines[r.Dataset]; !ok {
			dss = append(dss, r.Dataset)
		}
		key := r.Dataset + "\x00" + r.Pipeline + "\x00" + r.Model
		i, ok := idx[key]
		if !ok {
			i = len(lines[r.Dataset])
			idx[key] = i
			lines[r.Dataset] = append(lines[r.Dataset], SweepLine{Label: r.Model + " (" + r.Pipeline + ")", Exact: math.NaN(), Baseline: math.NaN()})
		}
		l := &lines[r.Dataset][i]
		m := r.Metrics[0]
		l.X, l.Mean, l.Lo, l.Hi = append(l.X, r.Size), append(l.Mean, m.Mean), append(l.Lo, m.Lo), append(l.Hi, m.Hi)
	}
	var figs []Figure
	for _, ds := range dss {
		p, err := SweepPlot(Sweep{
			Title:  "Learning curve, dataset " + ds,
			XLabel: "share of the outer training part", YLabel: "accuracy", Lines: lines[ds],
		})
		if err != nil {
			return nil, fmt.Errorf("results: learning curve %s: %w", ds, err)
		}
		figs = append(figs, Figure{
			Name: "figures/learning-" + fileSafe(ds), Plot: p, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true,
			Caption: fmt.Sprintf("Learning curve on %s: accuracy against the share of each outer training part (nested class-stratified subsamples), with the %g%% interval", ds, 100*level),
		})
	}
	return figs, nil
}

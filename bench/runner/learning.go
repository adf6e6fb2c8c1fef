package runner

import (
	"cmp"
	"math"
	"slices"

	"fringe/bench/plan"
	"fringe/qkernel"
	"fringe/results"
)

// LearningConfidence is the confidence of a right decision behind the
// learning curve's shots column (as in fringe assess).
const LearningConfidence = 0.95

// LearningRecords are the rows of learning.csv: per (dataset, pipeline,
// model) cell, in run order, one row per training size, ascending (the
// learning curve's subsamples, then the run itself at size 1): the mean
// training-part size, the metrics with their intervals as summary.csv
// gives them (the corrected resampled t interval on the subsample's mean
// size), and for the interference classifier the mean p_acc and the
// median number of shots for a 95%-right decision
// (qkernel.ShotsForConfidence). Nil without train_sizes.
func LearningRecords(p *plan.Plan, res []TaskResult) []results.LearningRow {
	if len(p.Spec.CV.TrainSizes) == 0 {
		return nil
	}
	type cell struct{ d, p, m int }
	bySize := make([][]TaskResult, len(p.Spec.CV.TrainSizes)+1)
	for _, r := range res {
		bySize[r.Task.Size] = append(bySize[r.Task.Size], r)
	}
	rows := map[cell][]results.LearningRow{}
	var order []cell
	// Sizes ascending: the subsamples (Size 1..k), then the run (Size 0).
	for k := 1; k <= len(bySize); k++ {
		size := k % len(bySize)
		group := bySize[size]
		if len(group) == 0 {
			continue
		}
		frac := 1.0
		if size > 0 {
			frac = p.Spec.CV.TrainSizes[size-1]
		}
		sums := summarise(p, group)
		shots := map[cell][]float64{}
		nTrain := map[cell][2]float64{}
		for _, r := range group {
			c := cell{r.Task.Dataset, r.Task.Pipeline, r.Task.Model}
			n := nTrain[c]
			nTrain[c] = [2]float64{n[0] + float64(r.NTrain), n[1] + 1}
			for _, det := range r.Details {
				if len(det.Probs) < 2 || math.IsNaN(det.PAcc) {
					continue
				}
				q := slices.Clone(det.Probs)
				slices.SortFunc(q, func(x, y float64) int { return cmp.Compare(y, x) })
				shots[c] = append(shots[c], qkernel.ShotsForConfidence(det.PAcc, q[0], q[1], LearningConfidence))
			}
		}
		for i, s := range sums {
			r := group[0]
			for _, g := range group {
				if p.Datasets[g.Task.Dataset].Name == s.Dataset && p.Spec.Pipelines[g.Task.Pipeline] == s.Pipeline && p.Spec.Models[g.Task.Model].Name == s.Model {
					r = g
					break
				}
			}
			c := cell{r.Task.Dataset, r.Task.Pipeline, r.Task.Model}
			if _, ok := rows[c]; !ok {
				order = append(order, c)
			}
			n := nTrain[c]
			rows[c] = append(rows[c], results.LearningRow{
				Dataset: s.Dataset, Pipeline: s.Pipeline, Model: s.Model, Size: frac,
				NTrain: n[0] / n[1], Folds: s.Folds, Interval: s.Interval, Metrics: sums[i].Metrics,
				MeanPAcc: s.MeanPAcc, ShotsMedian: median(shots[c]),
			})
		}
	}
	var out []results.LearningRow
	for _, c := range order {
		out = append(out, rows[c]...)
	}
	return out
}

// median of v (NaN for none, +Inf when half are infinite).
func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	slices.Sort(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

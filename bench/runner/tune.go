package runner

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strconv"

	"fringe/baselines"
	"fringe/bench/cv"
	"fringe/bench/input"
	"fringe/bench/plan"
	"fringe/results"
)

// Tuning is what the grid search of a tuned model found on one outer
// training part: the mean inner score of every grid point (in grid order)
// and the point chosen, the first with the highest score.
type Tuning struct {
	Scores []float64
	Chosen int
}

// tune runs the grid search of task t's tuned model on the training part
// of pr: stratified k-fold inner cross-validation (spec.Tune) drawn with a
// generator seeded from the run seed and the task key, so that it is the
// same for any worker count, shard or resume; every grid point is fitted
// on every inner training part (its own pipeline steps fitted there too)
// and scored on the inner test part by the tuning metric. No row of the
// outer test part reaches the choice.
//
// An SVM tuned over C and gamma only, by accuracy, without pipeline steps
// of its own runs as baselines.TunedSVM on the same inner folds, which
// shares kernel rows across the folds and values of C and warm-starts
// each C from the previous one; its scores agree with fitting every point
// on its own up to the solver's tolerance.
func tune(ctx context.Context, p *plan.Plan, t plan.Task, pr *plan.Prepared) (*Tuning, error) {
	ms := p.Spec.Models[t.Model]
	g := ms.Grid
	d := p.Datasets[t.Dataset]
	nClass := len(d.Data.Classes)
	key := p.Key(t)
	rng := plan.NewRand(p.Spec.Seed, "tune", key)
	inner, err := cv.Stratified(pr.Ytr, nClass, p.Spec.Tune.Folds, rng)
	if err != nil {
		return nil, &input.Error{File: p.Spec.File, Key: "tune.folds", Err: fmt.Errorf("%s: inner folds: %w", pr.Where, err)}
	}
	if tsv, ok := tunedSVM(p, t, g.Keys); ok {
		return tuneSVM(p, t, pr, tsv, inner)
	}
	scores := make([]float64, len(g.Points))
	for i, pt := range g.Points {
		var sum float64
		for f, sp := range inner {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			where := fmt.Sprintf("%s, inner fold %d, %s", pr.Where, f, g.Label(i))
			sub := pr.Sub(sp.Train, sp.Test, where)
			seed := plan.Seed(p.Spec.Seed, "tune", key, strconv.Itoa(i), strconv.Itoa(f))
			fp, err := fitPredict(ctx, p, t, pt.Spec, seed, sub)
			if err != nil {
				return nil, err
			}
			truth := make([]int, len(sp.Test))
			for k, j := range sp.Test {
				truth[k] = pr.Ytr[j]
			}
			sum += results.Score(truth, fp.pred, nClass).Values()[p.Spec.Tune.Metric]
		}
		scores[i] = sum / float64(len(inner))
	}
	return &Tuning{Scores: scores, Chosen: best(scores)}, nil
}

// best is the first index of the highest score (NaN scores never win).
func best(scores []float64) int {
	b := 0
	for i, s := range scores {
		if !math.IsNaN(s) && (math.IsNaN(scores[b]) || s > scores[b]) {
			b = i
		}
	}
	return b
}

// svmReuse lets tuned SVMs share kernel rows and warm starts across inner
// folds and values of C (baselines.TunedSVM); without it every grid point
// is fitted on every inner fold on its own, exactly as GridSearchCV does
// (the check against scikit-learn turns it off: a test row whose decision
// value is within the solver's tolerance of 0 may fall either way).
var svmReuse = true

// tunedSVM returns the TunedSVM of task t's model when it can run the
// grid: an SVM, accuracy as the metric, no pipeline steps of its own, and
// only C and gamma tuned.
func tunedSVM(p *plan.Plan, t plan.Task, keys []string) (*baselines.TunedSVM, bool) {
	ms := p.Spec.Models[t.Model]
	if ms.Kind != "svm" || p.Spec.Tune.Metric != 0 {
		return nil, false
	}
	for _, k := range keys {
		if k != "C" && k != "gamma" {
			return nil, false
		}
	}
	for _, pt := range ms.Grid.Points {
		if pt.Spec.Pipeline != "" {
			return nil, false
		}
	}
	base, ok := ms.Grid.Points[0].Spec.New(0).(*baselines.SVM)
	if !ok {
		return nil, false
	}
	ts := &baselines.TunedSVM{SVM: *base, NoReuse: !svmReuse}
	for _, pt := range ms.Grid.Points {
		s := pt.Spec.New(0).(*baselines.SVM)
		if !slices.Contains(ts.Cs, s.C) {
			ts.Cs = append(ts.Cs, s.C)
		}
		if !slices.Contains(ts.Gammas, s.Gamma) {
			ts.Gammas = append(ts.Gammas, s.Gamma)
		}
	}
	if len(ts.Cs)*len(ts.Gammas) != len(ms.Grid.Points) {
		return nil, false // a value written twice: fit point by point
	}
	return ts, true
}

// tuneSVM runs the grid of an SVM through baselines.TunedSVM on the inner
// folds and returns the scores in grid order (C outer, gamma inner, as
// the grid's sorted keys give).
func tuneSVM(p *plan.Plan, t plan.Task, pr *plan.Prepared, ts *baselines.TunedSVM, inner []cv.Split) (*Tuning, error) {
	ms := p.Spec.Models[t.Model]
	for _, sp := range inner {
		ts.FoldTests = append(ts.FoldTests, sp.Test)
	}
	if err := ts.Fit(pr.Ztr, pr.Ytr, len(p.Datasets[t.Dataset].Data.Classes)); err != nil {
		return nil, p.ClassifyModel(err, pr.Where+", inner folds", ms.Name, pr.RowsTr)
	}
	sc := ts.Scores() // [C][gamma]
	scores := make([]float64, len(ms.Grid.Points))
	for i, pt := range ms.Grid.Points {
		s := pt.Spec.New(0).(*baselines.SVM)
		scores[i] = sc[slices.Index(ts.Cs, s.C)][slices.Index(ts.Gammas, s.Gamma)]
	}
	return &Tuning{Scores: scores, Chosen: best(scores)}, nil
}

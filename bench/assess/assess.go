package assess

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"fringe/bench/export"
	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/bench/plan"
	"fringe/bench/report"
	"fringe/bench/runner"
	"fringe/bench/spec"
	"fringe/bench/stats"
	"fringe/datasets"
	"fringe/qkernel"
	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/results"
)

// DefaultPipelines are the pipelines `fringe assess` assesses when
// none are given.
var DefaultPipelines = []string{"std+l2", "l2", "std+lift"}

// ReductionPipelines are added to DefaultPipelines for a dataset with more
// than ReduceAbove features when no pipelines are given: principal
// components fitted on each training part (pca, datasets), so that the
// report shows what reducing to 8 and 4 features buys in qubits, gates and
// accuracy.
var ReductionPipelines = []string{"std+pca(8)+l2", "std+pca(4)+l2"}

// ReduceAbove is the feature count above which ReductionPipelines are
// assessed by default.
const ReduceAbove = 8

// DefaultSubsets are the train_subset sizes of the resource table.
var DefaultSubsets = []int{8, 16, 32}

// ClassicalPipeline is the pipeline of the classical baselines of an
// assessment: z-scores, what k-NN, SVMs and logistic regression are
// ordinarily given.
const ClassicalPipeline = "std"

// Options configure Run. The zero value assesses every dataset
// Load accepts with DefaultPipelines, seed 0, 10 folds, 3 repeats,
// the class-balanced form of the classifier, p1 = p2/10 and 95% confidence.
type Options struct {
	Datasets  []spec.Dataset // nil: every name of datasets.Names()
	Pipelines []string       // nil: DefaultPipelines, with ReductionPipelines for datasets of more than ReduceAbove features
	Subsets   []int          // nil: DefaultSubsets; sizes below the class count or at least the training size are skipped
	Seed      uint64
	Folds     int     // 0: 10; capped per dataset at its smallest class
	Repeats   int     // 0: 3
	Uniform   bool    // assess the published uniform-weight form instead of the class-balanced one
	Ratio     float64 // p2/p1 of the noise budget; 0: 10
	Margin    float64 // equivalence margin of the verdict (accuracy units); 0: DefaultMargin
	Workers   int     // concurrent tasks; 0: all CPUs
	reduce    bool    // Pipelines were defaulted: add ReductionPipelines where they apply

	// File and Dir locate a spec the datasets came from: File names it in
	// errors, Dir resolves relative CSV paths ("" = working directory).
	File, Dir string

	// Device, when set, adds every circuit compiled to the device (routed
	// resources, p2 budget and estimated fidelity) and, for every
	// train_subset size, the classifier's accuracy simulated under the
	// device's calibrated noise on DeviceInstances test instances (0:
	// DefaultDeviceInstances; see deviceAccuracy). Nil leaves the report
	// as it is.
	Device          *device.Device
	DeviceInstances int

	ctx context.Context // of Run, for the device simulations
}

// DefaultMargin is the default equivalence margin of the verdict: a gap
// to the best baseline is called on par only when its whole interval lies
// within ±DefaultMargin, one accuracy point (see verdict).
const DefaultMargin = 0.01

// Confidence of a right decision in the shots budget, and the target
// fidelity of the noise budget.
const (
	Confidence     = 0.95
	assessFidelity = 0.5
)

func (o Options) withDefaults() (Options, error) {
	if o.Datasets == nil {
		for _, n := range datasets.Names() {
			o.Datasets = append(o.Datasets, spec.Dataset{Name: n})
		}
	}
	if o.Pipelines == nil {
		o.Pipelines = slices.Clone(DefaultPipelines)
		o.reduce = true
	}
	if o.Subsets == nil {
		o.Subsets = slices.Clone(DefaultSubsets)
	}
	if o.Folds == 0 {
		o.Folds = 10
	}
	if o.Repeats == 0 {
		o.Repeats = 3
	}
	if o.Ratio == 0 {
		o.Ratio = 10
	}
	if o.Margin == 0 {
		o.Margin = DefaultMargin
	}
	if o.File == "" {
		o.File = "assess"
	}
	if o.DeviceInstances == 0 {
		o.DeviceInstances = DefaultDeviceInstances
	}
	bad := func(key, format string, args ...any) error {
		return &input.Error{Key: key, Err: fmt.Errorf(format, args...)}
	}
	switch {
	case len(o.Datasets) == 0:
		return o, bad("datasets", "no datasets to assess")
	case len(o.Pipelines) == 0:
		return o, bad("pipelines", "no pipelines to assess")
	case o.Folds < 2:
		return o, bad("folds", "folds must be at least 2, got %d", o.Folds)
	case o.Repeats < 1:
		return o, bad("repeats", "repeats must be at least 1, got %d", o.Repeats)
	case !(o.Ratio >= 1) || math.IsInf(o.Ratio, 0):
		return o, bad("ratio", "the ratio p2/p1 must be a finite number >= 1, got %v", o.Ratio)
	case !(o.Margin > 0 && o.Margin < 1):
		return o, bad("margin", "the equivalence margin must lie in (0, 1), got %v", o.Margin)
	case o.DeviceInstances < 0:
		return o, bad("device-instances", "the number of simulated test instances must be positive, got %d", o.DeviceInstances)
	}
	seen := map[string]bool{}
	for _, d := range o.Datasets {
		if seen[d.Display()] {
			return o, bad("datasets", "dataset %q appears twice", d.Display())
		}
		seen[d.Display()] = true
	}
	seenP := map[string]bool{}
	for _, p := range o.Pipelines {
		if err := spec.CheckPipeline(p); err != nil {
			return o, &input.Error{Key: "pipelines", Err: err}
		}
		if seenP[p] {
			return o, bad("pipelines", "pipeline %q appears twice", p)
		}
		seenP[p] = true
	}
	for _, s := range o.Subsets {
		if s < 1 {
			return o, bad("subsets", "subset sizes must be positive, got %d", s)
		}
	}
	o.Subsets = slices.Clone(o.Subsets)
	slices.Sort(o.Subsets)
	o.Subsets = slices.Compact(o.Subsets)
	return o, nil
}

// beforeNorm splits a pipeline into the part before its final unit-norm
// step and that step: "std+l2" gives ("std", ""), "std+lift(2)" gives
// ("std", "lift(2)"), "l2" gives ("raw", ""). A pipeline that does not end
// in l2 or lift is returned whole (the classifier normalises its input
// itself). lift is the lift step to compare: the pipeline's own, or "lift".
func beforeNorm(p string) (before, lift string, err error) {
	pl, err := datasets.ParsePipeline(p)
	if err != nil {
		return "", "", err
	}
	steps := pl.Steps
	lift = "lift"
	if n := len(steps); n > 0 {
		switch s := steps[n-1].(type) {
		case *datasets.UnitNorm:
			steps = steps[:n-1]
		case *datasets.Lift:
			lift = s.Name()
			steps = steps[:n-1]
		}
	}
	return (&datasets.Pipeline{Steps: steps}).String(), lift, nil
}

// then appends a step to a pipeline name ("raw" + "l2" = "l2").
func then(p, step string) string {
	if p == "raw" {
		return step
	}
	return p + "+" + step
}

// minAboveChance is the least accuracy above the majority-class rate for
// which the norm share is reported.
const minAboveChance = 0.05

// Model names of the assessment's specs.
const (
	assessUniform  = "interference"
	assessBalanced = "interference-balanced"
	assessKNN      = "knn-k5"
)

func mustModel(m map[string]any) modelkit.Spec {
	ms, err := modelkit.Parse(m)
	if err != nil {
		// The tables below are fixed and valid.
		panic("assess: ment model: " + err.Error())
	}
	return ms
}

// assessDataset is everything computed for one dataset.
type assessDataset struct {
	spec                 spec.Dataset
	data                 *datasets.Dataset
	pipelines            []string // assessed for this dataset
	folds                int
	quantum, norm, class *plan.Plan
	qres, nres, cres     []runner.TaskResult
}

// Run runs the assessment: for every dataset, stratified k-fold
// cross-validation of the exact interference classifier (both weightings)
// on each pipeline, of k-NN (k = 5) on the vectors before and after
// unit-norm scaling, after lift and on the norm alone, and of the
// classical baselines (k-NN, RBF SVM, logistic regression, nearest
// centroid) on ClassicalPipeline; then the compiled circuit's
// registers, gates and noise budget, the post-selection statistics and
// shots budget, the kernel-target alignments and the ranking. Every
// dataset's splits depend only on the seed, its name and the repeat, so
// all of its models see the same folds and the differences are paired.
// Errors caused by the input satisfy errors.Is(err, input.ErrBad).
func Run(ctx context.Context, opt Options) (*results.Assessment, error) {
	o, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	o = o.withContext(ctx)
	a := &results.Assessment{
		Seed: o.Seed, Repeats: o.Repeats, Confidence: Confidence, Ratio: o.Ratio,
		Weights: "balanced", Level: 1 - report.Alpha, Subsets: o.Subsets, ClassicalPipeline: ClassicalPipeline,
		Margin: o.Margin,
	}
	if o.Device != nil {
		a.Device, a.DeviceNote, a.DeviceFamily, a.DeviceInstances = o.Device.Name, o.Device.Note, o.Device.Family.String(), o.DeviceInstances
		a.DeviceSHA = o.Device.SHA256
	}
	if o.Uniform {
		a.Weights = "uniform"
	}
	var warn [][2]string
	for _, ds := range o.Datasets {
		ad, err := assessRun(ctx, o, ds)
		if err != nil {
			return nil, err
		}
		if ad.folds < o.Folds {
			warn = append(warn, [2]string{ds.Display(), fmt.Sprintf("%d folds instead of %d (its smallest class has %d members)", ad.folds, o.Folds, ad.folds)})
		}
		src := ad.data.Source
		a.Datasets = append(a.Datasets, results.DatasetRecord{
			Name: ds.Display(), Source: ds.Name, Title: src.Title, Origin: src.Origin, Citation: src.Citation,
			Licence: src.Licence, File: src.File, SHA256: src.SHA256, Synthetic: src.Synthetic, Note: src.Note,
			Rows: ad.data.Len(), Features: ad.data.Features, Classes: ad.data.Classes, Counts: ad.data.ClassCounts(),
		})
		for pi, pipe := range ad.pipelines {
			row, res, w, err := assessRow(o, ad, pi, pipe)
			if err != nil {
				return nil, err
			}
			a.Rows = append(a.Rows, row)
			a.Resources = append(a.Resources, res...)
			for _, x := range w {
				warn = append(warn, [2]string{ds.Display() + "/" + pipe, x})
			}
		}
	}
	a.Ranking = rankAssessment(a.Rows)
	for r, i := range a.Ranking {
		a.Rows[i].Rank = r + 1
	}
	a.Warnings = results.GroupWarnings(warn)
	return a, nil
}

// assessRun loads one dataset and runs its three plans.
func assessRun(ctx context.Context, o Options, ds spec.Dataset) (*assessDataset, error) {
	base := &spec.Spec{Name: "assess", Seed: o.Seed, File: o.File, Dir: o.Dir, Datasets: []spec.Dataset{ds}}
	data, err := plan.LoadDataset(base, ds)
	if err != nil {
		return nil, err
	}
	smallest := math.MaxInt
	present := 0
	for _, c := range data.ClassCounts() {
		if c > 0 {
			present++
			smallest = min(smallest, c)
		}
	}
	if present < 2 {
		return nil, &input.Error{File: o.File, Err: fmt.Errorf("dataset %s: needs at least two classes with members, has %d", ds.Display(), present)}
	}
	folds := min(o.Folds, smallest)
	if folds < 2 {
		return nil, &input.Error{File: o.File, Err: fmt.Errorf("dataset %s: a class has a single member; cross-validation needs at least two per class", ds.Display())}
	}
	cvs := spec.CV{Method: spec.CVStratified, Folds: folds, Repeats: o.Repeats, TestFraction: 0.3}
	mkSpec := func(pipes []string, models ...map[string]any) *spec.Spec {
		s := *base
		s.Pipelines = pipes
		s.CV = cvs
		for _, m := range models {
			s.Models = append(s.Models, mustModel(m))
		}
		return &s
	}
	pipes := o.Pipelines
	if o.reduce && data.Dim() > ReduceAbove {
		pipes = append(slices.Clone(pipes), ReductionPipelines...)
	}
	var normPipes []string
	seen := map[string]bool{}
	for _, p := range pipes {
		before, lift, err := beforeNorm(p)
		if err != nil {
			return nil, &input.Error{Key: "pipelines", Err: err}
		}
		for _, q := range []string{before, then(before, "l2"), then(before, lift), then(before, "norm")} {
			if !seen[q] {
				seen[q] = true
				normPipes = append(normPipes, q)
			}
		}
	}
	ad := &assessDataset{spec: ds, data: data, folds: folds, pipelines: pipes}
	knn := map[string]any{"kind": "knn", "k": int64(5), "name": assessKNN}
	plans := []struct {
		s   *spec.Spec
		dst **plan.Plan
		res *[]runner.TaskResult
	}{
		{mkSpec(pipes,
			map[string]any{"kind": "interference", "name": assessUniform},
			map[string]any{"kind": "interference", "balance": true, "name": assessBalanced}), &ad.quantum, &ad.qres},
		{mkSpec(normPipes, knn), &ad.norm, &ad.nres},
		{mkSpec([]string{ClassicalPipeline}, knn,
			map[string]any{"kind": "svm", "kernel": "rbf"},
			map[string]any{"kind": "logreg"},
			map[string]any{"kind": "centroid"}), &ad.class, &ad.cres},
	}
	for _, pl := range plans {
		p, err := plan.New(pl.s)
		if err != nil {
			return nil, err
		}
		res, err := runner.Execute(ctx, p, runner.Options{Workers: o.Workers})
		if err != nil {
			return nil, err
		}
		*pl.dst, *pl.res = p, res
	}
	return ad, nil
}

// mean is the arithmetic mean of v (NaN for none), summed in order.
func mean(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

// foldKey identifies a split within a dataset.
type foldKey struct{ repeat, fold int }

// cellOf returns the summary of (pipeline, model) in sums.
func cellOf(sums []results.Summary, pipe, model string) (results.Summary, bool) {
	for _, s := range sums {
		if s.Pipeline == pipe && s.Model == model {
			return s, true
		}
	}
	return results.Summary{}, false
}

// foldAcc returns the accuracy per (repeat, fold) of one cell.
func foldAcc(p *plan.Plan, res []runner.TaskResult, pipe, model string) map[foldKey]float64 {
	out := map[foldKey]float64{}
	for _, r := range res {
		if p.Spec.Pipelines[r.Task.Pipeline] != pipe || p.Spec.Models[r.Task.Model].Name != model {
			continue
		}
		sp := p.Datasets[r.Task.Dataset].Splits[r.Task.Split]
		out[foldKey{sp.Repeat, sp.Fold}] = r.Scores.Accuracy
	}
	return out
}

// assessRow computes the row of one (dataset, pipeline) and its resource
// rows.
func assessRow(o Options, ad *assessDataset, pi int, pipe string) (results.AssessRow, []results.AssessResource, []string, error) {
	data := ad.data
	row := results.AssessRow{
		Dataset: ad.spec.Display(), Pipeline: pipe, Instances: data.Len(), Classes: len(data.Classes),
		Folds: ad.folds, Repeats: o.Repeats, Weights: "balanced",
	}
	assessed := assessBalanced
	if o.Uniform {
		assessed, row.Weights = assessUniform, "uniform"
	}
	qsum := runner.Summarise(ad.quantum, ad.qres)
	if s, ok := cellOf(qsum, pipe, assessUniform); ok {
		row.Uniform = s.Metrics[0]
	}
	if s, ok := cellOf(qsum, pipe, assessBalanced); ok {
		row.Balanced = s.Metrics[0]
	}
	row.Exact = row.Balanced
	if o.Uniform {
		row.Exact = row.Uniform
	}

	postSelection(&row, ad, pi, assessed)
	warns, err := baselineGap(&row, ad, pipe, assessed)
	if err != nil {
		return row, nil, nil, err
	}
	if err := normShare(&row, ad, pipe); err != nil {
		return row, nil, nil, err
	}
	out, err := circuitResources(&row, o, ad, pi, pipe)
	if err != nil {
		return row, nil, nil, err
	}
	row.Verdict = verdict(row, pipe, o.Margin)
	return row, out, warns, nil
}

// postSelection fills the post-selection probability and the shots a
// confident decision needs, over the test predictions of the assessed form
// of the classifier on pipeline pi.
func postSelection(row *results.AssessRow, ad *assessDataset, pi int, assessed string) {
	nan := math.NaN()
	var pacc, margin, shots []float64
	for _, r := range ad.qres {
		if r.Task.Pipeline != pi || ad.quantum.Spec.Models[r.Task.Model].Name != assessed {
			continue
		}
		for _, det := range r.Details {
			q := slices.Clone(det.Probs)
			slices.SortFunc(q, func(x, y float64) int { return cmp.Compare(y, x) })
			pacc = append(pacc, det.PAcc)
			margin = append(margin, q[0]-q[1])
			shots = append(shots, qkernel.ShotsForConfidence(det.PAcc, q[0], q[1], Confidence))
		}
	}
	row.PAcc = pacc
	row.PAccMean, row.PAccMin, row.PAcc5 = nan, nan, nan
	if len(pacc) > 0 {
		row.PAccMean = mean(pacc)
		row.PAccMin = slices.Min(pacc)
		row.PAcc5 = percentile(pacc, 0.05)
	}
	row.MarginMedian = percentile(margin, 0.5)
	row.ShotsMedian = percentile(shots, 0.5)
	row.Shots90 = percentile(shots, 0.9)

}

// baselineGap fills the best classical baseline and the paired corrected
// interval and test of the assessed form's accuracy against it; it returns
// the statistics' warnings.
func baselineGap(row *results.AssessRow, ad *assessDataset, pipe, assessed string) ([]string, error) {
	nan := math.NaN()
	var warns []string
	csum := runner.Summarise(ad.class, ad.cres)
	best := -1
	for i, s := range csum {
		if best < 0 || s.Metrics[0].Mean > csum[best].Metrics[0].Mean && !report.Tied(s.Metrics[0].Mean, csum[best].Metrics[0].Mean) {
			best = i
		}
	}
	row.Gap, row.GapLo, row.GapHi, row.GapP = nan, nan, nan, nan
	if best >= 0 {
		row.Baseline = csum[best].Model + " (" + ClassicalPipeline + ")"
		row.BaselineAcc = csum[best].Metrics[0]
		fx := foldAcc(ad.quantum, ad.qres, pipe, assessed)
		fr := foldAcc(ad.class, ad.cres, ClassicalPipeline, csum[best].Model)
		keys := make([]foldKey, 0, len(fx))
		for k := range fx {
			if _, ok := fr[k]; ok {
				keys = append(keys, k)
			}
		}
		slices.SortFunc(keys, func(p, q foldKey) int { return cmp.Or(cmp.Compare(p.repeat, q.repeat), cmp.Compare(p.fold, q.fold)) })
		xs, rs, d := make([]float64, len(keys)), make([]float64, len(keys)), make([]float64, len(keys))
		for i, k := range keys {
			xs[i], rs[i] = fx[k], fr[k]
			d[i] = xs[i] - rs[i]
		}
		var nTrain, nTest float64
		for _, sp := range ad.quantum.Datasets[0].Splits {
			nTrain += float64(len(sp.Train))
			nTest += float64(len(sp.Test))
		}
		nsp := float64(len(ad.quantum.Datasets[0].Splits))
		sizes := stats.Sizes{Train: nTrain / nsp, Test: nTest / nsp}
		if len(keys) > 0 {
			iv, err := stats.CorrectedIntervalSizes(d, sizes, report.Alpha)
			if err != nil {
				return nil, fmt.Errorf("assess: %s/%s: %w", row.Dataset, pipe, err)
			}
			row.Gap, row.GapLo, row.GapHi = iv.Mean, iv.Lo, iv.Hi
			warns = append(warns, iv.Warnings...)
			t, err := stats.CorrectedPairedTSizes(xs, rs, sizes, report.Alpha)
			if err != nil {
				return nil, fmt.Errorf("assess: %s/%s: %w", row.Dataset, pipe, err)
			}
			row.GapP = t.P
		}
	}

	return warns, nil
}

// normShare fills what unit-norm scaling throws away: k-NN before and
// after it, after lift and on the norm alone, and the share of what k-NN
// reaches that the norm alone carries.
func normShare(row *results.AssessRow, ad *assessDataset, pipe string) error {
	nan := math.NaN()
	data := ad.data
	before, lift, err := beforeNorm(pipe)
	if err != nil {
		return &input.Error{Key: "pipelines", Err: err}
	}
	row.Before, row.Lift = before, lift
	nsum := runner.Summarise(ad.norm, ad.nres)
	acc := func(p string) float64 {
		if s, ok := cellOf(nsum, p, assessKNN); ok {
			return s.Metrics[0].Mean
		}
		return nan
	}
	row.KNNBefore, row.KNNL2 = acc(before), acc(then(before, "l2"))
	row.KNNLift, row.NormOnly = acc(then(before, lift)), acc(then(before, "norm"))
	row.Chance = float64(slices.Max(data.ClassCounts())) / float64(data.Len())
	// The share is taken of what k-NN reaches with the norm still present
	// (before normalisation, or after lift); when that is within
	// minAboveChance of the majority rate there is nothing to share.
	row.NormShare = nan
	if den := math.Max(row.KNNBefore, row.KNNLift) - row.Chance; den >= minAboveChance {
		row.NormShare = (row.NormOnly - row.Chance) / den
	}

	return nil
}

// circuitResources fills the kernel-target alignments on the first split
// and the registers, gates, depth and noise budget of the compiled circuit
// for each train_subset size and the full training part, returning one
// resource row per size. The counts are of the circuit of the first test
// row after its dead gates are removed (circuit.Simplify), so they depend
// on the data, not only on the register sizes: every (dataset, pipeline,
// size) compiles its own.
func circuitResources(row *results.AssessRow, o Options, ad *assessDataset, pi int, pipe string) ([]results.AssessResource, error) {
	data := ad.data
	sp := ad.quantum.Datasets[0].Splits[0]
	prep, err := ad.quantum.Prepare(0, pi, 0)
	if err != nil {
		return nil, err
	}
	where, Ztr, ytr, Zte := prep.Where, prep.Ztr, prep.Ytr, prep.Zte
	T := TargetKernel(ytr)
	K, err := InterferenceGram(Ztr)
	if err != nil {
		return nil, &input.Error{File: o.File, Err: fmt.Errorf("%s: %w", where, err)}
	}
	row.KTAInterference = CenteredAlignment(K, T)
	row.RBFGamma = report.ScaleGamma(Ztr)
	row.KTARBF = CenteredAlignment(RBFGram(Ztr, row.RBFGamma), T)

	_, dim := Ztr.Dims()
	row.Features = dim
	row.TrainSize = len(sp.Train)
	C := len(data.Classes)
	sizes := []int{}
	for _, s := range o.Subsets {
		if s >= C && s < row.TrainSize {
			sizes = append(sizes, s)
		}
	}
	sizes = append(sizes, row.TrainSize)
	var out []results.AssessResource
	for _, m := range sizes {
		idx := make([]int, len(sp.Train))
		for i := range idx {
			idx[i] = i
		}
		if m < len(idx) {
			rng := plan.NewRand(o.Seed, "assess-subset", row.Dataset, fmt.Sprint(m))
			idx = export.BalancedSubset(ytr, idx, C, m, rng.IntN)
		}
		train := make([][]float64, len(idx))
		y := make([]int, len(idx))
		for i, j := range idx {
			train[i], y[i] = Ztr.RawRowView(j), ytr[j]
		}
		var w []float64
		if !o.Uniform {
			if w, err = circuit.BalancedWeights(y, C); err != nil {
				return nil, fmt.Errorf("assess: %s: %w", where, err)
			}
		}
		c, err := circuit.Compile(Zte.RawRowView(0), train, y, C, w)
		if err != nil {
			return nil, &input.Error{File: o.File, Err: fmt.Errorf("%s: %w", where, err)}
		}
		r := c.Resources()
		res := results.AssessResource{
			Dataset: row.Dataset, Pipeline: pipe, Train: m, Full: m == row.TrainSize,
			Index: r.Index, Data: r.Data, Class: r.Class, Qubits: r.Qubits,
			PaddingWaste: float64((1<<r.Data)-dim) / float64(int(1)<<r.Data),
			CNOT:         r.CNOT, SingleQubit: r.SingleQubit, Depth: r.Depth,
			NoiseBudget: NoiseBudget(r.CNOT, r.SingleQubit, o.Ratio, assessFidelity),
		}
		if o.Device != nil {
			if res.Device, err = deviceResource(o, c); err != nil {
				return nil, err
			}
			if !res.Full {
				if err := deviceAccuracy(o, ad, pi, m, res.Device, r.Qubits); err != nil {
					return nil, err
				}
			} else if res.Device.Fits {
				res.Device.Note = "full training part: not simulated"
			}
		}
		out = append(out, res)
		if res.Full {
			row.Index, row.Data, row.Class, row.Qubits = res.Index, res.Data, res.Class, res.Qubits
			row.PaddingWaste = res.PaddingWaste
			row.CNOT, row.SingleQubit, row.Depth, row.NoiseBudget = res.CNOT, res.SingleQubit, res.Depth, res.NoiseBudget
			row.Device = res.Device
		}
	}
	return out, nil
}

// verdict sums a row up in a few words. The gap to the best baseline is
// read from its interval (the corrected resampled t interval at 95%):
//
//   - inside [-margin, +margin]: on par with the best baseline. This is
//     practical equivalence by the two one-sided tests (Schuirmann 1987):
//     both one-sided nulls |gap| >= margin are rejected at level 0.025 each,
//     as the 95% interval lies inside the band (the usual 90% form tests at
//     0.05; the interval the report shows is used, which is the stricter);
//   - above 0 or below 0 (and not inside the band): beats or trails it;
//   - holding 0 but not inside the band: not significantly different, which
//     is not evidence of equal accuracy (the interval may be wide).
//
// An interval inside the band that also excludes 0 is on par: the
// difference is significant but smaller than the margin.
func verdict(r results.AssessRow, pipe string, margin float64) string {
	var parts []string
	gap := fmt.Sprintf("gap %s, interval [%s, %s]", signed(r.Gap), signed(r.GapLo), signed(r.GapHi))
	switch {
	case math.IsNaN(r.Gap):
		parts = append(parts, "no baseline to compare")
	case r.GapLo >= -margin && r.GapHi <= margin:
		parts = append(parts, fmt.Sprintf("on par with the best baseline (%s, within the ±%s equivalence margin)", gap, strconv.FormatFloat(margin, 'f', -1, 64)))
	case r.GapHi < 0:
		parts = append(parts, fmt.Sprintf("trails the best baseline by %.3f", -r.Gap))
	case r.GapLo > 0:
		parts = append(parts, fmt.Sprintf("beats the best baseline by %.3f", r.Gap))
	default:
		parts = append(parts, fmt.Sprintf("not significantly different from the best baseline (%s)", gap))
	}
	if r.ShotsMedian > 1e4 {
		parts = append(parts, "needs more than 10^4 shots per decision")
	}
	if r.NormShare >= 0.5 && strings.HasSuffix(pipe, "l2") && r.KNNLift-r.KNNL2 > 0.02 {
		parts = append(parts, "the norm carries the class and l2 discards it (lift keeps it)")
	}
	return strings.Join(parts, "; ")
}

// rankAssessment orders the rows: Pareto fronts over (gap ↑, median shots
// ↓, noise budget ↑), then gap, shots and row order within a front. It
// sets each row's Front and returns the indices, best first.
func rankAssessment(rows []results.AssessRow) []int {
	type crit struct{ gap, shots, budget float64 }
	c := make([]crit, len(rows))
	for i, r := range rows {
		c[i] = crit{r.Gap, r.ShotsMedian, r.NoiseBudget}
		if math.IsNaN(c[i].gap) {
			c[i].gap = math.Inf(-1)
		}
		if math.IsNaN(c[i].shots) {
			c[i].shots = math.Inf(1)
		}
		if math.IsNaN(c[i].budget) {
			c[i].budget = 0
		}
	}
	dominates := func(x, y crit) bool {
		return x.gap >= y.gap && x.shots <= y.shots && x.budget >= y.budget &&
			(x.gap > y.gap || x.shots < y.shots || x.budget > y.budget)
	}
	left := make([]int, len(rows))
	for i := range left {
		left[i] = i
	}
	var order []int
	for front := 1; len(left) > 0; front++ {
		var now, rest []int
		for _, i := range left {
			dom := false
			for _, j := range left {
				if j != i && dominates(c[j], c[i]) {
					dom = true
					break
				}
			}
			if dom {
				rest = append(rest, i)
			} else {
				now = append(now, i)
				rows[i].Front = front
			}
		}
		slices.SortStableFunc(now, func(i, j int) int {
			return cmp.Or(cmp.Compare(c[j].gap, c[i].gap), cmp.Compare(c[i].shots, c[j].shots), cmp.Compare(i, j))
		})
		order = append(order, now...)
		left = rest
	}
	return order
}

// signed writes a gap as the report's tables do: "+0.013", "-0.085".
func signed(v float64) string {
	s := fmt.Sprintf("%+.3f", v)
	if s == "-0.000" {
		s = "+0.000"
	}
	return s
}
